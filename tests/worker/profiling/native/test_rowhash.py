"""Row hashes of the compiled pass: equal rows agree, rows that differ do not."""

from __future__ import annotations

import datetime as dt

import numpy as np
import pandas as pd
import pyarrow as pa
import pytest

from worker.profiling.native import (
    _kernels,
    partition_by_top_bits,
    row_hashes,
    row_keys,
    sample_below,
)

SEED = 0x7D3A


def hashes(columns: dict[str, pa.Array]) -> np.ndarray:
    return row_hashes(pa.record_batch(columns), SEED)


def test_equal_rows_hash_alike_and_distinct_rows_do_not() -> None:
    # Planted: 200,000 distinct rows, then 5,000 of them again (truth by construction).
    rng = np.random.default_rng(5)
    ids = rng.permutation(200_000)
    again = rng.choice(200_000, 5_000, replace=False)
    rows = np.concatenate([ids, ids[again]])
    batch = {
        "id": pa.array([f"C-{v:07d}" for v in rows]),
        "berth": pa.array([("north", "south", "east")[v % 3] for v in rows]),
    }
    found = hashes(batch)
    assert len(np.unique(found)) == 200_000
    first = {int(v): i for i, v in enumerate(rows[:200_000])}
    twins = np.array([first[int(v)] for v in rows[200_000:]])
    assert (found[200_000:] == found[twins]).all()


def test_cells_are_told_apart_by_text_length_null_and_column() -> None:
    found = hashes(
        {
            "a": pa.array(["1", "1.0", None, "", "1", "x", "", "ab"]),
            "b": pa.array(["x", "x", "x", "x", "x", "1", "ab", ""]),
        }
    )
    assert found[0] == found[4]  # the same row twice
    assert len(set(found.tolist())) == 7  # "1" vs "1.0", null vs "", swapped cells, split text


def test_long_cells_and_their_tails_count() -> None:
    base = "harbour manifest line " * 3  # longer than one 8-byte word, with a tail
    texts = [base, base + "x", base[:-1], base.replace("line", "lime"), base]
    found = hashes({"note": pa.array(texts)})
    assert found[0] == found[4]
    assert len(set(found.tolist())) == 4


def test_a_slice_hashes_like_the_same_rows_read_on_their_own() -> None:
    # Batches are often slices of a larger array (offset into offsets and validity).
    values = ["kelp", None, "gull", "tern", None, "kelp", "skua", "gull"] * 50
    numbers = pa.array([1.5, None, 2.0, 3.25] * 100)
    whole = pa.record_batch({"t": pa.array(values), "n": numbers})
    sliced = whole.slice(13, 200)
    fresh = pa.record_batch(
        {"t": pa.array(values[13:213]), "n": pa.array(numbers.to_pylist()[13:213])}
    )
    assert (row_hashes(sliced, SEED) == row_hashes(fresh, SEED)).all()


def test_text_layouts_agree_and_typed_columns_are_hashed_by_value() -> None:
    texts = ["a", "bb", None, "a"]
    small = hashes({"t": pa.array(texts, pa.string())})
    large = hashes({"t": pa.array(texts, pa.large_string())})
    assert (small == large).all()
    typed = hashes(
        {
            "i": pa.array([1, 2, None, 1], pa.int64()),
            "f": pa.array([0.5, 0.5, None, 0.5]),
            "d": pa.array([dt.date(2026, 3, 1), None, None, dt.date(2026, 3, 1)]),
            "flag": pa.array([True, False, None, True]),
            "label": pa.array(["x", "y", None, "x"]).dictionary_encode(),
        }
    )
    assert typed[0] == typed[3]
    assert len(set(typed.tolist())) == 3


def test_duplicate_count_matches_pandas_on_typed_and_text_columns() -> None:
    # Reference: pandas DataFrame.duplicated() over the same rows.
    rng = np.random.default_rng(9)
    frame = pd.DataFrame(
        {
            "pieces": rng.integers(0, 6, 4000),
            "weight": rng.choice([1.5, 2.25, np.nan], 4000),
            "berth": rng.choice(["north", "south", None], 4000),
        }
    )
    table = pa.Table.from_pandas(frame, preserve_index=False).combine_chunks()
    found = row_hashes(table.to_batches()[0], SEED)
    repeated = len(found) - len(np.unique(found))
    assert repeated == int(frame.duplicated().sum())


