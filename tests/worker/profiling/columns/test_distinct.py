"""Distinct counts: exact below the bound, HyperLogLog within its stated error above it."""

import numpy as np
import pyarrow as pa

from worker.profiling.columns.distinct import DistinctState, hash_values


def test_exact_distinct_text_and_numbers():
    state = DistinctState(exact_bound=100)
    state.update(pa.array(["a", "b", None, "a"]))
    state.update(pa.array(["c", "b"]))
    assert state.finalize() == {"distinct": 3, "distinct_exact": True}
    numbers = DistinctState(exact_bound=100)
    numbers.update(np.array([0.0, -0.0, 1.5, np.nan]))
    assert numbers.finalize()["distinct"] == 2  # -0.0 and 0.0 are one number


def test_hyperloglog_within_three_standard_errors():
    # Truth by construction: 300,000 distinct strings, each twice, in 6 batches, merged.
    values = np.arange(300_000).astype(str)
    parts = []
    for chunk in np.array_split(np.concatenate([values, values[::-1]]), 6):
        state = DistinctState(exact_bound=1_000, precision=14)
        state.update(pa.array(chunk))
        parts.append(state)
    merged = parts[0]
    for part in parts[1:]:
        merged = merged.merge(part)
    result = merged.finalize()
    assert result["distinct_exact"] is False
    # Flajolet et al. (2007): relative standard error 1.04 / sqrt(m).
    assert abs(result["distinct"] - 300_000) / 300_000 <= 3 * result["distinct_relative_error"]


def test_small_range_uses_linear_counting():
    state = DistinctState(exact_bound=10, precision=14)
    state.update(pa.array([str(i) for i in range(500)]))
    assert not state.exact
    assert abs(state.estimate() - 500) <= 10


def test_hashes_are_stable_and_zero_signs_agree():
    # polars' hash with a fixed seed: the same text gives the same 64-bit hash.
    first = hash_values(pa.array(["crate", "crate", "berth"]))
    assert first[0] == first[1] != first[2]
    zeros = hash_values(np.array([0.0, -0.0]))
    assert zeros[0] == zeros[1]


def test_hyperloglog_of_numbers_within_three_standard_errors():
    # Truth by construction: whole numbers 0..249,999 (regular bit patterns, the hard
    # case for a weak hash) and as many fractions, each seen twice, in batches.
    values = np.concatenate([np.arange(250_000.0), np.arange(250_000.0) / 7.0 + 0.5])
    state = DistinctState(exact_bound=1_000, precision=14)
    for chunk in np.array_split(np.concatenate([values, values[::-1]]), 9):
        state.update(chunk)
    result = state.finalize()
    assert result["distinct_exact"] is False
    truth = len(np.unique(values))
    # Flajolet et al. (2007): relative standard error 1.04 / sqrt(m).
    assert abs(result["distinct"] - truth) / truth <= 3 * result["distinct_relative_error"]


def test_numbers_hash_the_same_before_and_after_the_bound():
    # The exact values turned into the sketch and later batches hashed directly agree:
    # a number seen before and after the switch is counted once.
    state = DistinctState(exact_bound=50, precision=14)
    state.update(np.arange(40.0))
    state.update(np.arange(40.0, 100.0))  # passes the bound: the kept values are hashed
    state.update(np.arange(100.0))  # all seen before
    assert not state.exact
    assert abs(state.estimate() - 100) <= 3
