"""Quantiles of a numeric column: exact up to a bound, a KLL sketch above it.

Exact quantiles are Hyndman & Fan type 7, numpy's default ``"linear"`` method.
Above ``exact_bound`` values the state switches to Apache DataSketches' KLL
sketch; its normalized rank error (the sketch's own a-priori bound, single
rank, 99 % confidence) is stated in the profile.

References: R. J. Hyndman and Y. Fan, "Sample quantiles in statistical
packages", The American Statistician 50 (1996); Z. Karnin, K. Lang and
E. Liberty, "Optimal quantile approximation in streams", FOCS 2016.
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np
from datasketches import kll_doubles_sketch


class QuantileState:
    """Values kept exactly while few, else a KLL sketch; mergeable either way."""

    def __init__(self, exact_bound: int, kll_k: int = 800) -> None:
        self.exact_bound = exact_bound
        self.kll_k = kll_k
        self._chunks: list[np.ndarray] = []
        self._kept = 0
        self._sketch: kll_doubles_sketch | None = None
        self._sorted: np.ndarray | None = None

    @property
    def exact(self) -> bool:
        return self._sketch is None

    @property
    def chunks(self) -> list[np.ndarray]:
        """The values kept so far (exact mode)."""
        return list(self._chunks)

    @property
    def n(self) -> int:
        return self._kept if self._sketch is None else int(self._sketch.n)

    def update(self, values: np.ndarray) -> None:
        """Add finite float64 values."""
        if values.size == 0:
            return
        self._sorted = None
        if self._sketch is not None:
            self._sketch.update(values)
            return
        self._chunks.append(values)
        self._kept += int(values.size)
        if self._kept > self.exact_bound:
            self._to_sketch()

    def _to_sketch(self) -> None:
        sketch = kll_doubles_sketch(self.kll_k)
        for chunk in self._chunks:
            sketch.update(chunk)
        self._chunks = []
        self._kept = 0
        self._sketch = sketch

    def merge(self, other: QuantileState) -> QuantileState:
        out = QuantileState(self.exact_bound, self.kll_k)
        if self.exact and other.exact and self._kept + other._kept <= self.exact_bound:
            out._chunks = [*self._chunks, *other._chunks]
            out._kept = self._kept + other._kept
            return out
        sketch = kll_doubles_sketch(self.kll_k)
        for part in (self, other):
            if part._sketch is not None:
                sketch.merge(part._sketch)
            else:
                for chunk in part._chunks:
                    sketch.update(chunk)
        out._sketch = sketch
        return out

    def sorted_values(self) -> np.ndarray:
        """All values, sorted (exact mode only)."""
        if self._sketch is not None:
            raise ValueError("values are not kept once the sketch is in use")
        if self._sorted is None:
            joined = np.concatenate(self._chunks) if self._chunks else np.empty(0)
            self._sorted = np.sort(joined)
        return self._sorted

    @property
    def rank_error(self) -> float | None:
        """The sketch's normalized rank error, or None when exact."""
        if self._sketch is None:
            return None
        return float(self._sketch.normalized_rank_error(False))

    def quantiles(self, probabilities: Sequence[float] | np.ndarray) -> np.ndarray:
        """Quantiles at the given probabilities (type 7 when exact)."""
        probabilities = np.asarray(probabilities, dtype=np.float64)
        if self._sketch is not None:
            return np.asarray(self._sketch.get_quantiles(probabilities.tolist()), dtype=float)
        values = self.sorted_values()
        return np.quantile(values, probabilities, method="linear")

    def count_below(self, points: Sequence[float] | np.ndarray, *, inclusive: bool) -> np.ndarray:
        """How many values are below (or at, when inclusive) each point; estimated from
        the sketch's ranks when not exact."""
        points = np.asarray(points, dtype=np.float64)
        if self._sketch is None:
            side = "right" if inclusive else "left"
            return np.searchsorted(self.sorted_values(), points, side=side).astype(np.int64)
        ranks = np.array(
            [self._sketch.get_rank(float(p), inclusive) for p in points], dtype=np.float64
        )
        return np.rint(ranks * self._sketch.n).astype(np.int64)
