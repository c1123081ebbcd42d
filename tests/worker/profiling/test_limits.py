"""Limits on columns and cell length: refused with a plain reason, through the engine."""

from __future__ import annotations

from pathlib import Path

import pyarrow as pa
import pytest

from worker.profiling import ProfileError, ProfileOptions, profile_file
from worker.profiling.limits import check_cells, check_columns


def test_too_many_columns_are_refused() -> None:
    options = ProfileOptions(max_columns=3)
    check_columns(["a", "b", "c"], options)
    with pytest.raises(ProfileError, match="4 columns and at most 3"):
        check_columns(["a", "b", "c", "d"], options)


def test_a_long_cell_is_refused_with_its_column_named() -> None:
    options = ProfileOptions(max_cell_chars=10)
    check_cells(pa.record_batch({"x": ["é" * 10, None]}), options)  # 10 characters, 20 bytes
    with pytest.raises(ProfileError, match="column 'x' holds 11 characters"):
        check_cells(pa.record_batch({"x": ["short", "y" * 11]}), options)


def test_numbers_are_not_measured_as_text() -> None:
    check_cells(pa.record_batch({"n": list(range(1000))}), ProfileOptions(max_cell_chars=1))


def test_the_engine_applies_both_limits(tmp_path: Path) -> None:
    wide = tmp_path / "wide.csv"
    wide.write_text(",".join(f"c{i}" for i in range(12)) + "\n" + ",".join("1" * 12) + "\n")
    with pytest.raises(ProfileError, match="12 columns"):
        profile_file(wide, ProfileOptions(max_columns=10))
    long_cell = tmp_path / "long.csv"
    long_cell.write_text("note,n\n" + "z" * 5000 + ",1\nshort,2\n")
    with pytest.raises(ProfileError, match="column 'note' holds 5,000 characters"):
        profile_file(long_cell, ProfileOptions(max_cell_chars=4096))
    assert profile_file(long_cell)["dataset"]["rows"] == 2  # the default accepts it
