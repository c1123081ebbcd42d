"""The statistics of one crosstab (a contingency table of two label columns).

One implementation for the profile's ``crosstabs[]`` and for the on-demand
crosstab over the columnar copy (``worker.profiling.queries``):

- counts and row shares;
- Pearson's chi-square test of independence, as ``scipy.stats.chi2_contingency``
  gives it with its default (Yates' continuity correction only for a 2×2 table,
  none for larger tables);
- adjusted standardised residuals (O − E) / sqrt(E (1 − r_i/n)(1 − c_j/n)),
  roughly standard normal under independence, so |residual| > 2 marks a
  combination that is over- (positive) or under-represented (negative);
- whether the expected counts meet Cochran's rule: at least 5 in 80 % of the
  cells and none below 1, without which the chi-square p-value is unreliable.

References: Agresti (2013), "Categorical Data Analysis", 3rd ed., §2.4.5
(adjusted residuals); Cochran (1954), "Some methods for strengthening the
common χ² tests", Biometrics 10(4); Yates (1934).
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any

import numpy as np


def expected_counts(table: np.ndarray) -> np.ndarray:
    """Counts expected under independence: row total × column total / n."""
    table = np.asarray(table, dtype=np.float64)
    return np.outer(table.sum(axis=1), table.sum(axis=0)) / table.sum()


def chi_square_statistic(table: np.ndarray, expected: np.ndarray, *, yates: bool) -> float:
    """Pearson's Σ (O − E)² / E; with ``yates``, each O first moves half a count towards E
    (never past it), as Yates (1934) proposed for a table with one degree of freedom."""
    observed = np.asarray(table, dtype=np.float64)
    if yates:
        gap = expected - observed
        observed = observed + np.sign(gap) * np.minimum(0.5, np.abs(gap))
    return float(((observed - expected) ** 2 / expected).sum())


def chi_square_p_value(statistic: float, dof: int) -> float:
    """The upper tail of the chi-square law with ``dof`` degrees of freedom at ``statistic``.

    scipy.special's ``chdtrc`` is the same function ``scipy.stats.chi2.sf`` calls,
    without loading scipy.stats (about 0.6 s of imports per process).
    """
    from scipy.special import chdtrc

    return float(chdtrc(dof, statistic))


def adjusted_residuals(table: np.ndarray) -> np.ndarray:
    """Adjusted standardised residuals of every cell (Agresti 2013, §2.4.5)."""
    table = np.asarray(table, dtype=np.float64)
    n = table.sum()
    row_share = table.sum(axis=1) / n
    col_share = table.sum(axis=0) / n
    expected = np.outer(row_share, col_share) * n
    variance = expected * np.outer(1.0 - row_share, 1.0 - col_share)
    with np.errstate(invalid="ignore", divide="ignore"):
        residuals = (table - expected) / np.sqrt(variance)
    return np.where(variance > 0, residuals, 0.0)


def cochran_ok(expected: np.ndarray, min_expected: float = 5.0, low_share: float = 0.2) -> bool:
    """Cochran (1954): no expected count below 1, at most ``low_share`` below ``min_expected``.

    The defaults are Cochran's (at least 5 in 80 % of the cells); the engine passes
    the flag thresholds' values, so the profile and its flags apply one rule.
    """
    expected = np.asarray(expected, dtype=np.float64)
    return bool(expected.min() >= 1.0 and (expected < min_expected).mean() <= low_share)


def crosstab_statistics(
    a: str,
    b: str,
    a_labels: Sequence[str],
    b_labels: Sequence[str],
    table: np.ndarray,
    *,
    sort_labels: bool = True,
    min_expected: float = 5.0,
    low_share: float = 0.2,
) -> dict[str, Any] | None:
    """The crosstab document of a pair, or None when the table is not at least 2×2.

    Labels are put in text order (unless ``sort_labels`` is False), so the
    same pair reads the same in every intake. Labels of a (rows) and of b
    (columns) that never occur together with a label of the other column are
    left out first, since their expected counts are zero and the test is
    undefined for them.
    """
    table = np.asarray(table, dtype=np.int64)
    if not sort_labels:
        row_order, col_order = np.arange(len(a_labels)), np.arange(len(b_labels))
    else:
        row_order = np.argsort(np.asarray(a_labels, dtype=object), kind="stable")
        col_order = np.argsort(np.asarray(b_labels, dtype=object), kind="stable")
    table = table[row_order][:, col_order]
    a_labels = [a_labels[i] for i in row_order]
    b_labels = [b_labels[i] for i in col_order]
    keep_rows = table.sum(axis=1) > 0
    keep_cols = table.sum(axis=0) > 0
    table = table[keep_rows][:, keep_cols]
    a_labels = [label for label, keep in zip(a_labels, keep_rows, strict=True) if keep]
    b_labels = [label for label, keep in zip(b_labels, keep_cols, strict=True) if keep]
    if min(table.shape) < 2:
        return None
    expected = expected_counts(table)
    dof = (table.shape[0] - 1) * (table.shape[1] - 1)
    statistic = chi_square_statistic(table, expected, yates=dof == 1)
    n = int(table.sum())
    row_totals = table.sum(axis=1, keepdims=True)
    min_side = min(table.shape) - 1
    uncorrected = statistic if dof != 1 else chi_square_statistic(table, expected, yates=False)
    return {
        "a": a,
        "b": b,
        "n": n,
        "counts": {"a_labels": a_labels, "b_labels": b_labels, "matrix": table.tolist()},
        "row_shares": (table / row_totals).round(6).tolist(),
        "chi2": statistic,
        "dof": dof,
        "p_value": chi_square_p_value(statistic, dof),
        "yates_correction": dof == 1,
        "cramers_v": float(np.sqrt(uncorrected / (n * min_side))),
        "residuals": adjusted_residuals(table).round(4).tolist(),
        "expected": expected.round(4).tolist(),
        "cochran_ok": cochran_ok(expected, min_expected, low_share),
    }
