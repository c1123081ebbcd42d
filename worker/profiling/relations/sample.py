"""A mergeable uniform sample of rows: the k rows with the smallest random keys.

Every row gets a pseudo-random 64-bit key, a hash of its row number
(splitmix64, ``worker.profiling.native.row_keys``), so the key of a row does
not depend on how the file was cut into batches or chunks. The sample keeps
the k rows with the smallest keys; merging two samples keeps the k smallest
keys of the union, which is the sample one pass would have kept (bottom-k
sampling). While the table has at most k rows
the sample holds every row and statistics on it are exact.

References: Cohen & Kaplan (2007), "Summarizing data using bottom-k sketches",
PODC; Steele (2014), "Fast splittable pseudorandom number generators"
(splitmix64), OOPSLA.
"""

from __future__ import annotations

from collections.abc import Mapping

import numpy as np

from worker.profiling.native import row_keys


class RowSample:
    """Bottom-k uniform sample of rows over ``columns`` (float64 values, NaN where missing).

    Candidate rows are buffered and the buffer is cut back to the k smallest keys
    only when it holds more than 2k rows, so a batch costs a hash and a filter.
    """

    def __init__(self, columns: list[str], k: int) -> None:
        self.columns = list(columns)
        self.k = int(k)
        self.rows_seen = 0
        self._parts: list[tuple[np.ndarray, np.ndarray, np.ndarray]] = []
        self._buffered = 0
        self._threshold: np.uint64 | None = None  # no row with a key at or above it can stay
        self._sorted = False  # True when _parts is one part in row order

    @property
    def exact(self) -> bool:
        """True while the sample holds every row seen."""
        return self.rows_seen <= self.k

    def update(self, numbers: Mapping[str, np.ndarray], offset: int) -> None:
        """Add one batch whose first row is row number ``offset`` of the table."""
        count = len(numbers[self.columns[0]]) if self.columns else 0
        self.rows_seen += count
        if count == 0:
            return
        keys = row_keys(offset, count)
        if self._threshold is None:
            chosen = np.arange(count)
        else:
            chosen = np.flatnonzero(keys < self._threshold)
            if len(chosen) == 0:
                return
        values = np.column_stack(
            [np.asarray(numbers[name], dtype=np.float64)[chosen] for name in self.columns]
        )
        self._add(keys[chosen], offset + chosen.astype(np.int64), values)

    def merge(self, other: RowSample) -> RowSample:
        if other.columns != self.columns:
            raise ValueError("samples over different columns cannot be merged")
        merged = RowSample(self.columns, min(self.k, other.k))
        merged.rows_seen = self.rows_seen + other.rows_seen
        for keys, rows, values in [*self._parts, *other._parts]:
            merged._add(keys, rows, values)
        merged._compact()
        return merged

    def _add(self, keys: np.ndarray, rows: np.ndarray, values: np.ndarray) -> None:
        self._parts.append((keys, rows, values))
        self._buffered += len(keys)
        self._sorted = False
        if self._buffered > 2 * self.k:
            self._compact(in_row_order=False)

    def _compact(self, *, in_row_order: bool = True) -> None:
        if not self._parts or (len(self._parts) == 1 and (self._sorted or not in_row_order)):
            return
        keys = np.concatenate([part[0] for part in self._parts])
        rows = np.concatenate([part[1] for part in self._parts])
        values = np.concatenate([part[2] for part in self._parts])
        if len(keys) >= self.k:
            keep = np.argpartition(keys, self.k - 1)[: self.k]
            keys, rows, values = keys[keep], rows[keep], values[keep]
            self._threshold = keys.max()
        if in_row_order:
            order = np.argsort(rows, kind="stable")
            keys, rows, values = keys[order], rows[order], values[order]
        self._parts = [(keys, rows, values)]
        self._buffered = len(keys)
        self._sorted = in_row_order

    @property
    def rows(self) -> np.ndarray:
        """Row numbers of the sampled rows, ascending."""
        self._compact()
        return self._parts[0][1] if self._parts else np.empty(0, dtype=np.int64)

    def column(self, name: str) -> np.ndarray:
        """The sampled values of one column, in row order."""
        self._compact()
        if not self._parts:
            return np.empty(0)
        return self._parts[0][2][:, self.columns.index(name)]
