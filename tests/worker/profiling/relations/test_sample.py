"""The bottom-k row sample: exact while the table fits, uniform, and mergeable."""

from __future__ import annotations

import itertools

import numpy as np
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.stats import kstest

from worker.profiling.relations.sample import RowSample, row_keys


def sampled(rows: int, k: int, batch_rows: int, start: int = 0) -> RowSample:
    sample = RowSample(["x"], k)
    for lo in range(start, start + rows, batch_rows):
        hi = min(lo + batch_rows, start + rows)
        sample.update({"x": np.arange(lo, hi, dtype=np.float64)}, lo)
    return sample


def test_small_table_is_kept_whole() -> None:
    sample = sampled(500, 1000, 64)
    assert sample.exact
    assert np.array_equal(sample.rows, np.arange(500))
    assert np.array_equal(sample.column("x"), np.arange(500, dtype=np.float64))


def test_large_table_keeps_k_rows_spread_uniformly() -> None:
    sample = sampled(200_000, 2000, 4096)
    assert not sample.exact
    assert len(sample.rows) == 2000
    assert np.array_equal(sample.column("x"), sample.rows.astype(np.float64))
    # Reference: scipy.stats.kstest against the uniform distribution over the row numbers;
    # the keys are a fixed hash of the row number, so this outcome is deterministic.
    assert kstest(sample.rows / 200_000, "uniform").pvalue > 0.01


def test_keys_are_distinct() -> None:
    # splitmix64's finaliser is a bijection on 64-bit integers (Steele 2014), so two rows
    # never tie for a place in the sample.
    keys = row_keys(0, 1_000_000)
    assert len(np.unique(keys)) == len(keys)


@settings(max_examples=40, deadline=None)
@given(
    rows=st.integers(1, 3000),
    k=st.integers(1, 400),
    cuts=st.lists(st.integers(0, 3000), max_size=4),
)
def test_merged_chunks_keep_the_same_rows_as_one_pass(rows, k, cuts) -> None:
    one = sampled(rows, k, 97)
    bounds = sorted({0, rows, *(c for c in cuts if c < rows)})
    merged = RowSample(["x"], k)
    for lo, hi in itertools.pairwise(bounds):
        merged = merged.merge(sampled(hi - lo, k, 53, start=lo))
    assert merged.rows_seen == rows
    assert np.array_equal(merged.rows, one.rows)
    assert np.array_equal(merged.column("x"), one.column("x"))
