"""Quantiles against numpy (type 7) when exact, within the stated rank error above the bound."""

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from worker.profiling.columns.quantiles import QuantileState

PROBABILITIES = np.linspace(0, 1, 101)


def test_exact_quantiles_are_numpy_type_7():
    values = np.random.default_rng(1).normal(size=2_001)
    state = QuantileState(exact_bound=10_000)
    for chunk in np.array_split(values, 5):
        state.update(chunk)
    assert state.exact
    # numpy.quantile, method "linear" = Hyndman & Fan type 7.
    np.testing.assert_allclose(
        state.quantiles(PROBABILITIES), np.quantile(values, PROBABILITIES, method="linear")
    )


def _rank_of(sorted_values: np.ndarray, value: float) -> float:
    return np.searchsorted(sorted_values, value, side="right") / sorted_values.size


def test_sketch_quantiles_within_stated_rank_error():
    values = np.random.default_rng(2).lognormal(size=200_000)
    state = QuantileState(exact_bound=1_000, sample_size=20_000)
    for chunk in np.array_split(values, 20):
        state.update(chunk)
    assert not state.exact
    error = state.rank_error
    # DKW with Massart's constant, 99 %: sqrt(ln(200) / 40,000) (Massart 1990).
    assert error == pytest.approx(np.sqrt(np.log(200) / 40_000))
    ordered = np.sort(values)
    # Each estimate's true rank (from numpy's sort) is within the sketch's stated error.
    for p, estimate in zip(PROBABILITIES[1:-1], state.quantiles(PROBABILITIES[1:-1]), strict=True):
        assert abs(_rank_of(ordered, estimate) - p) <= error


# derandomize: the DKW bound holds with 99 % probability, so a fixed set of examples.
@settings(max_examples=30, deadline=None, derandomize=True)
@given(
    st.lists(st.floats(-1e3, 1e3, allow_nan=False), min_size=50, max_size=2_000),
    st.integers(2, 5),
    st.integers(5, 200),
)
def test_merged_states_keep_quantiles_within_rank_error(values, k, bound):
    data = np.array(values)
    states = []
    for chunk in np.array_split(data, k):
        state = QuantileState(exact_bound=bound, sample_size=100)
        state.update(chunk)
        states.append(state)
    merged = states[0]
    for state in states[1:]:
        merged = merged.merge(state)
    assert merged.n == data.size
    estimates = merged.quantiles([0.1, 0.5, 0.9])
    if merged.exact:
        np.testing.assert_allclose(estimates, np.quantile(data, [0.1, 0.5, 0.9]))
        return
    ordered = np.sort(data)
    error = merged.rank_error
    for p, estimate in zip([0.1, 0.5, 0.9], estimates, strict=True):
        low = np.searchsorted(ordered, estimate, side="left") / data.size
        high = np.searchsorted(ordered, estimate, side="right") / data.size
        assert low - error - 1 / data.size <= p <= high + error + 1 / data.size


def test_count_below_exact():
    state = QuantileState(exact_bound=100)
    state.update(np.array([1.0, 2.0, 2.0, 3.0]))
    assert state.count_below([2.0], inclusive=False).tolist() == [1]
    assert state.count_below([2.0], inclusive=True).tolist() == [3]
    with pytest.raises(ValueError):
        big = QuantileState(exact_bound=1)
        big.update(np.array([1.0, 2.0]))
        big.sorted_values()


def test_sample_counts_below_estimate_the_true_counts():
    values = np.random.default_rng(3).exponential(size=300_000)
    state = QuantileState(exact_bound=10_000, sample_size=50_000)
    for chunk in np.array_split(values, 30):
        state.update(chunk)
    points = np.quantile(values, [0.05, 0.5, 0.95])  # numpy, type 7
    estimated = state.count_below(points, inclusive=True)
    true = np.searchsorted(np.sort(values), points, side="right")
    assert np.all(np.abs(estimated - true) <= state.rank_error * values.size)
    assert state.n == values.size


def test_a_merged_sample_is_uniform_over_both_parts():
    # Two parts of very different values: the merged sample takes from each by its size.
    first = QuantileState(exact_bound=100, sample_size=4_000)
    second = QuantileState(exact_bound=100, sample_size=4_000, seed=7)
    first.update(np.zeros(30_000))
    second.update(np.ones(10_000))
    merged = first.merge(second)
    assert merged.n == 40_000
    share_of_ones = merged.sorted_sample().mean()
    # Binomial(4,000, 1/4) share: standard error 0.0068, so 5 of them is far out.
    assert share_of_ones == pytest.approx(0.25, abs=0.035)
