"""Pearson from streamed co-moments, checked against published values and scipy/pandas."""

from __future__ import annotations

import itertools

import numpy as np
import pandas as pd
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.stats import pearsonr
from sklearn.datasets import load_iris
from vega_datasets import local_data

from worker.profiling.relations.comoments import CoMoments


def streamed(frame: pd.DataFrame, batch_rows: int) -> CoMoments:
    state = CoMoments(list(frame.columns))
    for start in range(0, len(frame), batch_rows):
        part = frame.iloc[start : start + batch_rows]
        state.update({name: part[name].to_numpy(dtype=np.float64) for name in frame.columns})
    return state


@pytest.mark.parametrize("series", ["I", "II", "III", "IV"])
def test_anscombe_quartet_shares_r(series: str) -> None:
    # Source: Anscombe (1973), "Graphs in statistical analysis", The American
    # Statistician 27(1): r = 0.816 for each of the four sets; data from vega_datasets.
    data = local_data.anscombe()
    part = data[data["Series"] == series][["X", "Y"]].astype(float)
    r = streamed(part, 4).pair("X", "Y").r
    assert r == pytest.approx(0.82, abs=5e-3)
    assert r == pytest.approx(0.816, abs=1e-3)
    # Reference library: scipy.stats.pearsonr on the same data.
    assert r == pytest.approx(pearsonr(part["X"], part["Y"]).statistic, rel=1e-12)


def _uci_iris() -> tuple[np.ndarray, np.ndarray]:
    """scikit-learn's iris with the two rows UCI's copy holds differently (UCI iris.names
    notes that its 35th and 38th samples differ from Fisher's paper)."""
    features, target = load_iris(return_X_y=True)
    features = features.copy()
    features[34] = [4.9, 3.1, 1.5, 0.1]
    features[37] = [4.9, 3.1, 1.5, 0.1]
    return features, target.astype(np.float64)


@pytest.mark.parametrize(
    ("column", "published"),
    [(0, 0.7826), (1, -0.4194), (2, 0.9490), (3, 0.9565)],
)
def test_iris_class_correlation(column: int, published: float) -> None:
    # Source: the summary table of UCI iris.names ("class correlation" of sepal length,
    # sepal width, petal length, petal width; values recalled from memory), which is the
    # Pearson r of each feature with the class code 0/1/2, on UCI's copy of the data.
    features, target = _uci_iris()
    frame = pd.DataFrame({"feature": features[:, column], "class": target})
    assert streamed(frame, 37).pair("feature", "class").r == pytest.approx(published, abs=5e-5)


def test_large_offset_does_not_cancel() -> None:
    # Source: NIST StRD NumAcc4 design (values 10000000.2 / .1 / .3, recalled from memory):
    # a large offset with small spread defeats naive sums of squares. Reference:
    # scipy.stats.pearsonr, which centres the data first.
    rng = np.random.default_rng(4)
    a = 1e9 + rng.integers(0, 3, 5000) / 10
    b = 1e9 + a % 1 * 3 + rng.integers(0, 2, 5000) / 10
    frame = pd.DataFrame({"a": a, "b": b})
    r = streamed(frame, 333).pair("a", "b").r
    assert r == pytest.approx(pearsonr(a, b).statistic, rel=1e-6)


def test_pairwise_complete_rows_match_pandas() -> None:
    rng = np.random.default_rng(7)
    frame = pd.DataFrame(rng.normal(size=(2000, 4)), columns=list("abcd"))
    frame["b"] += frame["a"]
    for name, share in zip("abcd", (0.1, 0.3, 0.0, 0.5), strict=True):
        frame.loc[rng.random(2000) < share, name] = np.nan
    state = streamed(frame, 128)
    expected = frame.corr(method="pearson")  # reference: pandas, pairwise-complete rows
    for a, b, moments in state.pairs():
        assert moments.r == pytest.approx(expected.loc[a, b], rel=1e-10)
        assert moments.n == int((frame[a].notna() & frame[b].notna()).sum())


def test_slope_and_intercept_are_least_squares() -> None:
    rng = np.random.default_rng(2)
    a = rng.normal(10, 3, 500)
    b = 2.5 * a - 4 + rng.normal(0, 1, 500)
    moments = streamed(pd.DataFrame({"a": a, "b": b}), 64).pair("a", "b")
    slope, intercept = np.polyfit(a, b, 1)  # reference: numpy least squares
    assert moments.slope == pytest.approx(slope, rel=1e-10)
    assert moments.intercept == pytest.approx(intercept, rel=1e-10)


def test_constant_column_has_no_r() -> None:
    frame = pd.DataFrame({"a": [1.0, 1.0, 1.0], "b": [1.0, 2.0, 3.0]})
    assert streamed(frame, 2).pair("a", "b").r is None


finite = st.floats(-1e6, 1e6, allow_nan=False)
cell = st.one_of(finite, st.just(float("nan")))


@settings(max_examples=60, deadline=None)
@given(
    rows=st.lists(st.tuples(cell, cell, cell), min_size=1, max_size=80),
    cuts=st.lists(st.integers(0, 80), max_size=4),
)
def test_chunks_merged_equal_one_pass(rows, cuts) -> None:
    frame = pd.DataFrame(rows, columns=list("xyz"), dtype=np.float64)
    one = streamed(frame, len(frame))
    bounds = sorted({0, len(frame), *(c for c in cuts if c <= len(frame))})
    merged = CoMoments(list("xyz"))
    for lo, hi in itertools.pairwise(bounds):
        merged = merged.merge(streamed(frame.iloc[lo:hi], max(hi - lo, 1)))
    assert np.array_equal(one.n, merged.n)
    scale = float(np.nanmax(np.abs(frame.to_numpy()), initial=1.0))
    n = len(frame)
    np.testing.assert_allclose(merged.mean, one.mean, rtol=1e-9, atol=1e-9 * scale)
    np.testing.assert_allclose(merged.m2, one.m2, rtol=1e-9, atol=1e-9 * scale**2 * n)
    np.testing.assert_allclose(merged.c, one.c, rtol=1e-9, atol=1e-9 * scale**2 * n)
