"""Parquet files, read batch by batch with their native Arrow types.

Dictionary-encoded columns are decoded to their value type, and nested
columns (lists, structs, maps) become JSON text, so the column steps see the
same flat kinds as from any other format.
"""

from __future__ import annotations

import json
from collections.abc import Iterator
from pathlib import Path

import pyarrow as pa
import pyarrow.parquet as pq

from worker.profiling.errors import ProfileError
from worker.profiling.options import ProfileOptions
from worker.profiling.readers.names import unique_names
from worker.profiling.readers.source import SourceInfo, TableSource


class ParquetSource(TableSource):
    """A Parquet file; its row groups are read one batch at a time."""

    def __init__(self, path: Path, options: ProfileOptions) -> None:
        super().__init__(path, options.parse_error_limit)
        self._batch_rows = options.batch_rows
        try:
            self._file = pq.ParquetFile(path)
        except (pa.ArrowException, OSError) as exc:
            raise ProfileError(f"the Parquet file is damaged ({_first_line(exc)})") from exc
        self._rows = self._file.metadata.num_rows
        self.column_names, fixes = unique_names(self._file.schema_arrow.names)
        for fix in fixes:
            self._errors.add(None, fix)
        self.info = SourceInfo(format="parquet")

    def batches(self) -> Iterator[pa.RecordBatch]:
        rows_read = 0
        try:
            for batch in self._file.iter_batches(batch_size=self._batch_rows):
                rows_read += batch.num_rows
                self._consumed = int(self.total_bytes * rows_read / max(self._rows, 1))
                yield pa.RecordBatch.from_arrays(
                    [_flat(column) for column in batch.columns], names=self.column_names
                )
        except (pa.ArrowException, OSError) as exc:
            raise ProfileError(
                f"the Parquet file cannot be read past row {rows_read + 1} ({_first_line(exc)})"
            ) from exc
        finally:
            self.close()
        self._consumed = self.total_bytes

    def close(self) -> None:
        self._file.close()


def _flat(column: pa.Array) -> pa.Array:
    """Dictionary columns decoded; nested ones as JSON text; the rest untouched."""
    kind = column.type
    if pa.types.is_dictionary(kind):
        return column.cast(kind.value_type)
    if pa.types.is_nested(kind):
        texts = [
            None if value is None else json.dumps(value, ensure_ascii=False, default=str)
            for value in column.to_pylist()
        ]
        return pa.array(texts, type=pa.string())
    return column


def _first_line(exc: BaseException) -> str:
    return str(exc).split("\n")[0]
