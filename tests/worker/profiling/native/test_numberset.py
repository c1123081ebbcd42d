"""The compiled set of distinct numbers against numpy.unique."""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from hypothesis.extra import numpy as hnp

from worker.profiling.native import NumberSet, _kernels


def reference(*batches: np.ndarray) -> np.ndarray:
    """numpy.unique of the non-NaN values, with -0.0 read as 0.0."""
    joined = np.concatenate(batches) + 0.0
    return np.unique(joined[~np.isnan(joined)])


@settings(max_examples=60, deadline=None)
@given(
    st.lists(
        hnp.arrays(np.float64, st.integers(0, 400), elements=st.floats(allow_infinity=True)),
        min_size=1,
        max_size=6,
    )
)
def test_distinct_values_match_numpy(batches) -> None:
    found = NumberSet(slots=2)  # tiny, so every example grows the table
    for batch in batches:
        found.add(batch)
    expected = reference(*batches)
    assert found.count == expected.size
    assert np.array_equal(np.sort(found.values()), expected)


def test_repeats_gaps_and_signed_zero_over_growth() -> None:
    rng = np.random.default_rng(7)
    # Planted: 300 whole readings repeated over 200,000 cells, gaps, both zeros.
    x = rng.integers(0, 300, 200_000).astype(np.float64)
    x[rng.random(x.size) < 0.1] = np.nan
    x[:2] = [-0.0, 0.0]
    numbers = NumberSet()
    for start in range(0, x.size, 53_000):
        numbers.add(x[start : start + 53_000])
    assert numbers.count == 300 == reference(x).size
    many = rng.normal(size=150_000)  # distinct with probability one
    numbers.add(many)
    assert numbers.count == 150_300
    assert np.array_equal(np.sort(numbers.values()), reference(x, many))


def test_refuses_a_table_it_cannot_use() -> None:
    values = np.ones(3)
    with pytest.raises(ValueError, match="power of two"):
        _kernels.number_set_add(np.zeros(3, dtype=np.uint64), 0, values)
    with pytest.raises(ValueError, match="half filled"):
        _kernels.number_set_add(np.zeros(4, dtype=np.uint64), 3, values)
    with pytest.raises(ValueError, match="contiguous"):
        _kernels.number_set_add(np.zeros(4, dtype=np.uint64)[::2], 0, values)
