"""Crosstab statistics checked against scipy and direct arithmetic."""

from __future__ import annotations

import numpy as np
import pytest
from scipy.stats import chi2_contingency
from scipy.stats.contingency import expected_freq

from worker.profiling.relations.crosstab import adjusted_residuals, cochran_ok, crosstab_statistics


def test_chi_square_matches_scipy_for_a_large_table() -> None:
    table = np.array([[30, 12, 8], [10, 25, 15], [5, 9, 40], [7, 7, 7]])
    doc = crosstab_statistics("a", "b", list("pqrs"), list("xyz"), table)
    reference = chi2_contingency(table)  # scipy; no correction beyond 2×2
    assert doc["chi2"] == pytest.approx(reference.statistic, rel=1e-12)
    assert doc["p_value"] == pytest.approx(reference.pvalue, rel=1e-12)
    assert doc["dof"] == reference.dof == 6
    assert doc["yates_correction"] is False
    assert doc["counts"]["matrix"] == table.tolist()
    assert doc["row_shares"][0] == pytest.approx([0.6, 0.24, 0.16])


def test_two_by_two_uses_yates_as_scipy_does() -> None:
    table = np.array([[12, 5], [3, 14]])
    doc = crosstab_statistics("a", "b", ["n", "y"], ["n", "y"], table)
    reference = chi2_contingency(table, correction=True)  # scipy's default for dof 1
    assert doc["chi2"] == pytest.approx(reference.statistic, rel=1e-12)
    assert doc["yates_correction"] is True


def test_adjusted_residuals_match_the_formula_cell_by_cell() -> None:
    # Direct computation of Agresti (2013, §2.4.5): (O - E) / sqrt(E (1 - r_i/n)(1 - c_j/n)).
    table = np.array([[21.0, 9, 4], [11, 30, 6], [2, 8, 19]])
    n = table.sum()
    residuals = adjusted_residuals(table)
    for i in range(3):
        for j in range(3):
            row, col = table[i].sum(), table[:, j].sum()
            expected = row * col / n
            direct = (table[i, j] - expected) / np.sqrt(expected * (1 - row / n) * (1 - col / n))
            assert residuals[i, j] == pytest.approx(direct, rel=1e-12)


def test_two_by_two_residuals_are_the_root_of_chi_square() -> None:
    # Reference arithmetic: in a 2×2 table every adjusted residual equals ±sqrt(X²) of the
    # uncorrected Pearson statistic (Agresti 2013, §2.4.5); X² from scipy.
    table = np.array([[40, 10], [20, 30]])
    chi2 = chi2_contingency(table, correction=False).statistic
    residuals = adjusted_residuals(table)
    assert np.abs(residuals) == pytest.approx(np.full((2, 2), np.sqrt(chi2)), rel=1e-12)
    assert residuals[0, 0] > 0 > residuals[0, 1]  # more (p, x) than independence expects


def test_cochran_rule() -> None:
    # Cochran (1954): at least 80 % of expected counts ≥ 5 and none below 1.
    assert cochran_ok(np.full((3, 3), 5.0))
    assert not cochran_ok(np.array([[10.0, 10, 10, 10, 0.9]]))  # one cell below 1
    assert cochran_ok(np.array([[10.0, 10, 10, 10, 4]]))  # 80 % at least 5
    assert not cochran_ok(np.array([[10.0, 10, 10, 4, 4]]))  # only 60 %
    assert cochran_ok(np.array([[10.0, 10, 10, 4, 4]]), low_share=0.4)  # a looser setting
    sparse = np.array([[30, 1], [40, 2]])
    doc = crosstab_statistics("a", "b", ["p", "q"], ["x", "y"], sparse)
    assert doc["cochran_ok"] is bool(cochran_ok(expected_freq(sparse)))  # scipy's expected
    assert doc["cochran_ok"] is False


def test_empty_labels_are_left_out_and_labels_sorted() -> None:
    table = np.array([[0, 0], [5, 7], [9, 2]])
    doc = crosstab_statistics("a", "b", ["z", "r", "m"], ["y", "x"], table)
    assert doc["counts"]["a_labels"] == ["m", "r"]
    assert doc["counts"]["b_labels"] == ["x", "y"]
    assert doc["counts"]["matrix"] == [[2, 9], [7, 5]]
    assert crosstab_statistics("a", "b", ["p"], ["x", "y"], np.array([[3, 4]])) is None
