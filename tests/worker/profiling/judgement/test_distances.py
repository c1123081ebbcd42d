"""Distances from stored summaries, checked by hand and against scipy."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy import stats
from scipy.spatial.distance import jensenshannon
from sklearn.datasets import load_iris

from worker.profiling.judgement.distances import (
    decile_psi,
    js_distance,
    ks_exact,
    ks_from_percentiles,
    ks_p_value,
    percentile_cdf,
    psi,
    values_from_percentiles,
)
from worker.profiling.judgement.tables import ContingencyTable, chi_square


def _percentiles(values: np.ndarray) -> list[float]:
    return np.percentile(values, np.arange(101)).tolist()


def test_psi_worked_example_by_hand() -> None:
    # Baseline: values spread evenly over 0..100, so its percentiles are 0, 1, ..., 100 and
    # its deciles cut at 10, 20, ..., 90: ten bins of 0.10 each.
    # Target: spread evenly over 0..200 (percentiles 0, 2, ..., 200), so F_t(x) = x / 200:
    #   bins (-inf,10], (10,20], ..., (80,90]: 10/200 = 0.05 each (nine bins)
    #   bin (90, inf): 1 - 90/200 = 0.55
    # PSI = Σ (a - e) ln(a / e)
    #     = 9 × (0.05 - 0.10) × ln(0.05 / 0.10) + (0.55 - 0.10) × ln(0.55 / 0.10)
    #     = 9 × (-0.05) × (-0.693147) + 0.45 × 1.704748
    #     = 0.311916 + 0.767137 = 1.079053
    value, edges, expected, actual = decile_psi(np.arange(101.0), np.arange(101.0) * 2)
    assert edges == [10, 20, 30, 40, 50, 60, 70, 80, 90]
    assert expected == pytest.approx([0.1] * 10)
    assert actual == pytest.approx([0.05] * 9 + [0.55])
    assert value == pytest.approx(1.079053, abs=1e-6)


def test_psi_of_an_empty_bin_uses_the_floor() -> None:
    # Expected shares 0.5 / 0.5, actual 1.0 / 0.0; the empty bin becomes 0.0001:
    # (1.0 - 0.5) ln(1.0 / 0.5) + (0.0001 - 0.5) ln(0.0001 / 0.5)
    # = 0.5 × 0.693147 + (-0.4999) × (-8.517193) = 0.346574 + 4.257745 = 4.604319
    assert psi([0.5, 0.5], [1.0, 0.0]) == pytest.approx(4.604319, abs=1e-6)


def test_psi_is_zero_for_the_same_distribution() -> None:
    rng = np.random.default_rng(7)
    sample = _percentiles(rng.normal(0, 1, 5000))
    assert decile_psi(sample, sample)[0] == pytest.approx(0.0, abs=1e-12)


def test_percentile_cdf_matches_the_empirical_function_of_a_large_sample() -> None:
    rng = np.random.default_rng(3)
    sample = rng.gamma(2.0, 3.0, 20_000)
    points = np.array([0.5, 2.0, 5.0, 9.0, 20.0])
    ecdf = np.searchsorted(np.sort(sample), points, side="right") / len(sample)
    # Reference: the sample's own empirical distribution function (numpy searchsorted).
    assert percentile_cdf(_percentiles(sample), points) == pytest.approx(ecdf, abs=0.01)


def test_percentile_cdf_jumps_at_a_value_many_rows_hold() -> None:
    values = np.array([0.0] * 30 + list(np.linspace(1, 10, 70)))  # 30 % zeros
    percentiles = _percentiles(values)
    assert percentile_cdf(percentiles, np.array([0.0]))[0] == pytest.approx(0.30, abs=0.011)
    assert percentile_cdf(percentiles, np.array([0.0]), left=True)[0] == 0.0


@pytest.mark.parametrize(
    ("shift", "scale", "n_a", "n_b"),
    [(0.0, 1.0, 3000, 2000), (0.3, 1.2, 5000, 4000), (1.0, 0.5, 2500, 3500)],
)
def test_ks_from_percentiles_against_scipy(shift: float, scale: float, n_a: int, n_b: int) -> None:
    rng = np.random.default_rng(11)
    a, b = rng.normal(0, 1, n_a), rng.normal(shift, scale, n_b)
    reference = stats.ks_2samp(a, b)  # scipy.stats.ks_2samp on the raw samples
    statistic = ks_from_percentiles(_percentiles(a), _percentiles(b))
    assert statistic == pytest.approx(reference.statistic, abs=0.015)
    assert ks_exact(a, b) == pytest.approx(reference.statistic, abs=1e-12)


def test_ks_on_iris_species_against_scipy() -> None:
    # Dataset: Fisher's iris as shipped in scikit-learn; sepal length of setosa vs versicolor.
    iris = load_iris()
    sepal = iris.data[:, 0]
    setosa, versicolor = sepal[iris.target == 0], sepal[iris.target == 1]
    reference = stats.ks_2samp(setosa, versicolor)  # scipy.stats.ks_2samp
    assert ks_exact(setosa, versicolor) == pytest.approx(reference.statistic, abs=1e-12)
    # With 50 rounded values per side the percentile summary is coarse: within 0.05.
    approx = ks_from_percentiles(_percentiles(setosa), _percentiles(versicolor))
    assert approx == pytest.approx(reference.statistic, abs=0.05)


def test_ks_p_value_against_scipy_asymptotic() -> None:
    rng = np.random.default_rng(5)
    a, b = rng.normal(0, 1, 800), rng.normal(0.15, 1, 900)
    reference = stats.ks_2samp(a, b, method="asymp")  # scipy's asymptotic two-sample p-value
    ours = ks_p_value(ks_exact(a, b), len(a), len(b))
    assert ours == pytest.approx(reference.pvalue, rel=1e-9)


@pytest.mark.parametrize(
    ("p", "q"),
    [
        ([0.5, 0.5], [0.9, 0.1]),
        ([0.2, 0.3, 0.5], [0.5, 0.3, 0.2]),
        ([1, 0, 0], [0, 0.5, 0.5]),
        ([10, 20, 30, 40], [40, 30, 20, 10]),  # counts, normalised first
    ],
)
def test_js_distance_against_scipy(p: list[float], q: list[float]) -> None:
    # Reference: scipy.spatial.distance.jensenshannon with base 2.
    assert js_distance(p, q) == pytest.approx(jensenshannon(p, q, base=2), abs=1e-12)


def test_js_distance_bounds() -> None:
    assert js_distance([1, 0], [0, 1]) == pytest.approx(1.0)  # disjoint: 1 in base 2
    assert js_distance([3, 1], [6, 2]) == pytest.approx(0.0, abs=1e-12)


@pytest.mark.parametrize(
    "table",
    [
        [[120, 80, 40], [100, 110, 30]],
        [[12, 5], [7, 19]],
        [[30, 0, 12], [25, 4, 10], [0, 0, 0]],  # an empty row is dropped
    ],
)
def test_chi_square_homogeneity_against_scipy(table: list[list[int]]) -> None:
    counts = np.array(table)
    counts = counts[counts.sum(axis=1) > 0][:, counts.sum(axis=0) > 0]
    # Reference: scipy.stats.chi2_contingency without Yates' continuity correction.
    reference = stats.chi2_contingency(counts, correction=False)
    ours = chi_square(np.array(table))
    assert ours.statistic == pytest.approx(reference.statistic, rel=1e-12)
    assert ours.dof == reference.dof
    assert ours.p_value == pytest.approx(reference.pvalue, rel=1e-9)


def test_adjusted_residuals_by_hand() -> None:
    # 2×2 table [[30, 10], [10, 30]]: n = 80, every row and column total 40, E = 20 per cell.
    # Adjusted residual = (O - E) / sqrt(E (1 - 40/80)(1 - 40/80)) = 10 / sqrt(5) = 4.472136.
    table = ContingencyTable(["x", "y"], ["u", "v"], np.array([[30.0, 10.0], [10.0, 30.0]]))
    residuals = table.adjusted_residuals()
    assert residuals[0, 0] == pytest.approx(10 / math.sqrt(5))
    assert residuals[0, 1] == pytest.approx(-10 / math.sqrt(5))
    # The expected counts match scipy.stats.contingency.expected_freq.
    assert table.expected == pytest.approx(stats.contingency.expected_freq(table.counts))
    assert table.cochran_ok()


def test_small_samples_are_read_back_from_their_percentiles() -> None:
    # Dataset: Fisher's iris in scikit-learn, 50 flowers per species: few enough that the
    # 101 percentiles fix every sorted value.
    iris = load_iris()
    for species in range(3):
        petal = np.sort(iris.data[iris.target == species, 2])
        back = values_from_percentiles(_percentiles(petal), len(petal))
        assert back is not None
        assert back == pytest.approx(petal, abs=1e-12)
    setosa, virginica = (np.sort(iris.data[iris.target == s, 2]) for s in (0, 2))
    assert ks_exact(
        values_from_percentiles(_percentiles(setosa), 50),
        values_from_percentiles(_percentiles(virginica), 50),
    ) == pytest.approx(stats.ks_2samp(setosa, virginica).statistic, abs=1e-12)  # scipy


def test_larger_or_mismatched_samples_are_not_read_back() -> None:
    rng = np.random.default_rng(8)
    sample = rng.normal(0, 1, 52)
    assert values_from_percentiles(_percentiles(sample), 52) is None  # more than 51 values
    small = rng.normal(0, 1, 30)
    assert values_from_percentiles(_percentiles(small), 31) is None  # the count does not fit
