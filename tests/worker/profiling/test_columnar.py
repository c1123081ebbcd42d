"""The Parquet copy holds the raw batches, whole, and appears only when finished."""

from __future__ import annotations

from pathlib import Path

import pyarrow as pa
import pyarrow.parquet as pq
import pytest

from worker.profiling.columnar import ColumnarCopy


def batches() -> list[pa.RecordBatch]:
    return [
        pa.record_batch({"dock": pa.array([f" D{i % 7}", None, "NA"] * 10), "n": ["1"] * 30})
        for i in range(5)
    ]


def test_copy_holds_every_raw_batch_in_order(tmp_path: Path) -> None:
    target = tmp_path / "copy.parquet"
    with ColumnarCopy(target, row_group_rows=64) as copy:
        for batch in batches():
            copy.write(batch)
    table = pq.read_table(target)
    expected = pa.Table.from_batches(batches())
    assert table.equals(expected)  # raw texts kept: untrimmed, "NA" as delivered
    # Batches of 30 rows gathered until 64 rows wait, then written in groups of at most 64.
    metadata = pq.ParquetFile(target).metadata
    sizes = [metadata.row_group(i).num_rows for i in range(metadata.num_row_groups)]
    assert sizes == [64, 26, 60]
    assert not (tmp_path / "copy.parquet.partial").exists()


def test_large_string_batches_are_cast_to_the_first_schema(tmp_path: Path) -> None:
    target = tmp_path / "copy.parquet"
    copy = ColumnarCopy(target)
    copy.write(pa.record_batch({"a": pa.array(["x"], pa.string())}))
    copy.write(pa.record_batch({"a": pa.array(["y"], pa.large_string())}))
    copy.close()
    assert pq.read_table(target).column("a").to_pylist() == ["x", "y"]


def test_failure_leaves_no_copy(tmp_path: Path) -> None:
    target = tmp_path / "copy.parquet"
    with pytest.raises(RuntimeError), ColumnarCopy(target, row_group_rows=10) as copy:
        for batch in batches():
            copy.write(batch)
        raise RuntimeError("reader failed")
    assert list(tmp_path.iterdir()) == []


def test_empty_table_gets_a_readable_copy(tmp_path: Path) -> None:
    target = tmp_path / "copy.parquet"
    ColumnarCopy(target).close(pa.schema([("a", pa.string())]))
    assert pq.read_table(target).num_rows == 0


def test_a_failing_writer_is_reported_not_hidden(tmp_path: Path) -> None:
    target = tmp_path / "copy.parquet"
    (tmp_path / "copy.parquet.partial").mkdir()  # the writer cannot create its file
    copy = ColumnarCopy(target, row_group_rows=10)
    with pytest.raises(RuntimeError, match="columnar copy failed"):
        for batch in batches() * 20:
            copy.write(batch)
        copy.close()
    assert not target.exists()
