"""A columnar (Parquet) copy of an intake's table, written batch by batch while profiling.

On-demand questions about an intake (a crosstab within a filter, sample rows,
one column's values; ``worker.profiling.queries``) read only the columns they
need from this copy instead of parsing the delivered file again. The copy
holds the raw batches exactly as the reader gave them (raw cell texts for text
formats), so the questions clean labels the same way the engine does.

The file is written under a temporary name and renamed into place on
``close``, so a reader never sees half a copy; ``abort`` removes it.
"""

from __future__ import annotations

import os
import queue
import threading
from pathlib import Path
from types import TracebackType

import pyarrow as pa
import pyarrow.compute as pc
import pyarrow.parquet as pq

ROW_GROUP_ROWS = 16 * 1024
"""Rows per Parquet row group. Small groups let sample rows and pages of values read only
the groups holding them (20 sample rows of 1 M: 0.08 s, against 0.55 s with 128 K groups;
tests/perf/bench_queries.py) while scans of whole columns stay as fast."""


class ColumnarCopy:
    """Writes raw record batches to one zstd-compressed Parquet file at ``path``.

    Encoding and compressing run in a writer thread (pyarrow releases the GIL
    there), so the copy costs the profiling little besides the second core.
    Text columns are dictionary-encoded, which the questions read as label
    codes, except those whose first batch is mostly distinct values (ids),
    where a dictionary only costs time.
    """

    def __init__(
        self,
        path: str | os.PathLike[str],
        *,
        row_group_rows: int = ROW_GROUP_ROWS,
        queue_batches: int = 4,
    ) -> None:
        self.path = Path(path)
        self.row_group_rows = row_group_rows
        self.rows = 0
        self._partial = self.path.with_name(self.path.name + ".partial")
        self._schema: pa.Schema | None = None
        self._queue: queue.Queue[pa.RecordBatch | None] = queue.Queue(maxsize=queue_batches)
        self._thread: threading.Thread | None = None
        self._error: BaseException | None = None
        self._stop = threading.Event()

    def write(self, batch: pa.RecordBatch) -> None:
        """Add one raw batch; the first batch fixes the schema, later ones are cast to it."""
        self._raise_error()
        if self._schema is None:
            self._schema = batch.schema
            self._start(_dictionary_columns(batch))
        elif batch.schema != self._schema:
            batch = batch.cast(self._schema)
        self.rows += batch.num_rows
        self._queue.put(batch)

    def _start(self, dictionary_columns: list[str]) -> None:
        self.path.parent.mkdir(parents=True, exist_ok=True)
        self._thread = threading.Thread(
            target=self._run, args=(dictionary_columns,), name="columnar-copy", daemon=True
        )
        self._thread.start()

    def _run(self, dictionary_columns: list[str]) -> None:
        assert self._schema is not None
        pending: list[pa.RecordBatch] = []
        pending_rows = 0
        try:
            with pq.ParquetWriter(
                self._partial,
                self._schema,
                compression="zstd",
                compression_level=1,
                use_dictionary=dictionary_columns,
            ) as writer:
                while True:
                    batch = self._queue.get()
                    if batch is not None:
                        pending.append(batch)
                        pending_rows += batch.num_rows
                    if pending and (batch is None or pending_rows >= self.row_group_rows):
                        table = pa.Table.from_batches(pending, schema=self._schema)
                        writer.write_table(table, row_group_size=max(self.row_group_rows, 1))
                        pending, pending_rows = [], 0
                    if batch is None or self._stop.is_set():
                        return
        except BaseException as exc:  # handed to the caller on the next write or close
            self._error = exc
            while self._queue.get() is not None:  # let a blocked producer go on
                pass

    def _raise_error(self) -> None:
        if self._error is not None:
            raise RuntimeError(f"the columnar copy failed: {self._error}") from self._error

    def close(self, schema: pa.Schema | None = None) -> Path:
        """Finish the file and move it into place. ``schema`` serves a table with no rows."""
        if self._thread is None:
            self._schema = self._schema or schema or pa.schema([])
            self._start([])
        assert self._thread is not None
        self._queue.put(None)
        self._thread.join()
        self._raise_error()
        os.replace(self._partial, self.path)
        return self.path

    def abort(self) -> None:
        """Drop the unfinished copy."""
        if self._thread is not None:
            self._stop.set()
            while True:  # empty the queue so the writer thread sees the stop and ends
                try:
                    self._queue.get_nowait()
                except queue.Empty:
                    break
            self._queue.put(None)
            self._thread.join()
        self._partial.unlink(missing_ok=True)

    def __enter__(self) -> ColumnarCopy:
        return self

    def __exit__(
        self,
        exc_type: type[BaseException] | None,
        exc: BaseException | None,
        tb: TracebackType | None,
    ) -> None:
        if exc_type is None:
            self.close()
        else:
            self.abort()


def _dictionary_columns(batch: pa.RecordBatch) -> list[str]:
    """Text columns of the first batch with at most half of their values distinct."""
    names = []
    for name, column in zip(batch.schema.names, batch.columns, strict=True):
        if not (pa.types.is_string(column.type) or pa.types.is_large_string(column.type)):
            continue
        present = len(column) - column.null_count
        if present == 0 or pc.count_distinct(column).as_py() <= present / 2:
            names.append(name)
    return names
