"""HyperLogLog: estimates within the stated error, merges equal to one pass."""

from __future__ import annotations

import numpy as np
import polars as pl
import pytest

from worker.profiling.hyperloglog import HyperLogLog


@pytest.mark.parametrize("precision", [14, 16])
def test_estimates_stay_within_four_standard_errors(precision: int) -> None:
    rng = np.random.default_rng(9)
    for count in (100, 5_000, 300_000, 2_000_000):
        sketch = HyperLogLog(precision)
        sketch.update(rng.integers(0, 2**64 - 1, count, dtype=np.uint64, endpoint=True))
        assert sketch.estimate() == pytest.approx(count, rel=4 * sketch.relative_error)


def test_repeated_hashes_count_once_against_numpy_unique() -> None:
    # Reference: numpy.unique gives the exact number of distinct values.
    rng = np.random.default_rng(3)
    values = rng.integers(0, 400_000, 1_500_000)
    truth = len(np.unique(values))
    sketch = HyperLogLog(16)
    sketch.update(pl.Series(values).hash(seed=11).to_numpy())
    assert sketch.estimate() == pytest.approx(truth, rel=4 * sketch.relative_error)


def test_merged_sketches_equal_one_sketch_of_both_streams() -> None:
    rng = np.random.default_rng(5)
    first, second = (rng.integers(0, 2**64 - 1, 50_000, dtype=np.uint64) for _ in range(2))
    whole, left, right = HyperLogLog(), HyperLogLog(), HyperLogLog()
    whole.update(np.concatenate([first, second]))
    left.update(first)
    right.update(second)
    left.merge(right)
    assert np.array_equal(left.registers, whole.registers)


def test_zero_and_empty_batches_are_harmless() -> None:
    sketch = HyperLogLog(14)
    sketch.update(np.empty(0, dtype=np.uint64))
    assert sketch.estimate() == 0
    sketch.update(np.zeros(3, dtype=np.uint64))  # all bits zero: the rank is capped
    assert sketch.registers.max() == 64 - 14 + 1
    assert sketch.estimate() == pytest.approx(1, abs=0.01)
