"""Entry point of the engine: read a file in batches and assemble its profile.

Each batch is prepared once (``prepared.py``: missing masks, parsed numbers,
trimmed labels), then updates one mergeable state per column
(``columns/``) and the across-column states (``relations/``). At the end the
states are finalized into the profile document of the design notes.
"""

from __future__ import annotations

import copy
import dataclasses
import importlib
import os
import queue
import threading
import time
from collections.abc import Callable, Iterator
from concurrent.futures import Executor, Future, ThreadPoolExecutor
from pathlib import Path
from typing import Any

import pyarrow as pa
import pyarrow.compute as pc

from worker.filedigest import FileDigest
from worker.profiling.columns.column import ColumnState
from worker.profiling.errors import ProfileError
from worker.profiling.limits import check_cells, check_columns
from worker.profiling.options import ProfileOptions
from worker.profiling.prepared import (
    BatchPlan,
    PreparedColumn,
    assemble_batch,
    prepare_column,
)
from worker.profiling.readers import open_table
from worker.profiling.relations.duplicates import DuplicateState
from worker.profiling.relations.state import RelationsState

FORMAT_VERSION = 1

ProgressCallback = Callable[[str, float], None]
"""Called with a stage name and the share of the file's bytes read (0 to 1)."""


def profile_file(
    path: str | os.PathLike[str],
    options: ProfileOptions | None = None,
    *,
    progress: ProgressCallback | None = None,
    columnar_copy: Path | None = None,
    sheet: str | None = None,
    source_name: str | None = None,
    sha256: str | FileDigest | None = None,
) -> dict[str, Any]:
    """Profile one delivered file and return its profile document (format_version 1).

    ``columnar_copy``, when given, is where a Parquet copy of the table is
    written for on-demand questions. ``source_name`` is the name shown in the
    profile (the upload's original name); it defaults to the file's name.
    ``sha256`` is the file's digest when the caller already knows it (the
    service computed it while the upload streamed in), or a ``FileDigest`` the
    caller started earlier; otherwise it is computed here, beside the profiling.
    """
    options = options or ProfileOptions()
    path = Path(path)
    report = progress or (lambda stage, share: None)
    if not path.is_file():
        raise ProfileError(f"there is no file at {path.name}")
    digest = FileDigest(path) if sha256 is None else sha256
    report("reading", 0.0)
    pool = ThreadPoolExecutor(max_workers=options.threads) if options.threads > 1 else None
    with open_table(path, options=options, sheet=sheet) as source:
        check_columns(source.column_names, options)
        profiler = TableProfiler(source.column_names, options, source.info, pool=pool)
        writer = _columnar_writer(columnar_copy)
        try:
            for raw in _batches(source):
                check_cells(raw, options)
                profiler.update(raw)
                if writer is not None:
                    writer.write(raw)
                report("reading", source.bytes_read() / max(source.total_bytes, 1))
            profiler.wait()  # the last batch's across-column figures, while the pool runs
        except BaseException:
            if writer is not None:
                writer.abort()  # no half copy left where a whole one is expected
            raise
        else:
            if writer is not None:
                writer.close(_text_schema(source.column_names))
        finally:
            if pool is not None:
                pool.shutdown()
        report("summarising", 1.0)
        profile = profiler.finalize()
        profile["source"] = {
            "name": source_name or path.name,
            "bytes": path.stat().st_size,
            "sha256": digest.result() if isinstance(digest, FileDigest) else digest,
            **source.info.as_dict(),
        }
        profile["dataset"]["parse_errors"] = list(source.parse_errors)
        profile["dataset"]["parse_error_count"] = source.parse_error_count
    report("judging", 1.0)
    profile.update(_judge(profile, options))
    return profile


