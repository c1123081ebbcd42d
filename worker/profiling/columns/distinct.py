"""Distinct values of a column: exact up to a bound, then a HyperLogLog.

Values are hashed to 64 bits (polars' vectorised hash, one fixed seed everywhere so
states from different workers agree). While few, the distinct hashes are kept
exactly (a 64-bit collision among a million values has odds near 1e-8); above
the bound a HyperLogLog with 2^precision one-byte registers takes over, updated
with numpy (``np.maximum.at`` over register indexes), never a loop per value.
Its relative standard error is 1.04 / sqrt(2^precision) (0.41 % at precision 16).

References: P. Flajolet, É. Fusy, O. Gandouet and F. Meunier, "HyperLogLog: the
analysis of a near-optimal cardinality estimation algorithm", AofA 2007;
S. Heule, M. Nunkesser and A. Hall, "HyperLogLog in practice", EDBT 2013
(64-bit hashes, linear counting for small ranges).
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np
import polars as pl
import pyarrow as pa
import pyarrow.compute as pc

_SEED = 0x7469646577616974


def hash_values(values: pa.Array | np.ndarray) -> np.ndarray:
    """64-bit hashes of the non-null values (text or numbers), as uint64."""
    if isinstance(values, np.ndarray):
        series = pl.Series(values[~np.isnan(values)] if values.dtype.kind == "f" else values)
    else:
        series = pl.from_arrow(values.drop_null() if values.null_count else values)
    if series.dtype == pl.Float64:
        # -0.0 and 0.0 are one number.
        series = series + 0.0
    return series.hash(seed=_SEED).to_numpy()


def _bit_length(words: np.ndarray) -> np.ndarray:
    smeared = words.copy()
    for shift in (1, 2, 4, 8, 16, 32):
        smeared |= smeared >> np.uint64(shift)
    return np.bitwise_count(smeared).astype(np.uint8)


class DistinctState:
    """Distinct count of 64-bit hashes; exact below ``exact_bound``, HyperLogLog above."""

    def __init__(self, exact_bound: int, precision: int = 16) -> None:
        self.exact_bound = exact_bound
        self.precision = precision
        self._hashes: np.ndarray | None = np.empty(0, dtype=np.uint64)
        self._registers: np.ndarray | None = None

    @property
    def exact(self) -> bool:
        return self._hashes is not None

    def update(self, hashes: np.ndarray) -> None:
        if hashes.size == 0:
            return
        if self._hashes is not None:
            batch = pc.unique(pa.array(hashes)).to_numpy()
            joined = np.concatenate([self._hashes, batch])
            self._hashes = pc.unique(pa.array(joined)).to_numpy() if self._hashes.size else batch
            if self._hashes.size > self.exact_bound:
                self._to_sketch()
            return
        self._add_to_registers(hashes)

    def _to_sketch(self) -> None:
        self._registers = np.zeros(1 << self.precision, dtype=np.uint8)
        assert self._hashes is not None
        self._add_to_registers(self._hashes)
        self._hashes = None

    def _add_to_registers(self, hashes: np.ndarray) -> None:
        assert self._registers is not None
        p = self.precision
        index = (hashes >> np.uint64(64 - p)).astype(np.intp)
        rest = hashes & np.uint64((1 << (64 - p)) - 1)
        rank = np.uint8(64 - p + 1) - _bit_length(rest)
        np.maximum.at(self._registers, index, rank)

    def merge(self, other: DistinctState) -> DistinctState:
        out = DistinctState(self.exact_bound, self.precision)
        if self._hashes is not None and other._hashes is not None:
            out._hashes = np.unique(np.concatenate([self._hashes, other._hashes]))
            if out._hashes.size > out.exact_bound:
                out._to_sketch()
            return out
        out._hashes = None
        out._registers = np.zeros(1 << self.precision, dtype=np.uint8)
        for part in (self, other):
            if part._registers is not None:
                np.maximum(out._registers, part._registers, out=out._registers)
            else:
                assert part._hashes is not None
                out._add_to_registers(part._hashes)
        return out

    def estimate(self) -> int:
        if self._hashes is not None:
            return int(self._hashes.size)
        assert self._registers is not None
        m = float(self._registers.size)
        alpha = 0.7213 / (1.0 + 1.079 / m)
        raw = alpha * m * m / float(np.sum(np.exp2(-self._registers.astype(np.float64))))
        zeros = int(np.count_nonzero(self._registers == 0))
        if raw <= 2.5 * m and zeros:
            return round(m * math.log(m / zeros))
        return round(raw)

    def finalize(self) -> dict[str, Any]:
        out: dict[str, Any] = {"distinct": self.estimate(), "distinct_exact": self.exact}
        if not self.exact:
            out["distinct_relative_error"] = 1.04 / math.sqrt(1 << self.precision)
        return out
