"""The numeric section against numpy, scipy, the UCI iris table and Anscombe (1973)."""

import numpy as np
import pytest
from scipy import stats
from sklearn.datasets import load_iris
from vega_datasets import data as vega

from worker.profiling.columns.numeric import NumericState
from worker.profiling.options import ProfileOptions


def _numeric(values, options=None, chunks=4):
    state = NumericState(options or ProfileOptions())
    for chunk in np.array_split(np.asarray(values, dtype=float), chunks):
        state.update(chunk)
    return state.finalize()


def test_histogram_uses_numpy_freedman_diaconis_edges():
    values = np.random.default_rng(3).normal(10, 2, size=3_000)
    numeric, _ = _numeric(values)
    # numpy.histogram_bin_edges(values, "fd") and numpy.histogram.
    edges = np.histogram_bin_edges(values, bins="fd")
    np.testing.assert_allclose(numeric["histogram"]["edges"], edges)
    assert numeric["histogram"]["counts"] == np.histogram(values, bins=edges)[0].tolist()


def test_density_matches_scipy_gaussian_kde_with_scott_rule():
    values = np.random.default_rng(4).normal(size=800)
    numeric, _ = _numeric(values)
    density = numeric["density"]
    # scipy.stats.gaussian_kde, bw_method="scott".
    expected = stats.gaussian_kde(values, bw_method="scott")(np.array(density["x"]))
    np.testing.assert_allclose(density["y"], expected, rtol=1e-10)


def test_quartiles_mad_and_percentiles_match_numpy():
    values = np.random.default_rng(5).exponential(size=1_001)
    numeric, _ = _numeric(values)
    # numpy.quantile (type 7) and numpy.median for the median absolute deviation.
    q1, median, q3 = np.quantile(values, [0.25, 0.5, 0.75])
    assert (numeric["q1"], numeric["median"], numeric["q3"]) == pytest.approx((q1, median, q3))
    assert numeric["mad"] == pytest.approx(np.median(np.abs(values - median)))
    np.testing.assert_allclose(numeric["percentiles"], np.quantile(values, np.linspace(0, 1, 101)))


def test_planted_outliers_are_counted_by_tukey_and_modified_z():
    # Truth by construction: 0..99 plus planted values far above and below.
    values = np.concatenate([np.arange(100.0), [-500.0, 400.0, 1000.0]])
    numeric, _ = _numeric(values)
    q1, q3 = np.quantile(values, [0.25, 0.75])
    iqr = q3 - q1
    outliers = numeric["outliers"]
    assert outliers["tukey_low"] == 1 and outliers["tukey_high"] == 2
    assert outliers["tukey_far"] == int(np.sum((values < q1 - 3 * iqr) | (values > q3 + 3 * iqr)))
    median = np.median(values)
    mad = np.median(np.abs(values - median))
    # Iglewicz & Hoaglin (1993): |0.6745 (x - median) / MAD| > 3.5.
    assert outliers["modified_z"] == int(np.sum(np.abs(0.6745 * (values - median) / mad) > 3.5))
    assert outliers["examples"] == [-500.0, 400.0, 1000.0]
    box = numeric["box"]
    # Whiskers: the most extreme values inside the 1.5 × IQR fences (Tukey 1977).
    assert (box["whisker_low"], box["whisker_high"]) == (0.0, 99.0)


def test_iris_matches_the_uci_summary_table():
    iris = load_iris()
    # UCI iris.names "Summary Statistics" (min, max, mean, SD), recalled from memory.
    table = {
        0: (4.3, 7.9, 5.84, 0.83),
        1: (2.0, 4.4, 3.05, 0.43),
        2: (1.0, 6.9, 3.76, 1.76),
        3: (0.1, 2.5, 1.20, 0.76),
    }
    for feature, (low, high, mean, sd) in table.items():
        numeric, _ = _numeric(iris.data[:, feature])
        assert numeric["min"] == pytest.approx(low)
        assert numeric["max"] == pytest.approx(high)
        assert numeric["mean"] == pytest.approx(mean, abs=0.01)
        assert numeric["std"] == pytest.approx(sd, abs=0.01)


def test_anscombe_quartet_shares_means_and_variances():
    quartet = vega.anscombe()
    for _name, group in quartet.groupby("Series"):
        x, _ = _numeric(group["X"].to_numpy(), chunks=3)
        y, _ = _numeric(group["Y"].to_numpy(), chunks=3)
        # Anscombe (1973), The American Statistician 27: mean x 9, variance x 11,
        # mean y 7.50, variance y 4.12 (the published two-decimal figures; vega_datasets'
        # copy of the sets gives 4.123 to 4.133, hence the tolerance).
        assert x["mean"] == pytest.approx(9.0)
        assert x["variance"] == pytest.approx(11.0)
        assert y["mean"] == pytest.approx(7.50, abs=0.005)
        assert y["variance"] == pytest.approx(4.12, abs=0.015)
        # pandas on the same numbers.
        assert y["variance"] == pytest.approx(group["Y"].var(), rel=1e-12)


def test_above_the_bound_quantiles_within_rank_error_and_counts_estimated():
    values = np.random.default_rng(6).normal(size=60_000)
    options = ProfileOptions(exact_bound=5_000, sample_size=5_000)
    numeric, _ = _numeric(values, options, chunks=12)
    assert numeric["exact"] is False
    error = numeric["rank_error"]
    ordered = np.sort(values)
    for p, estimate in zip(np.linspace(0.01, 0.99, 99), numeric["percentiles"][1:-1], strict=True):
        assert abs(np.searchsorted(ordered, estimate) / ordered.size - p) <= error
    # Exact figures stay exact: min, max and moments (numpy).
    assert numeric["min"] == values.min() and numeric["max"] == values.max()
    assert numeric["std"] == pytest.approx(values.std(ddof=1), rel=1e-12)
    assert sum(numeric["histogram"]["counts"]) == values.size
    true_high = int(np.sum(values > numeric["outliers"]["fences"]["high"]))
    assert abs(numeric["outliers"]["tukey_high"] - true_high) <= error * values.size + 1