class TableProfiler:
    """The states of one table: per column, across columns and duplicate rows; mergeable."""

    def __init__(
        self,
        column_names: list[str],
        options: ProfileOptions,
        info: Any,
        *,
        first_row: int = 0,
        now: float | None = None,
        pool: Executor | None = None,
    ) -> None:
        self.options = options
        self.pool = pool
        self.column_names = list(column_names)
        self.decimal = getattr(info, "decimal", ".") or "."
        self.thousands = getattr(info, "thousands", None)
        now = time.time() if now is None else now
        self.columns = {
            name: ColumnState(name, position, options, now=now)
            for position, name in enumerate(self.column_names)
        }
        self.relations: RelationsState | None = None
        self.duplicates = DuplicateState(self.column_names, options)
        self.first_row = first_row
        self._pending: dict[str, Future[Any]] = {}
        self._lagging: tuple[pa.RecordBatch, int, dict[str, Future]] | None = None
        self.rows = 0
        self._plan = self._make_plan()

    def _make_plan(self) -> BatchPlan:
        numeric = {n for n, c in self.columns.items() if c.candidates and c.candidates.numeric}
        labels = {n for n, c in self.columns.items() if c.candidates and c.candidates.labels}
        return BatchPlan(
            numeric=frozenset(numeric),
            labels=frozenset(labels),
            missing_tokens=tuple(self.options.missing_tokens),
            decimal=self.decimal,
            thousands=self.thousands,
        )

    def update(self, raw: pa.RecordBatch) -> None:
        """Add the next batch of rows (in table order).

        With a pool, the work is pipelined: each column is a lane of its own, whose
        batches run in table order, so one column of this batch may run while
        another column of the previous batch still does (no barrier between
        batches). The across-column figures need every column of a batch: they
        are taken one batch behind, when the next batch has been handed out.
        ``wait`` takes the last batch's.
        """
        if raw.num_rows == 0:
            return
        offset = self.first_row + self.rows
        fresh = set()
        for state in self.columns.values():
            if state.candidates is None and self._choose(state, raw.column(state.name)):
                fresh.add(state.name)
        if fresh:
            self._plan = self._make_plan()
        if self.relations is None:
            self.relations = RelationsState(
                self._relation_numeric(), self._relation_labels(), self.options
            )
        plan = self._plan
        # Row hashes need only the raw cells: they are taken while the columns are prepared.
        self._in_order("duplicates", self.duplicates.update, raw, offset)
        columns = {
            name: self._in_order(
                name, self._update_column, name, raw.column(name), plan, name in fresh
            )
            for name in self.column_names
        }
        lagging, self._lagging = self._lagging, (raw, offset, columns)
        if lagging is not None:
            self._relate(*lagging)
        self.rows += raw.num_rows

    def _choose(self, state: ColumnState, column: pa.Array) -> bool:
        """Choose the candidate parsers of a column still without them, from this
        batch's present values; False while it has none."""
        pending = self._pending.get(state.name)
        if pending is not None:
            pending.result()  # its previous batch's update reads the candidates
        prepared = prepare_column(state.name, column, self._plan)
        present = (
            prepared.text.drop_null()
            if prepared.text is not None
            else pc.filter(column, pa.array(~prepared.missing))
        )
        if not len(present):
            return False
        state.choose(column, present, self.decimal, self.thousands)
        return True

    def _update_column(
        self, name: str, column: pa.Array, plan: BatchPlan, fresh: bool
    ) -> PreparedColumn:
        """Prepare one column of a batch and update its state (in the column's lane).

        A column whose candidates were not chosen from this very batch may start
        parsing numbers here (``ColumnState.reconsider``); the plan of this batch
        and of every later one then parses this column's numbers.
        """
        state = self.columns[name]
        if not fresh:
            state.reconsider(column, self.decimal, self.thousands)
        if state.candidates is not None and state.candidates.numeric and name not in plan.numeric:
            plan = dataclasses.replace(plan, numeric=plan.numeric | {name})
        prepared = prepare_column(name, column, plan)
        state.update(column, prepared)
        return prepared

    def _relate(self, raw: pa.RecordBatch, offset: int, columns: dict[str, Future]) -> None:
        """Hand the across-column figures one batch, once its columns are prepared."""
        prepared = {name: future.result() for name, future in columns.items()}
        batch = assemble_batch(raw, offset, prepared)
        assert self.relations is not None
        self._in_order("relations", self.relations.update, batch)

    def _in_order(self, lane: str, function: Callable[..., Any], *args: Any) -> Future:
        """Run ``function`` in the pool after the same lane's previous call, so each
        state takes its batches in table order; without a pool, run it now.

        The wait happens in the pool, not here. It cannot deadlock: a call only
        waits for calls submitted before it, which the pool (first in, first out)
        has already started or finished.
        """
        if self.pool is None:
            done: Future = Future()
            done.set_result(function(*args))
            return done
        previous = self._pending.get(lane)

        def after_previous() -> Any:
            if previous is not None:
                previous.result()
            return function(*args)

        future = self.pool.submit(after_previous)
        self._pending[lane] = future
        return future

    def wait(self) -> None:
        """Finish the updates still running (errors surface here)."""
        lagging, self._lagging = self._lagging, None
        if lagging is not None:
            self._relate(*lagging)
        pending, self._pending = self._pending, {}
        for future in pending.values():
            future.result()

    def follow(self, leader: TableProfiler) -> None:
        """Use the candidate parsers that ``leader``, a profiler of the first rows of the
        same table, chose; chunks profiled apart then merge column by column."""
        for name, state in self.columns.items():
            candidates = leader.columns[name].candidates
            if candidates is not None and state.candidates is None:
                state.start(candidates)
        self._plan = self._make_plan()
        if leader.relations is not None and self.relations is None:
            self.relations = RelationsState(
                leader.relations.numeric, leader.relations.labels, self.options
            )

    def merge(self, other: TableProfiler) -> TableProfiler:
        """Combine with a profiler of the rows that follow this one's (neither is changed)."""
        self.wait()
        other.wait()
        out = copy.copy(self)
        out.columns = {
            name: state.merge(other.columns[name]) for name, state in self.columns.items()
        }
        if self.relations is not None and other.relations is not None:
            out.relations = self.relations.merge(other.relations)
        else:
            out.relations = self.relations or other.relations
        out.duplicates = self.duplicates.merge(other.duplicates)
        out.rows = self.rows + other.rows
        return out

    def _relation_numeric(self) -> list[str]:
        return [
            n
            for n, c in self.columns.items()
            if c.candidates and c.candidates.numeric and (c.candidates.number_share > 0.5)
        ]

    def _relation_labels(self) -> list[str]:
        return [n for n, c in self.columns.items() if c.candidates and c.candidates.labels]

    def finalize(self) -> dict[str, Any]:
        """The profile document without its ``source`` section and judgement.

        With more than one thread, the duplicate rows (a sort of every row hash,
        which frees the GIL) and Spearman's ranks are computed beside the column
        figures, and the columns (sorts and quantiles of their kept values) are
        summarised side by side; the other pair figures follow, as they need the
        columns' kinds.
        """
        self.wait()
        threads = self.options.threads
        side = ThreadPoolExecutor(max_workers=threads) if threads > 1 else None
        pending = side.submit(self.duplicates.finalize) if side is not None else None
        # Spearman's ranks (sorts of the row sample) need no kinds: they run beside the
        # columns too, as does loading scipy.special for the chi-square p-values.
        ranks = None
        if side is not None and self.relations is not None:
            ranks = side.submit(self.relations.spearman)
            side.submit(importlib.import_module, "scipy.special")
        try:
            states = list(self.columns.values())
            if side is not None:
                columns = list(side.map(ColumnState.finalize, states))
            else:
                columns = [state.finalize() for state in states]
            kinds = {column["name"]: column["kind"] for column in columns}
            relations: dict[str, Any] = {
                "pairs": [],
                "twins": [],
                "crosstabs": [],
                "missing_together": [],
            }
            if self.relations is not None:
                spearman = ranks.result() if ranks is not None else None
                relations = self.relations.finalize(kinds, spearman)
            duplicates = pending.result() if pending is not None else self.duplicates.finalize()
        finally:
            if side is not None:
                side.shutdown()
        dataset = {
            "rows": self.rows,
            "columns": len(columns),
            "missing_cells": sum(column["missing"] for column in columns),
            "duplicate_rows": duplicates["duplicate_rows"],
            "duplicate_rows_exact": duplicates["exact"],
            "duplicate_examples": duplicates["examples"],
            "candidate_keys": candidate_keys(columns, self.rows),
            "missing_together": relations.get("missing_together", []),
            "kinds": _kind_counts(columns),
            "parse_errors": [],
        }
        return {
            "format_version": FORMAT_VERSION,
            "dataset": dataset,
            "columns": columns,
            "pairs": relations.get("pairs", []),
            "twins": relations.get("twins", []),
            "crosstabs": relations.get("crosstabs", []),
            "flags": [],
            "score": None,
        }


