"""Moments against NIST StRD certified values, scipy and pandas, and merged in chunks."""

import numpy as np
import pandas as pd
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy import stats

from worker.profiling.columns.moments import MomentsState


def _numacc(first: float, low: float, high: float) -> np.ndarray:
    # NIST StRD univariate NumAcc2-4 as recalled from memory of the NIST pages: 1001
    # values, the first value, then 1000 values alternating low/high. Certified mean is
    # the first value and certified sd 0.1; both also follow from the construction
    # (deviations of ±0.1 on 1000 values and 0 on one: variance 1000·0.01/1000).
    return np.array([first] + [low, high] * 500)


NUMACC = {
    # NumAcc1 (recalled from memory): 10000001, 10000003, 10000002; mean 10000002, sd 1.
    "NumAcc1": (np.array([10000001.0, 10000003.0, 10000002.0]), 10000002.0, 1.0),
    "NumAcc2": (_numacc(1.2, 1.1, 1.3), 1.2, 0.1),
    "NumAcc3": (_numacc(1000000.2, 1000000.1, 1000000.3), 1000000.2, 0.1),
    "NumAcc4": (_numacc(10000000.2, 10000000.1, 10000000.3), 10000000.2, 0.1),
}


@pytest.mark.parametrize("name", sorted(NUMACC))
def test_nist_numacc_certified_mean_and_sd(name):
    values, mean, sd = NUMACC[name]
    state = MomentsState()
    for chunk in np.array_split(values, 7):
        state.update(chunk)
    result = state.finalize()
    # NIST StRD certified values (recalled from memory; rebuilt data above).
    assert result["mean"] == pytest.approx(mean, rel=1e-14)
    assert result["std"] == pytest.approx(sd, rel=1e-7)


def test_numacc4_defeats_the_naive_sum_of_squares():
    # The reason NIST publishes NumAcc4: the textbook one-pass formula loses the digits.
    values, _mean, sd = NUMACC["NumAcc4"]
    n = values.size
    naive_variance = (np.sum(values**2) - np.sum(values) ** 2 / n) / (n - 1)
    ours = MomentsState.of(values).finalize()["variance"]
    assert abs(ours - sd**2) < 1e-8
    assert abs(naive_variance - sd**2) > 1e-3


def test_shape_statistics_match_scipy_and_pandas():
    rng = np.random.default_rng(7)
    values = rng.gamma(2.0, 3.0, size=5_000)
    state = MomentsState()
    for chunk in np.array_split(values, 13):
        state.update(chunk)
    result = state.finalize()
    # scipy.stats.skew / kurtosis with bias=False, and pandas skew / kurt.
    assert result["skewness"] == pytest.approx(stats.skew(values, bias=False), rel=1e-9)
    assert result["kurtosis"] == pytest.approx(stats.kurtosis(values, bias=False), rel=1e-9)
    assert result["skewness"] == pytest.approx(pd.Series(values).skew(), rel=1e-9)
    assert result["kurtosis"] == pytest.approx(pd.Series(values).kurt(), rel=1e-9)
    # numpy: sample variance (ddof=1).
    assert result["variance"] == pytest.approx(np.var(values, ddof=1), rel=1e-12)


finite = st.floats(min_value=-1e6, max_value=1e6, allow_nan=False, allow_infinity=False)


@settings(max_examples=60, deadline=None)
@given(st.lists(finite, min_size=4, max_size=300), st.integers(min_value=1, max_value=6))
def test_merged_chunks_equal_one_pass(values, k):
    data = np.array(values)
    one = MomentsState.of(data).finalize()
    states = [MomentsState.of(chunk) for chunk in np.array_split(data, k)]
    merged = states[0]
    for state in states[1:]:
        merged = merged.merge(state)
    result = merged.finalize()
    assert merged.n == data.size
    assert result["min"] == one["min"] and result["max"] == one["max"]
    scale = max(1.0, float(np.abs(data).max()))
    assert result["mean"] == pytest.approx(one["mean"], rel=1e-9, abs=1e-9 * scale)
    spread = float(np.var(data)) * data.size
    if spread > 1e-6 * scale * scale:  # away from round-off of a constant column
        assert result["variance"] == pytest.approx(one["variance"], rel=1e-9)
        assert result["skewness"] == pytest.approx(one["skewness"], rel=1e-6, abs=1e-6)
        assert result["kurtosis"] == pytest.approx(one["kurtosis"], rel=1e-6, abs=1e-6)
