"""Duplicate rows, found by a 64-bit hash of each row's raw cells.

Each batch is hashed in one vectorised call (polars ``hash_rows`` over the raw
cell texts, so "1" and "1.0" are different rows, and a missing cell equals a
missing cell). While the table has at most ``duplicate_exact_rows`` rows every
hash is kept and the count of repeated rows is exact (up to a hash collision,
about n²/2⁶⁵: one in 300,000 for 10 million rows); the first groups of equal
rows are given as examples. Above the bound the hashes feed a HyperLogLog
register array instead and the count is an estimate (``exact`` False) with a
relative standard error of 1.04/√m on the number of distinct rows.

Repeated rows are counted as pandas ``DataFrame.duplicated().sum()`` counts
them: every row equal to an earlier one.

References: Flajolet, Fusy, Gandouet & Meunier (2007), "HyperLogLog: the
analysis of a near-optimal cardinality estimation algorithm", AofA.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

import numpy as np
import polars as pl
import pyarrow as pa

from worker.profiling.hyperloglog import HyperLogLog

if TYPE_CHECKING:
    from worker.profiling.options import ProfileOptions
    from worker.profiling.prepared import PreparedBatch

HASH_SEED = 0x7D3A
_SLICE_BITS = 4  # the exact count sorts the hashes in 2**4 slices, one at a time


def row_hashes(raw: pa.RecordBatch) -> np.ndarray:
    """One 64-bit hash per row of the raw batch."""
    if raw.num_columns == 0:
        return np.zeros(raw.num_rows, dtype=np.uint64)
    frame = pl.from_arrow(raw)
    assert isinstance(frame, pl.DataFrame)
    return frame.hash_rows(seed=HASH_SEED).to_numpy()


class DuplicateState:
    """Mergeable state for duplicate rows over ``columns`` (the raw batch's columns)."""

    def __init__(self, columns: list[str], options: ProfileOptions) -> None:
        self.columns = list(columns)
        self.options = options
        relations = options.relations
        self.bound = relations.duplicate_exact_rows
        self.example_groups = relations.duplicate_examples
        self.example_rows = relations.duplicate_example_rows
        self.rows = 0
        self._parts: list[tuple[int, np.ndarray]] = []  # (offset of the first row, hashes)
        self._sketch: HyperLogLog | None = None
        self._prefix: dict[str, Any] | None = None  # exact findings before the bound was passed

    def update(self, batch: PreparedBatch) -> None:
        """Add one prepared batch (only its raw cells and offset are read)."""
        self._add(batch.offset, row_hashes(batch.raw))

    def _add(self, offset: int, hashes: np.ndarray) -> None:
        self.rows += len(hashes)
        if self._sketch is not None:
            self._sketch.update(hashes)
            return
        self._parts.append((offset, hashes))
        if self.rows > self.bound:
            self._to_sketch()

    def _to_sketch(self) -> None:
        self._prefix = self._exact()
        self._sketch = HyperLogLog()
        for _, hashes in self._parts:
            self._sketch.update(hashes)
        self._parts = []

    def merge(self, other: DuplicateState) -> DuplicateState:
        merged = DuplicateState(self.columns, self.options)
        first, second = sorted([self, other], key=lambda state: state._first_offset())
        merged._prefix = first._prefix
        if first._sketch is None and second._sketch is None:
            for offset, hashes in [*first._parts, *second._parts]:
                merged._add(offset, hashes)
            return merged
        merged._sketch = HyperLogLog()
        merged.rows = first.rows + second.rows
        for state in (first, second):
            if state._sketch is not None:
                merged._sketch.merge(state._sketch)
            for _, hashes in state._parts:
                merged._sketch.update(hashes)
        if merged._prefix is None:
            merged._prefix = first._exact()
        return merged

    def _first_offset(self) -> int:
        return min((offset for offset, _ in self._parts), default=0)

    def _exact(self) -> dict[str, Any]:
        """Exact count and first examples from the kept hashes.

        The hashes are split by their top bits into ``_SLICES`` slices; each slice is
        gathered, sorted and its equal neighbours counted in turn, so the extra
        memory is a sixteenth of the hashes instead of a sorted copy of all of them
        (which made the peak grow with the rows). The examples are then found by
        scanning the batches in row order against the few repeated hashes; no
        per-row table of (hash, row) is ever built.
        """
        parts = sorted(self._parts, key=lambda part: part[0])
        if not parts:
            return {"duplicate_rows": 0, "examples": []}
        tops = [(h >> np.uint64(64 - _SLICE_BITS)).astype(np.uint8) for _, h in parts]
        repeated = 0
        found: list[np.ndarray] = []
        for value in range(1 << _SLICE_BITS):
            chunk = np.concatenate([h[t == value] for (_, h), t in zip(parts, tops, strict=True)])
            chunk.sort()
            equal = chunk[1:] == chunk[:-1]
            count = int(np.count_nonzero(equal))
            if count:
                repeated += count
                found.append(np.unique(chunk[1:][equal]))
        del tops
        examples: list[list[int]] = []
        if repeated and self.example_groups:
            examples = self._examples(parts, np.sort(np.concatenate(found)))
        return {"duplicate_rows": repeated, "examples": examples}

    def _examples(
        self, parts: list[tuple[int, np.ndarray]], repeated: np.ndarray
    ) -> list[list[int]]:
        """The first ``example_groups`` groups of equal rows (by their first row), each
        with its first ``example_rows`` row numbers."""
        chosen: list[int] = []  # hashes of the groups, in order of their first row
        for _, hashes in parts:
            hits = hashes[_member(hashes, repeated)]
            if hits.size:
                distinct, first = np.unique(hits, return_index=True)
                for value in distinct[np.argsort(first)][: self.example_groups]:
                    if int(value) not in chosen:
                        chosen.append(int(value))
            if len(chosen) >= self.example_groups:
                break
        wanted = np.sort(np.array(chosen[: self.example_groups], dtype=np.uint64))
        found_rows, found_hashes = [], []
        for offset, hashes in parts:
            positions = np.flatnonzero(_member(hashes, wanted))
            found_rows.append(positions + offset)
            found_hashes.append(hashes[positions])
        rows, hashes = np.concatenate(found_rows), np.concatenate(found_hashes)
        groups = []
        for value in chosen[: self.example_groups]:
            members = rows[hashes == np.uint64(value)]
            groups.append([int(r) for r in np.sort(members)[: self.example_rows]])
        return groups

    def finalize(self) -> dict[str, Any]:
        """{"duplicate_rows", "exact", "examples": [[row numbers (0-based) of one group], ...]}."""
        if self._sketch is None:
            return {"exact": True, **self._exact()}
        distinct = self._sketch.estimate()
        prefix = self._prefix or {"duplicate_rows": 0, "examples": []}
        return {
            "duplicate_rows": int(max(prefix["duplicate_rows"], round(self.rows - distinct), 0)),
            "exact": False,
            "distinct_rows_relative_error": float(self._sketch.relative_error),
            "examples": prefix["examples"],
        }


def _member(values: np.ndarray, sorted_set: np.ndarray) -> np.ndarray:
    """True where ``values`` is in ``sorted_set`` (sorted, non-empty), by binary search."""
    at = np.minimum(np.searchsorted(sorted_set, values), sorted_set.size - 1)
    return sorted_set[at] == values
