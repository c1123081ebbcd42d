"""Pearson correlation of every pair of numeric columns from streamed, mergeable co-moments.

For each pair (a, b) the state keeps, over the rows where both are present
(pairwise-complete rows): n, the means of a and b, the sums of squared
deviations M2a, M2b and the co-moment C = Σ (a - mean a)(b - mean b). A batch
is summarised with four matrix products on values shifted by the batch's
column means (so the sums stay small and cancellation stays harmless), then
merged into the running state with Chan's pairwise update, which is also how
two states merge. The result is exact up to floating-point rounding.

References: Chan, Golub & LeVeque (1979), "Updating formulae and a pairwise
algorithm for computing sample variances"; Pébay (2008), "Formulas for robust,
one-pass parallel computation of covariances and arbitrary-order statistical
moments", Sandia report SAND2008-6212.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from functools import cached_property

import numpy as np


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


def column_totals(values: np.ndarray) -> np.ndarray:
    """Column sums of a (rows × columns) array, as a product with ones: six times
    cheaper than sum(axis=0) over rows of a few values."""
    return np.ones(values.shape[0]) @ values


@dataclass(frozen=True)
class ShiftedBatch:
    """A batch of numeric columns as a matrix, shifted by each column's batch mean.

    ``z`` is value − shift where a value is present and 0 elsewhere, so sums over
    z skip missing values by themselves. ``incomplete`` lists the rows where at
    least one column is missing and ``gaps`` marks, over those rows only, the
    missing cells (1.0): counts and sums over "the rows where column j is
    present" are the totals over all rows less what the incomplete rows hold, and
    delivered files miss few values, so those products run over a small share of
    the rows.
    """

    names: list[str]
    z: np.ndarray
    shift: np.ndarray
    incomplete: np.ndarray
    gaps: np.ndarray

    @cached_property
    def squares(self) -> np.ndarray:
        """z², computed once for every state that needs it."""
        return self.z * self.z

    @classmethod
    def of(cls, numbers: Mapping[str, np.ndarray], names: list[str]) -> ShiftedBatch:
        rows = len(numbers[names[0]]) if names else 0
        x = np.empty((rows, len(names)))
        for j, name in enumerate(names):
            x[:, j] = numbers[name]
        # A row's total is NaN where one of its values is (or inf on overflow, which
        # only adds a complete row to the incomplete ones, harmlessly): one product
        # finds the incomplete rows, and the masks are built over those alone.
        incomplete = np.flatnonzero(~np.isfinite(x @ np.ones(len(names))))
        part = x[incomplete]
        gaps = np.isnan(part)
        part[gaps] = 0.0
        x[incomplete] = part
        # The shift need not be exact (any shift keeps the co-moments exact; it only
        # keeps their sums small).
        shift = column_totals(x) / np.maximum(rows - gaps.sum(axis=0), 1)
        x -= shift
        part = x[incomplete]
        part[gaps] = 0.0
        x[incomplete] = part
        return cls(list(names), x, shift, incomplete, gaps.astype(np.float64))


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
            self.update_shifted(ShiftedBatch.of(numbers, self.columns))

    def update_shifted(self, batch_values: ShiftedBatch) -> None:
        """Add one batch already shifted by its column means (shared with other states)."""
        z, shift = batch_values.z, batch_values.shift
        if z.shape[0] == 0:
            return
        rows = z.shape[0]
        gaps = batch_values.gaps
        z_gaps = z[batch_values.incomplete]
        lost = gaps.sum(axis=0)
        # [i, j]: rows where both are present (all, less those missing i or j).
        counts = rows - lost[:, None] - lost[None, :] + gaps.T @ gaps
        # [i, j]: Σ z_i over rows where j (and so i) are present; z is 0 where i is missing.
        sums = column_totals(z)[:, None] - z_gaps.T @ gaps
        squares = column_totals(batch_values.squares)[:, None] - ((z_gaps * z_gaps).T @ gaps)
        cross = z.T @ z
        with np.errstate(invalid="ignore", divide="ignore"):
            inner_mean = np.where(counts > 0, sums / counts, 0.0)
            m2 = np.where(counts > 0, squares - sums * inner_mean, 0.0)
            c = np.where(counts > 0, cross - sums * sums.T / counts, 0.0)
        batch = CoMoments(self.columns)
        batch.n = np.rint(counts).astype(np.int64)
        batch.mean = np.where(counts > 0, inner_mean + shift[:, None], 0.0)
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