def test_bad_buffers_raise_instead_of_reading_outside_them() -> None:
    out = np.zeros(4, dtype=np.uint64)
    offsets = np.array([0, 1, 2, 3, 99], dtype=np.int32)
    with pytest.raises(ValueError, match="outside the data"):
        _kernels.hash_column(out, 4, None, 0, offsets, 32, b"abc", 0, 1)
    with pytest.raises(ValueError, match="bytes"):
        _kernels.hash_column(out, 5, None, 0, offsets, 32, b"abcd", 0, 1)
    with pytest.raises(ValueError, match="bad column layout"):
        _kernels.hash_column(out, 4, None, 0, offsets, 16, b"abcd", 0, 1)
    with pytest.raises(ValueError, match="bytes"):
        _kernels.hash_column(out, 4, None, 0, None, 0, b"abc", 1, 1)


def test_a_null_hashes_alike_whatever_the_column_type() -> None:
    # A chunk whose column holds only nulls arrives typed as null (pandas, JSON Lines):
    # its rows must still equal the same rows of a chunk where the column is text.
    text = hashes({"x": pa.array(["a", "a"]), "y": pa.array(["1", None])})
    untyped = hashes({"x": pa.array(["a"]), "y": pa.nulls(1)})
    labels = hashes({"x": pa.array(["a"]), "y": pa.array([None], pa.string()).dictionary_encode()})
    flags = hashes({"x": pa.array(["a"]), "y": pa.array([None], pa.bool_())})
    assert text[1] == untyped[0] == labels[0] == flags[0] != text[0]
    sliced = pa.record_batch({"x": pa.array(["b", "a"]), "y": pa.nulls(2)}).slice(1)
    assert row_hashes(sliced, SEED)[0] == untyped[0]


def splitmix_keys(start: int, count: int) -> np.ndarray:
    """The row keys written in numpy: splitmix64 of each row number (Steele, Lea & Flood
    2014, the generator's step then its finaliser)."""
    golden = np.uint64(0x9E3779B97F4A7C15)
    with np.errstate(over="ignore"):
        z = np.arange(start, start + count, dtype=np.uint64) * golden + golden
        z = (z ^ (z >> np.uint64(30))) * np.uint64(0xBF58476D1CE4E5B9)
        z = (z ^ (z >> np.uint64(27))) * np.uint64(0x94D049BB133111EB)
        return z ^ (z >> np.uint64(31))


def test_row_keys_are_splitmix64_of_the_row_numbers() -> None:
    assert (row_keys(0, 1000) == splitmix_keys(0, 1000)).all()
    assert (row_keys(12_345_678, 777) == splitmix_keys(12_345_678, 777)).all()
    assert row_keys(5, 0).size == 0


@pytest.mark.parametrize("count", [0, 1, 5000, 70_000])
def test_hashes_grouped_by_top_bits_keep_rows_in_order(count) -> None:
    hashes = np.random.default_rng(count).integers(0, 2**64, count, dtype=np.uint64)
    grouped, positions, bounds = partition_by_top_bits(hashes, 4)
    tops = hashes >> np.uint64(60)
    order = np.argsort(tops, kind="stable")  # reference: numpy's stable sort by group
    assert (grouped == hashes[order]).all()
    assert (positions == order).all()
    expected = np.concatenate([[0], np.cumsum(np.bincount(tops.astype(np.intp), minlength=16))])
    assert (bounds == expected).all()


def test_sample_keys_are_the_row_keys_as_fractions_and_filter_below_the_threshold() -> None:
    values = np.arange(50_000, dtype=np.float64)
    keys, kept = sample_below(7 << 40, values, 0.1)
    every = (row_keys(7 << 40, 50_000) >> np.uint64(11)).astype(np.float64) * 2.0**-53
    below = every < 0.1
    assert (kept == values[below]).all() and (keys == every[below]).all()
    # Each value enters with probability 0.1: about 5,000 of them (binomial sd 67).
    assert abs(kept.size - 5_000) < 5 * 67
    all_keys, all_kept = sample_below(0, values[:10], np.inf)
    assert (all_kept == values[:10]).all() and ((all_keys >= 0) & (all_keys < 1)).all()
