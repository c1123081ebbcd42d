"""HyperLogLog: the number of distinct 64-bit hashes in a stream, from 2^p one-byte registers.

The top ``p`` bits of a hash pick its register; the register keeps the largest
rank seen, the rank being one more than the number of trailing zero bits of
the hash (capped so the register's own bits are never counted). The low and
high bits of a good hash are independent, so trailing zeros have the same
geometric law as the leading zeros of the original paper, and one instruction
finds them. Updates run in one compiled pass over a batch of hashes
(``worker.profiling.native.hll_add``: numpy's ``maximum.at`` scatter cost more
than hashing the batch); merges are numpy over the registers.

Relative standard error 1.04 / sqrt(2^p): 0.81 % at p = 14, 0.41 % at p = 16.

References: P. Flajolet, É. Fusy, O. Gandouet and F. Meunier, "HyperLogLog: the
analysis of a near-optimal cardinality estimation algorithm", AofA 2007;
S. Heule, M. Nunkesser and A. Hall, "HyperLogLog in practice", EDBT 2013
(64-bit hashes, linear counting for small ranges).
"""

from __future__ import annotations

import math

import numpy as np

from worker.profiling.native import hll_add, hll_add_numbers


class HyperLogLog:
    """Mergeable registers over 64-bit hashes (``np.uint64``)."""

    def __init__(self, precision: int = 14) -> None:
        self.precision = precision
        self.registers = np.zeros(1 << precision, dtype=np.uint8)

    @property
    def relative_error(self) -> float:
        """The estimate's relative standard error, 1.04 / sqrt(m)."""
        return 1.04 / math.sqrt(len(self.registers))

    def update(self, hashes: np.ndarray) -> None:
        """Add a batch of hashes."""
        if hashes.size == 0:
            return
        hll_add(self.registers, self.precision, hashes)

    def update_numbers(self, values: np.ndarray, seed: int) -> None:
        """Add float64 values (NaN skipped), hashed in the same pass by SplitMix64's
        finaliser with ``seed`` (as ``columns.distinct.hash_numbers`` hashes them)."""
        hll_add_numbers(self.registers, self.precision, values, seed)

    def merge(self, other: HyperLogLog) -> None:
        """Take in another sketch of the same precision (the union of both streams)."""
        np.maximum(self.registers, other.registers, out=self.registers)

    def estimate(self) -> float:
        """The estimated number of distinct hashes added."""
        m = float(len(self.registers))
        alpha = 0.7213 / (1.0 + 1.079 / m)
        raw = alpha * m * m / float(np.sum(np.ldexp(1.0, -self.registers.astype(np.int64))))
        zeros = int(np.count_nonzero(self.registers == 0))
        if raw <= 2.5 * m and zeros:
            return m * math.log(m / zeros)  # small-range correction (linear counting)
        return raw