def candidate_keys(columns: list[dict[str, Any]], rows: int) -> list[dict[str, Any]]:
    """Columns whose values are all distinct and none missing (a key of the table).

    With a distinct-count sketch the column is listed as a likely key when the
    estimate is within three standard errors of the row count.
    """
    keys = []
    for column in columns:
        if rows == 0 or column["missing"] or column["kind"] in ("empty", "boolean"):
            continue
        numeric = column.get("numeric") or {}
        if column["kind"] == "numeric" and not numeric.get("integers"):
            continue
        if column["distinct_exact"]:
            if column["distinct"] == rows:
                keys.append({"column": column["name"], "exact": True})
        elif column["distinct"] >= rows * (1 - 3 * column.get("distinct_relative_error", 0)):
            keys.append({"column": column["name"], "exact": False})
    return keys


def _kind_counts(columns: list[dict[str, Any]]) -> dict[str, int]:
    counts: dict[str, int] = {}
    for column in columns:
        counts[column["kind"]] = counts.get(column["kind"], 0) + 1
    return counts


def _judge(profile: dict[str, Any], options: ProfileOptions) -> dict[str, Any]:
    from worker.profiling.judgement import assess

    judged = assess(profile, thresholds=options.thresholds)
    return {"flags": judged["flags"], "score": judged["score"], "verdict": judged.get("verdict")}


