"""Distinct values of a column: exact up to a bound, then a HyperLogLog.

While few, the distinct values are kept exactly. Above the bound they are
hashed to 64 bits into a HyperLogLog (``worker.profiling.hyperloglog``) of
2^precision registers, whose relative standard error is 1.04 / sqrt(2^precision)
(0.41 % at precision 16). Text is hashed by the compiled row hash over its
bytes (``worker.profiling.native.row_hashes``, one fixed seed everywhere, so
states from different workers agree); numbers by the SplitMix64 finaliser
over their IEEE 754 bits, hashed in the same compiled pass that updates the
registers (``worker.profiling.native.hll_add_numbers``; ``hash_numbers`` gives
the same hashes in numpy for the distinct values kept until the bound).

References: G. L. Steele, D. Lea and C. H. Flood, "Fast splittable pseudorandom
number generators", OOPSLA 2014 (the SplitMix64 finaliser).
"""

from __future__ import annotations

from typing import Any

import numpy as np
import pyarrow as pa
import pyarrow.compute as pc

from worker.profiling.hyperloglog import HyperLogLog
from worker.profiling.native import NumberSet, row_hashes

_SEED = 0x7469646577616974


def hash_values(values: pa.Array | np.ndarray) -> np.ndarray:
    """64-bit hashes of the non-null values (text or numbers), as uint64."""
    if isinstance(values, np.ndarray) or pa.types.is_floating(values.type):
        numbers = np.asarray(values, dtype=np.float64)
        return hash_numbers(numbers[~np.isnan(numbers)])
    present = _present(values)
    return row_hashes(pa.RecordBatch.from_arrays([present], names=["value"]), _SEED)


def hash_numbers(numbers: np.ndarray) -> np.ndarray:
    """64-bit hashes of float64 numbers (no NaN): SplitMix64's finaliser over their bits,
    each bit of the input reaching every bit of the hash."""
    bits = (numbers + 0.0).view(np.uint64)  # -0.0 and 0.0 are one number
    mixed = bits ^ np.uint64(_SEED)
    mixed ^= mixed >> np.uint64(30)
    mixed *= np.uint64(0xBF58476D1CE4E5B9)
    mixed ^= mixed >> np.uint64(27)
    mixed *= np.uint64(0x94D049BB133111EB)
    mixed ^= mixed >> np.uint64(31)
    return mixed


class DistinctState:
    """Distinct values of a column; exact below ``exact_bound``, a HyperLogLog above.

    While exact, the distinct values themselves are kept: numbers in a compiled
    set of their bits (``worker.profiling.native.NumberSet``), text as the
    batches' distinct values (Arrow's hash-based ``unique``), no hashing step;
    past the bound they are hashed into the registers and every later batch is
    hashed. A column that gave both (text in the batches before its numbers
    were recognised) counts its numbers as Arrow writes them beside the text.
    """

    def __init__(self, exact_bound: int, precision: int = 16) -> None:
        self.exact_bound = exact_bound
        self.precision = precision
        self._parts: list[pa.Array] = []  # distinct values of batches, not yet joined
        self._kept = 0
        self._numbers = NumberSet()
        self._sketch: HyperLogLog | None = None

    @property
    def exact(self) -> bool:
        return self._sketch is None

    def update(self, values: pa.Array | np.ndarray) -> None:
        """Add the non-missing values of a batch (text as Arrow, numbers as numpy)."""
        if isinstance(values, np.ndarray):
            if self._sketch is not None:
                self._sketch.update_numbers(values, _SEED)
                return
            self._numbers.add(values)
            if self._numbers.count > self.exact_bound:
                self._to_sketch()
            return
        values = _present(values)
        if len(values) == 0:
            return
        if self._sketch is not None:
            self._sketch.update(hash_values(values))
            return
        batch = pc.unique(values)
        if self._parts and batch.type != self._parts[0].type:
            batch = batch.cast(self._parts[0].type)
        self._parts.append(batch)
        self._kept += len(batch)
        # The batches' distinct values are joined only when their sum passes twice the
        # bound, so a column near the bound is not re-joined batch after batch.
        if self._kept > 2 * self.exact_bound:
            self._join()

    def _join(self) -> None:
        if len(self._parts) > 1:
            self._parts = [pc.unique(pa.concat_arrays(self._parts))]
        self._kept = len(self._parts[0]) if self._parts else 0
        if self._kept > self.exact_bound:
            self._to_sketch()

    def _to_sketch(self) -> None:
        self._sketch = HyperLogLog(self.precision)
        for part in self._parts:
            self._sketch.update(hash_values(part))
        self._sketch.update_numbers(self._numbers.values(), _SEED)
        self._parts = []
        self._kept = 0
        self._numbers = NumberSet()

    def merge(self, other: DistinctState) -> DistinctState:
        out = DistinctState(self.exact_bound, self.precision)
        if self.exact and other.exact:
            parts = [*self._parts, *other._parts]
            if parts:
                out._parts = [part.cast(parts[0].type) for part in parts]
                out._join()
            out._numbers.add(self._numbers.values())
            out._numbers.add(other._numbers.values())
            if out.exact and out._numbers.count > self.exact_bound:
                out._to_sketch()
            return out
        out._sketch = HyperLogLog(self.precision)
        for part in (self, other):
            if part._sketch is not None:
                out._sketch.merge(part._sketch)
            for values in part._parts:
                out._sketch.update(hash_values(values))
            out._sketch.update_numbers(part._numbers.values(), _SEED)
        return out

    def estimate(self) -> int:
        if self._sketch is None:
            self._join()
        if self._sketch is not None:
            return round(self._sketch.estimate())
        if not self._parts:
            return self._numbers.count
        if not self._numbers.count:
            return self._kept
        text = self._parts[0]
        numbers = pa.array(self._numbers.values()).cast(text.type)
        return len(pc.unique(pa.concat_arrays([text, numbers])))

    def finalize(self) -> dict[str, Any]:
        distinct = self.estimate()
        out: dict[str, Any] = {"distinct": distinct, "distinct_exact": self.exact}
        if not self.exact:
            out["distinct_relative_error"] = self._sketch.relative_error
        return out


def _present(values: pa.Array) -> pa.Array:
    return values.drop_null() if values.null_count else values
