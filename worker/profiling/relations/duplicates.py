"""Duplicate rows, found by a 64-bit hash of each row's raw cells.

Each batch is hashed in one compiled pass over the raw cells
(``worker.profiling.native.row_hashes``: "1" and "1.0" are different rows, and a
missing cell equals a missing cell). While the table has at most
``duplicate_exact_rows`` rows every hash is kept and the count of repeated rows
is exact (up to a hash collision, about n²/2⁶⁵: one in 300,000 for 10 million
rows); the first groups of equal rows are given as examples. Above the bound
the hashes feed a HyperLogLog register array instead and the count is an
estimate (``exact`` False) with a relative standard error of 1.04/√m on the
number of distinct rows.

Repeated rows are counted as pandas ``DataFrame.duplicated().sum()`` counts
them: every row equal to an earlier one.

References: Flajolet, Fusy, Gandouet & Meunier (2007), "HyperLogLog: the
analysis of a near-optimal cardinality estimation algorithm", AofA.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

import numpy as np
import pyarrow as pa

from worker.profiling import native
from worker.profiling.hyperloglog import HyperLogLog

if TYPE_CHECKING:
    from worker.profiling.options import ProfileOptions

HASH_SEED = 0x7D3A
_SLICE_BITS = 4  # the exact count sorts the hashes in 2**4 slices, one at a time


def row_hashes(raw: pa.RecordBatch) -> np.ndarray:
    """One 64-bit hash per row of the raw batch."""
    return native.row_hashes(raw, HASH_SEED)


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
        self._parts: list[_Part] = []
        self._sketch: HyperLogLog | None = None
        self._prefix: dict[str, Any] | None = None  # exact findings before the bound was passed

    def update(self, raw: pa.RecordBatch, offset: int) -> None:
        """Add the raw cells of one batch whose first row is row ``offset`` of the table."""
        self._add(offset, row_hashes(raw))

    def _add(self, offset: int, hashes: np.ndarray) -> None:
        if self._sketch is not None:
            self.rows += len(hashes)
            self._sketch.update(hashes)
            return
        self._take(_Part.of(offset, hashes))

    def _take(self, part: _Part) -> None:
        self.rows += len(part.hashes)
        if self._sketch is not None:
            self._sketch.update(part.hashes)
            return
        self._parts.append(part)
        if self.rows > self.bound:
            self._to_sketch()

    def _to_sketch(self) -> None:
        self._prefix = self._exact()
        self._sketch = HyperLogLog()
        for part in self._parts:
            self._sketch.update(part.hashes)
        self._parts = []

    def merge(self, other: DuplicateState) -> DuplicateState:
        merged = DuplicateState(self.columns, self.options)
        first, second = sorted([self, other], key=lambda state: state._first_offset())
        merged._prefix = first._prefix
        if first._sketch is None and second._sketch is None:
            for part in [*first._parts, *second._parts]:
                merged._take(part)
            return merged
        merged._sketch = HyperLogLog()
        merged.rows = first.rows + second.rows
        for state in (first, second):
            if state._sketch is not None:
                merged._sketch.merge(state._sketch)
            for part in state._parts:
                merged._sketch.update(part.hashes)
        if merged._prefix is None:
            merged._prefix = first._exact()
        return merged

    def _first_offset(self) -> int:
        return min((part.offset for part in self._parts), default=0)

    def _exact(self) -> dict[str, Any]:
        """Exact count and first examples from the kept hashes.

        Each batch's hashes were split by their top bits into ``2**_SLICE_BITS``
        slices when they came in (``_Part``); here each slice is gathered from every
        batch, sorted (numpy's sort, twice as fast here as polars' over 750,000
        hashes, and it spares loading polars) and its equal neighbours counted in
        turn, so the extra memory is a sixteenth of the hashes instead of a sorted
        copy of all of them (which made the peak grow with the rows). The examples
        are then found among the batches against the few repeated hashes; no
        table of (hash, row) over every row is ever built.
        """
        parts = sorted(self._parts, key=lambda part: part.offset)
        if not parts:
            return {"duplicate_rows": 0, "examples": []}
        repeated = 0
        found: list[np.ndarray] = []
        for value in range(1 << _SLICE_BITS):
            ordered = np.sort(np.concatenate([part.slice(value) for part in parts]))
            equal = ordered[1:] == ordered[:-1]
            count = int(np.count_nonzero(equal))
            if count:
                repeated += count
                found.append(np.unique(ordered[1:][equal]))
        examples: list[list[int]] = []
        if repeated and self.example_groups:
            examples = self._examples(parts, np.sort(np.concatenate(found)))
        return {"duplicate_rows": repeated, "examples": examples}

    def _examples(self, parts: list[_Part], repeated: np.ndarray) -> list[list[int]]:
        """The first ``example_groups`` groups of equal rows (by their first row), each
        with its first ``example_rows`` row numbers."""
        chosen: list[int] = []  # hashes of the groups, in order of their first row
        for part in parts:
            rows, hashes = part.members(repeated)
            if hashes.size:
                hashes = hashes[np.argsort(rows, kind="stable")]
                distinct, first = np.unique(hashes, return_index=True)
                for value in distinct[np.argsort(first)][: self.example_groups]:
                    if int(value) not in chosen:
                        chosen.append(int(value))
            if len(chosen) >= self.example_groups:
                break
        wanted = np.sort(np.array(chosen[: self.example_groups], dtype=np.uint64))
        found = [part.members(wanted) for part in parts]
        rows = np.concatenate([part_rows for part_rows, _ in found])
        hashes = np.concatenate([part_hashes for _, part_hashes in found])
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


@dataclass(frozen=True)
class _Part:
    """One batch's row hashes, grouped by their top bits (slice by slice, rows in order
    within a slice), with each hash's row within the batch."""

    offset: int  # row number of the batch's first row
    hashes: np.ndarray  # uint64, slice 0 first
    positions: np.ndarray  # row within the batch of each hash (uint16 or uint32)
    bounds: np.ndarray  # slice v is hashes[bounds[v] : bounds[v + 1]]

    @classmethod
    def of(cls, offset: int, hashes: np.ndarray) -> _Part:
        grouped, positions, bounds = native.partition_by_top_bits(hashes, _SLICE_BITS)
        if len(hashes) <= 1 << 16:
            positions = positions.astype(np.uint16)  # half the memory kept per row
        return cls(offset, grouped, positions, bounds)

    def slice(self, value: int) -> np.ndarray:
        return self.hashes[self.bounds[value] : self.bounds[value + 1]]

    def members(self, sorted_set: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """Row numbers and hashes of this batch's rows whose hash is in ``sorted_set``."""
        hits = np.flatnonzero(_member(self.hashes, sorted_set))
        return self.positions[hits].astype(np.int64) + self.offset, self.hashes[hits]


def _member(values: np.ndarray, sorted_set: np.ndarray) -> np.ndarray:
    """True where ``values`` is in ``sorted_set`` (sorted, non-empty), by binary search."""
    at = np.minimum(np.searchsorted(sorted_set, values), sorted_set.size - 1)
    return sorted_set[at] == values
