"""Pearson correlation of every pair of numeric columns from streamed, mergeable co-moments.

For each pair (a, b) the state keeps, over the rows where both are present
(pairwise-complete rows): n, the means of a and b, the sums of squared
deviations M2a, M2b and the co-moment C = Σ (a - mean a)(b - mean b). A batch
is summarised in one compiled pass (``worker.profiling.native``) on values
shifted by a center of each column, near its mean (so the sums stay small and
cancellation stays harmless), then merged into the running state with Chan's pairwise
update, which is also how two states merge. The result is exact up to floating-point rounding.

References: Chan, Golub & LeVeque (1979), "Updating formulae and a pairwise
algorithm for computing sample variances"; Pébay (2008), "Formulas for robust,
one-pass parallel computation of covariances and arbitrary-order statistical
moments", Sandia report SAND2008-6212.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass

import numpy as np

from worker.profiling.native import RelationSums, relation_sums


@dataclass(frozen=True)
class PairMoments:
    """The co-moments of one pair over its pairwise-complete rows."""

    n: int
    mean_a: float
    mean_b: float
    m2_a: float
    m2_b: float
    c_ab: float

    @property
    def r(self) -> float | None:
        """Pearson r, or None when either column is constant over the complete rows."""
        if self.n < 2 or self.m2_a <= 0 or self.m2_b <= 0:
            return None
        value = self.c_ab / np.sqrt(self.m2_a * self.m2_b)
        return float(np.clip(value, -1.0, 1.0))

    @property
    def slope(self) -> float | None:
        """Least-squares slope of b on a (b ≈ slope·a + intercept)."""
        if self.n < 2 or self.m2_a <= 0:
            return None
        return float(self.c_ab / self.m2_a)

    @property
    def intercept(self) -> float | None:
        slope = self.slope
        return None if slope is None else float(self.mean_b - slope * self.mean_a)


class CoMoments:
    """Co-moments of all pairs of ``columns``, as p×p matrices (entry [i, j]: column i given j).

    ``n[i, j]`` counts the rows where both i and j are present; ``mean[i, j]`` and
    ``m2[i, j]`` are the mean and squared deviations of column i over those rows;
    ``c[i, j]`` is the co-moment of i and j over them (symmetric).
    """

    def __init__(self, columns: list[str]) -> None:
        self.columns = list(columns)
        p = len(self.columns)
        self.n = np.zeros((p, p), dtype=np.int64)
        self.mean = np.zeros((p, p))
        self.m2 = np.zeros((p, p))
        self.c = np.zeros((p, p))

    def update(self, numbers: Mapping[str, np.ndarray]) -> None:
        """Add one batch: ``numbers`` maps each column to float64 values, NaN where missing."""
        if self.columns:
            self.add(relation_sums([numbers[name] for name in self.columns], [], []))

    def add(self, sums: RelationSums) -> None:
        """Add one batch's sums (over this state's columns, in order)."""
        counts = sums.counts
        if not counts.any():
            return
        with np.errstate(invalid="ignore", divide="ignore"):
            inner_mean = np.where(counts > 0, sums.sums / counts, 0.0)
            m2 = np.where(counts > 0, sums.squares - sums.sums * inner_mean, 0.0)
            c = np.where(counts > 0, sums.cross - sums.sums * sums.sums.T / counts, 0.0)
        batch = CoMoments(self.columns)
        batch.n = counts
        batch.mean = np.where(counts > 0, inner_mean + sums.shift[:, None], 0.0)
        batch.m2 = np.maximum(m2, 0.0)
        batch.c = c
        self._absorb(batch)

    def merge(self, other: CoMoments) -> CoMoments:
        """Combine two states over the same columns (Chan's pairwise update)."""
        if other.columns != self.columns:
            raise ValueError("co-moments over different columns cannot be merged")
        merged = CoMoments(self.columns)
        merged.n, merged.mean, merged.m2, merged.c = self.n, self.mean, self.m2, self.c
        merged._absorb(other)
        return merged

    def _absorb(self, other: CoMoments) -> None:
        na = self.n.astype(np.float64)
        nb = other.n.astype(np.float64)
        n = na + nb
        with np.errstate(invalid="ignore", divide="ignore"):
            delta = other.mean - self.mean  # [i, j]: shift of column i's mean given j
            share = np.where(n > 0, nb / n, 0.0)
            weight = np.where(n > 0, na * nb / n, 0.0)
        mean = self.mean + delta * share
        m2 = self.m2 + other.m2 + delta * delta * weight
        c = self.c + other.c + delta * delta.T * weight
        self.n = self.n + other.n
        self.mean, self.m2, self.c = mean, m2, c

    def pair(self, a: str, b: str) -> PairMoments:
        i, j = self.columns.index(a), self.columns.index(b)
        return PairMoments(
            n=int(self.n[i, j]),
            mean_a=float(self.mean[i, j]),
            mean_b=float(self.mean[j, i]),
            m2_a=float(self.m2[i, j]),
            m2_b=float(self.m2[j, i]),
            c_ab=float(self.c[i, j]),
        )

    def pairs(self) -> list[tuple[str, str, PairMoments]]:
        """Every unordered pair (a before b in column order) with its co-moments."""
        out = []
        for i, a in enumerate(self.columns):
            for b in self.columns[i + 1 :]:
                out.append((a, b, self.pair(a, b)))
        return out