def _batches(source: Any, ahead: int = 3) -> Iterator[pa.RecordBatch]:
    """The source's batches, read in a thread up to ``ahead`` batches before the one
    being profiled, so a slow stretch of reading or of profiling does not stall the other.

    Joining the reader's batches into larger ones was measured slower here
    (tests/perf manifests, 2 M rows), so they are profiled as they come.
    """
    handoff: queue.Queue[Any] = queue.Queue(maxsize=ahead)
    stop = threading.Event()

    def offer(item: Any) -> bool:
        """Hand one item over; False once the consumer has stopped."""
        while not stop.is_set():
            try:
                handoff.put(item, timeout=0.1)
                return True
            except queue.Full:
                continue
        return False

    def fetch() -> None:
        try:
            for batch in source.batches():
                if not offer(batch):
                    return
            offer(StopIteration)
        except BaseException as exc:  # handed to the consumer below
            offer(exc)

    worker = threading.Thread(target=fetch, daemon=True)
    worker.start()
    try:
        while True:
            item = handoff.get()
            if item is StopIteration:
                return
            if isinstance(item, BaseException):
                raise item
            yield item
    finally:
        stop.set()
        worker.join()


def _text_schema(names: list[str]) -> pa.Schema:
    """The schema of the columnar copy of a table without rows: every column text."""
    return pa.schema([(name, pa.string()) for name in names])


def _columnar_writer(path: Path | None) -> Any:
    if path is None:
        return None
    from worker.profiling.columnar import ColumnarCopy

    return ColumnarCopy(path)
