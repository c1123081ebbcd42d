"""Quantiles of a numeric column: exact up to a bound, a uniform sample above it.

Exact quantiles are Hyndman & Fan type 7, numpy's default ``"linear"`` method.
Above ``exact_bound`` values the state keeps a mergeable uniform sample of
``sample_size`` values (bottom-k, ``sample.py``) and reads quantiles and ranks
off it. The rank error stated in the profile is the Dvoretzky–Kiefer–Wolfowitz
bound with Massart's constant: with probability at least 1 − δ (δ = 1 %) every
rank read from a sample of m values is within ε = √(ln(2/δ) / 2m) of the true
rank, for all points at once. The bound is for independent draws; a sample
without replacement only concentrates the ranks further (Hoeffding 1963, §6),
so it is conservative here. With the default 262,144 values ε ≈ 0.0032,
about what a KLL sketch with k = 800 states, at under a quarter of its cost:
7.7 ns a value over 11 million normal values in batches of 50,000, against
34.5 ns a value for the DataSketches KLL update (measured here, process time).

References: R. J. Hyndman and Y. Fan, "Sample quantiles in statistical
packages", The American Statistician 50 (1996); A. Dvoretzky, J. Kiefer and
J. Wolfowitz, Annals of Mathematical Statistics 27 (1956); P. Massart, "The
tight constant in the Dvoretzky–Kiefer–Wolfowitz inequality", Annals of
Probability 18 (1990); W. Hoeffding, "Probability inequalities for sums of
bounded random variables", JASA 58 (1963).
"""

from __future__ import annotations

import math
from collections.abc import Sequence

import numpy as np

from worker.profiling.columns.sample import SampleState

CONFIDENCE_MISS = 0.01
"""δ of the stated rank error: the chance that some rank is further off than stated."""


def dkw_rank_error(sample: int, population: int, delta: float = CONFIDENCE_MISS) -> float:
    """ε of the DKW inequality for ``sample`` draws: P(sup |F_m − F| > ε) ≤ δ.

    Zero when the sample holds the whole population (its ranks are then exact).
    """
    if sample >= population:
        return 0.0
    return math.sqrt(math.log(2.0 / delta) / (2.0 * max(sample, 1)))


class QuantileState:
    """Values kept exactly while few, else a uniform sample; mergeable either way."""

    def __init__(self, exact_bound: int, sample_size: int = 262_144, seed: int = 0) -> None:
        self.exact_bound = exact_bound
        self.sample_size = sample_size
        self.seed = seed
        self._chunks: list[np.ndarray] = []
        self._kept = 0
        self._n = 0
        self._sample: SampleState | None = None
        self._sorted: np.ndarray | None = None

    @property
    def exact(self) -> bool:
        return self._sample is None

    @property
    def n(self) -> int:
        return self._n

    def update(self, values: np.ndarray) -> None:
        """Add finite float64 values."""
        if values.size == 0:
            return
        self._sorted = None
        self._n += int(values.size)
        if self._sample is not None:
            self._sample.update(values)
            return
        self._chunks.append(values)
        self._kept += int(values.size)
        if self._kept > self.exact_bound:
            self._to_sample()

    def _to_sample(self) -> None:
        sample = SampleState(self.sample_size, seed=self.seed)
        for chunk in self._chunks:
            sample.update(chunk)
        self._chunks = []
        self._kept = 0
        self._sample = sample

    def merge(self, other: QuantileState) -> QuantileState:
        out = QuantileState(self.exact_bound, self.sample_size, self.seed)
        out._n = self._n + other._n
        if self.exact and other.exact and self._kept + other._kept <= self.exact_bound:
            out._chunks = [*self._chunks, *other._chunks]
            out._kept = self._kept + other._kept
            return out
        samples = []
        for part in (self, other):
            if part._sample is None:
                sample = SampleState(self.sample_size, seed=self.seed + 1 + len(samples))
                for chunk in part._chunks:
                    sample.update(chunk)
                samples.append(sample)
            else:
                samples.append(part._sample)
        out._sample = samples[0].merge(samples[1])
        return out

    def sorted_values(self) -> np.ndarray:
        """All values, sorted (exact mode only)."""
        if self._sample is not None:
            raise ValueError("values are not kept once the sample is in use")
        if self._sorted is None:
            joined = np.concatenate(self._chunks) if self._chunks else np.empty(0)
            self._sorted = np.sort(joined)
        return self._sorted

    def sorted_sample(self) -> np.ndarray:
        """The exact values, or the uniform sample above the bound; sorted."""
        if self._sample is None:
            return self.sorted_values()
        if self._sorted is None:
            self._sorted = np.sort(self._sample.values)
        return self._sorted

    @property
    def rank_error(self) -> float | None:
        """The stated normalized rank error (DKW, 99 %), or None when exact."""
        if self._sample is None:
            return None
        return dkw_rank_error(int(self._sample.values.size), self._n)

    def quantiles(self, probabilities: Sequence[float] | np.ndarray) -> np.ndarray:
        """Quantiles at the given probabilities (type 7, of the sample when not exact)."""
        probabilities = np.asarray(probabilities, dtype=np.float64)
        return np.quantile(self.sorted_sample(), probabilities, method="linear")

    def count_below(self, points: Sequence[float] | np.ndarray, *, inclusive: bool) -> np.ndarray:
        """How many values are below (or at, when inclusive) each point; estimated from
        the sample's ranks when not exact."""
        points = np.asarray(points, dtype=np.float64)
        side = "right" if inclusive else "left"
        values = self.sorted_sample()
        below = np.searchsorted(values, points, side=side)
        if self._sample is None:
            return below.astype(np.int64)
        return np.rint(below / max(values.size, 1) * self._n).astype(np.int64)
