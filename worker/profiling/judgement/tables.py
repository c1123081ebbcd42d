"""Contingency tables: reading a stored crosstab, expected counts, residuals, Cochran's rule.

Also the chi-square statistic of homogeneity used by the drift checks, so the
two share one implementation (and one test against scipy).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np

from worker.profiling.relations.crosstab import (
    adjusted_residuals,
    chi_square_p_value,
    chi_square_statistic,
    cochran_ok,
    expected_counts,
)


@dataclass(frozen=True)
class ContingencyTable:
    """Observed counts of two label columns, rows are labels of ``a``, columns labels of ``b``."""

    row_labels: list[Any]
    column_labels: list[Any]
    counts: np.ndarray

    @property
    def expected(self) -> np.ndarray:
        """Counts expected if the two columns were independent: row total × column total / n."""
        if self.counts.sum() == 0:
            return np.zeros_like(self.counts, dtype=float)
        return expected_counts(self.counts)

    def cochran_ok(self, min_expected: float = 5.0, low_share: float = 0.2) -> bool:
        """Cochran's rule: no expected count below 1, at most ``low_share`` below ``min_expected``.

        References: Cochran (1954), Biometrics 10:417-451.
        """
        expected = self.expected
        if expected.size == 0 or min(expected.shape) < 2:
            return False
        return cochran_ok(expected, min_expected, low_share)

    def adjusted_residuals(self) -> np.ndarray:
        """(O - E) / sqrt(E · (1 - row share) · (1 - column share)) per cell.

        Approximately standard normal under independence, so |value| > 3 is a
        cell far from what independence predicts.

        References: Haberman (1973), The analysis of residuals in cross-classified
        tables, Biometrics 29:205-220; Agresti (2002), Categorical Data Analysis, 2.4.5.
        """
        return adjusted_residuals(self.counts)

    def extreme_cells(self, threshold: float) -> list[dict[str, Any]]:
        """Cells whose |adjusted residual| exceeds ``threshold``, largest first."""
        residuals = self.adjusted_residuals()
        expected = self.expected
        cells = [
            {
                "a": self.row_labels[i],
                "b": self.column_labels[j],
                "count": int(self.counts[i, j]),
                "expected": round(float(expected[i, j]), 3),
                "residual": round(float(residuals[i, j]), 3),
            }
            for i, j in zip(*np.nonzero(np.abs(residuals) > threshold), strict=True)
        ]
        return sorted(cells, key=lambda c: -abs(c["residual"]))


def contingency_table(crosstab: dict[str, Any]) -> ContingencyTable | None:
    """The table of a stored crosstab, or None when it holds no usable counts.

    The engine stores ``{"a_labels", "b_labels", "matrix"}``; a mapping
    {a label: {b label: count}}, or a bare matrix with ``a_labels`` /
    ``b_labels`` beside it in the crosstab, are read too.
    """
    counts = crosstab.get("counts")
    if isinstance(counts, dict) and "matrix" in counts:
        rows = list(counts.get("a_labels") or [])
        cols = list(counts.get("b_labels") or [])
        matrix = np.asarray(counts["matrix"], dtype=float)
    elif isinstance(counts, dict) and "values" in counts:
        rows = list(counts.get("rows") or counts.get("a") or [])
        cols = list(counts.get("columns") or counts.get("b") or [])
        matrix = np.asarray(counts["values"], dtype=float)
    elif isinstance(counts, dict):
        rows = list(counts)
        cols = sorted({key for inner in counts.values() for key in inner}, key=str)
        matrix = np.array([[counts[r].get(c, 0) for c in cols] for r in rows], dtype=float)
    elif isinstance(counts, list):
        matrix = np.asarray(counts, dtype=float)
        if matrix.ndim != 2:
            return None
        rows = list(crosstab.get("a_labels") or crosstab.get("rows") or range(matrix.shape[0]))
        cols = list(crosstab.get("b_labels") or crosstab.get("columns") or range(matrix.shape[1]))
    else:
        return None
    if matrix.ndim != 2 or matrix.size == 0 or matrix.shape != (len(rows), len(cols)):
        return None
    return ContingencyTable(rows, cols, matrix)


@dataclass(frozen=True)
class ChiSquare:
    """Pearson's chi-square statistic, its degrees of freedom and p-value."""

    statistic: float
    dof: int
    p_value: float


def chi_square(counts: np.ndarray) -> ChiSquare:
    """Pearson's chi-square test on a table of counts, no continuity correction.

    Rows or columns with no count at all are dropped first (they carry no
    information and would give a zero expected count).

    References: Pearson (1900), Philosophical Magazine 50:157-175.
    """
    counts = np.asarray(counts, dtype=float)
    counts = counts[counts.sum(axis=1) > 0][:, counts.sum(axis=0) > 0]
    if counts.ndim != 2 or min(counts.shape, default=0) < 2:
        return ChiSquare(0.0, 0, 1.0)
    statistic = chi_square_statistic(counts, expected_counts(counts), yates=False)
    dof = (counts.shape[0] - 1) * (counts.shape[1] - 1)
    return ChiSquare(statistic, dof, chi_square_p_value(statistic, dof))
