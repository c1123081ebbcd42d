"""An exact set of distinct float64 values, kept by the compiled pass in ``numberset.c``."""

from __future__ import annotations

import numpy as np

from worker.profiling.native import _kernels

EMPTY = np.uint64(0xFFF8DEADBEEF5E7F)
"""The mark of a free slot: a NaN pattern, and NaN values are never added."""


class NumberSet:
    """Distinct numbers (NaN skipped, -0.0 and 0.0 one number), in an open-addressing
    table of their bits that is doubled whenever it is half full."""

    def __init__(self, slots: int = 1024) -> None:
        self._table = np.full(max(2, 1 << (slots - 1).bit_length()), EMPTY, dtype=np.uint64)
        self.count = 0

    def add(self, values: np.ndarray) -> None:
        """Add the float64 ``values`` of a batch."""
        x = np.ascontiguousarray(values, dtype=np.float64).reshape(-1)
        while x.size:
            done, self.count = _kernels.number_set_add(self._table, self.count, x)
            x = x[done:]
            if x.size:
                self._grow()

    def values(self) -> np.ndarray:
        """The distinct values, in no particular order."""
        return self._table[self._table != EMPTY].view(np.float64)

    def _grow(self) -> None:
        kept = self.values()
        self._table = np.full(2 * len(self._table), EMPTY, dtype=np.uint64)
        self.count = 0
        self.add(kept)
