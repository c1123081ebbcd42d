"""The compiled dictionary encoding against Arrow's own ``dictionary_encode``."""

from __future__ import annotations

import numpy as np
import pyarrow as pa
import pyarrow.compute as pc
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from worker.profiling.native import dictionary_encode


def same_as_arrow(column: pa.Array) -> None:
    # Reference: pyarrow.compute.dictionary_encode (nulls masked, first-appearance order).
    found, expected = dictionary_encode(column), pc.dictionary_encode(column)
    assert found.type == expected.type
    assert found.dictionary.equals(expected.dictionary)
    assert found.indices.equals(expected.indices)


# Cells around the 8- and 16-byte word boundaries, empty, accented and long.
CELLS = ["", "a", "dry", "berth-01", "berth-010", "reefer cargo 16", "reefer cargo 160",
         "reefer cargo 1600", "Ålesund", "x" * 40, "x" * 41, None]  # fmt: skip


@settings(max_examples=60, deadline=None, derandomize=True)
@given(st.lists(st.sampled_from(CELLS), max_size=300))
def test_cells_of_every_length_match_arrow(cells) -> None:
    same_as_arrow(pa.array(cells, pa.string()))


@pytest.mark.parametrize("kind", [pa.string(), pa.large_string(), pa.binary()])
def test_text_types_slices_and_growth_match_arrow(kind) -> None:
    rng = np.random.default_rng(5)
    # 3,000 distinct crate numbers: the table doubles several times (truth by construction).
    cells = [None if v % 17 == 0 else f"CR-{v:07d}" for v in rng.integers(0, 3000, 20_000)]
    column = pa.array(cells, pa.string()).cast(kind)
    same_as_arrow(column)
    same_as_arrow(column.slice(7, 9_000))  # a slice starts inside a validity byte


def test_columns_without_text_go_to_arrow() -> None:
    numbers = pa.array([3, 1, 3, None])
    same_as_arrow(numbers)
    same_as_arrow(pa.array([], pa.string()))
