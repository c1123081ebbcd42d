"""Streaming mean, variance, skewness and kurtosis from mergeable central moments.

Each batch's central moments are computed in two passes by the compiled
number pass (``worker.profiling.native.number_summary``: the mean first, then
powers of the deviations), which keeps the accuracy that a naive sum of squares
loses on data such as NIST's NumAcc sets; batches combine with the pairwise
update formulas.

References: T. F. Chan, G. H. Golub and R. J. LeVeque, "Updating formulae and a
pairwise algorithm for computing sample variances" (1979); P. Pébay, "Formulas
for robust, one-pass parallel computation of covariances and arbitrary-order
statistical moments", Sandia report SAND2008-6212 (2008).
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np

from worker.profiling.native import NumberSummary, number_summary


class MomentsState:
    """Count, mean and the sums of the 2nd to 4th powers of deviations (M2, M3, M4)."""

    def __init__(self) -> None:
        self.n = 0
        self.mean = 0.0
        self.m2 = 0.0
        self.m3 = 0.0
        self.m4 = 0.0
        self.total = 0.0
        self.minimum = math.inf
        self.maximum = -math.inf

    @classmethod
    def of(cls, values: np.ndarray) -> MomentsState:
        """The moments of one array of values (NaN skipped), computed in two passes."""
        return cls.from_summary(number_summary(values))

    @classmethod
    def from_summary(cls, summary: NumberSummary) -> MomentsState:
        """The moments of one batch from its compiled summary."""
        state = cls()
        if summary.n == 0:
            return state
        state.n = summary.n
        state.mean = summary.mean
        state.m2, state.m3, state.m4 = summary.m2, summary.m3, summary.m4
        state.total = summary.total
        state.minimum, state.maximum = summary.minimum, summary.maximum
        return state

    def update(self, values: np.ndarray) -> None:
        self.add(number_summary(values))

    def add(self, summary: NumberSummary) -> None:
        """Take in one batch's summary."""
        merged = self.merge(MomentsState.from_summary(summary))
        self.__dict__.update(merged.__dict__)

    def merge(self, other: MomentsState) -> MomentsState:
        if other.n == 0:
            return self._copy()
        if self.n == 0:
            return other._copy()
        na, nb = float(self.n), float(other.n)
        n = na + nb
        delta = other.mean - self.mean
        out = MomentsState()
        out.n = self.n + other.n
        out.mean = self.mean + delta * nb / n
        out.m2 = self.m2 + other.m2 + delta**2 * na * nb / n
        out.m3 = (
            self.m3
            + other.m3
            + delta**3 * na * nb * (na - nb) / n**2
            + 3.0 * delta * (na * other.m2 - nb * self.m2) / n
        )
        out.m4 = (
            self.m4
            + other.m4
            + delta**4 * na * nb * (na * na - na * nb + nb * nb) / n**3
            + 6.0 * delta**2 * (na * na * other.m2 + nb * nb * self.m2) / n**2
            + 4.0 * delta * (na * other.m3 - nb * self.m3) / n
        )
        out.total = self.total + other.total
        out.minimum = min(self.minimum, other.minimum)
        out.maximum = max(self.maximum, other.maximum)
        return out

    def _copy(self) -> MomentsState:
        out = MomentsState()
        out.__dict__.update(self.__dict__)
        return out

    def finalize(self) -> dict[str, Any]:
        """Mean, sample variance and std (n - 1), and the bias-corrected shape statistics.

        Skewness is the adjusted Fisher–Pearson coefficient G1 and kurtosis the
        bias-corrected excess kurtosis G2, the figures pandas ``skew``/``kurt`` and
        ``scipy.stats.skew``/``kurtosis`` with ``bias=False`` give (pandas also
        gives 0 for a constant column). References: D. N. Joanes and C. A. Gill,
        "Comparing measures of sample skewness and kurtosis", The Statistician 47 (1998).
        """
        n = self.n
        out: dict[str, Any] = {
            "min": self.minimum if n else None,
            "max": self.maximum if n else None,
            "mean": self.mean if n else None,
            "sum": self.total if n else None,
            "variance": None,
            "std": None,
            "skewness": None,
            "kurtosis": None,
        }
        if n >= 2:
            variance = self.m2 / (n - 1)
            out["variance"] = variance
            out["std"] = math.sqrt(variance)
        # A spread that underflows (constant or subnormal values) gives 0, as pandas does.
        skew_denominator = (self.m2 / n) ** 1.5 if self.m2 > 0 else 0.0
        kurt_denominator = self.m2 * self.m2
        if n >= 3:
            if skew_denominator == 0.0:
                out["skewness"] = 0.0
            else:
                g1 = (self.m3 / n) / skew_denominator
                out["skewness"] = math.sqrt(n * (n - 1)) / (n - 2) * g1
        if n >= 4:
            if kurt_denominator == 0.0:
                out["kurtosis"] = 0.0
            else:
                g2 = n * self.m4 / kurt_denominator - 3.0
                out["kurtosis"] = ((n + 1) * g2 + 6.0) * (n - 1) / ((n - 2) * (n - 3))
        return out
