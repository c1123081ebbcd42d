"""One numeric column's batch summarised by the compiled pass in ``numbers.c``, and
HyperLogLog register updates from ``hyperloglog.c``."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from worker.profiling.native import _kernels


@dataclass(frozen=True)
class NumberSummary:
    """The finite values of a batch (in row order) and their summary.

    ``m2``, ``m3`` and ``m4`` are the sums of the 2nd to 4th powers of the
    deviations from ``mean``; ``candidate_counts`` counts each candidate value.
    """

    values: np.ndarray
    n: int
    zeros: int
    negatives: int
    integers: bool
    total: float
    minimum: float
    maximum: float
    mean: float
    m2: float
    m3: float
    m4: float
    candidate_counts: np.ndarray


def number_summary(numbers: np.ndarray, candidates: np.ndarray | None = None) -> NumberSummary:
    """Summarise float64 ``numbers`` (NaN where missing); count each of ``candidates``
    (sorted ascending)."""
    x = np.ascontiguousarray(numbers, dtype=np.float64).reshape(-1)
    wanted = np.ascontiguousarray(
        np.empty(0) if candidates is None else candidates, dtype=np.float64
    )
    if np.any(wanted[1:] < wanted[:-1]):
        raise ValueError("the candidates must be sorted ascending")
    kept = np.empty_like(x)
    counts = np.zeros(len(wanted), dtype=np.int64)
    n, zeros, negatives, integers, *moments = _kernels.number_summary(x, wanted, kept, counts)
    # A copy when many cells were missing, so kept batches hold no unused rows.
    values = kept[:n] if n >= 0.9 * len(x) else kept[:n].copy()
    total, minimum, maximum, mean, m2, m3, m4 = moments
    return NumberSummary(
        values, n, zeros, negatives, integers, total, minimum, maximum, mean, m2, m3, m4, counts
    )


def hll_add(registers: np.ndarray, precision: int, hashes: np.ndarray) -> None:
    """Add uint64 ``hashes`` to the ``2**precision`` uint8 HyperLogLog ``registers``."""
    _kernels.hll_add(registers, precision, np.ascontiguousarray(hashes, dtype=np.uint64))


def hll_add_numbers(registers: np.ndarray, precision: int, values: np.ndarray, seed: int) -> None:
    """Add float64 ``values`` (NaN skipped) to the registers, each hashed as
    ``worker.profiling.columns.distinct.hash_numbers`` hashes it with ``seed``."""
    x = np.ascontiguousarray(values, dtype=np.float64).reshape(-1)
    _kernels.hll_add_numbers(registers, precision, x, seed)
