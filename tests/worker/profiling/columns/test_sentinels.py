"""Disguised missing values planted in numeric columns (truth by construction)."""

import numpy as np

from worker.profiling.columns.numeric import NumericState
from worker.profiling.options import ProfileOptions


def _sentinels(values):
    state = NumericState(ProfileOptions())
    state.update(np.asarray(values, dtype=float))
    return state.finalize()[1]


def test_minus_999_in_a_positive_column():
    rng = np.random.default_rng(9)
    values = np.concatenate([rng.uniform(20, 80, 500), [-999.0] * 12])
    assert _sentinels(values) == [{"value": -999.0, "count": 12}]


def test_9999_far_above_the_bulk_and_999_inside_it_is_not_flagged():
    rng = np.random.default_rng(10)
    values = np.concatenate([rng.uniform(100, 5_000, 500), [999.0] * 3, [9999.0] * 4])
    assert _sentinels(values) == [{"value": 9999.0, "count": 4}]


def test_spike_of_zeros_apart_from_the_bulk():
    rng = np.random.default_rng(11)
    values = np.concatenate([rng.normal(50_000, 8_000, 900), np.zeros(100)])
    assert _sentinels(values) == [{"value": 0.0, "count": 100}]


def test_zeros_of_a_count_column_are_not_a_spike():
    values = np.random.default_rng(12).poisson(1.5, size=1_000).astype(float)
    assert _sentinels(values) == []


def test_an_ordinary_value_in_a_long_tail_is_not_a_code():
    # Truth by construction: a lognormal tail passes through 999 with no spike there.
    rng = np.random.default_rng(13)
    values = np.round(rng.lognormal(5.0, 1.0, 50_000), 2)
    values[:2] = 999.0
    assert _sentinels(values) == []


def test_a_frequent_code_outside_the_list_such_as_minus_one():
    # Truth by construction: ages 18..90 with -1 written for "unknown".
    rng = np.random.default_rng(14)
    values = np.concatenate([rng.integers(18, 91, 800), [-1] * 40]).astype(float)
    assert _sentinels(values) == [{"value": -1.0, "count": 40}]


def test_the_mode_of_a_smooth_column_is_not_a_code():
    values = np.random.default_rng(15).binomial(60, 0.5, size=5_000).astype(float)
    assert _sentinels(values) == []
