"""Uniform keys for row and value samples, from the compiled pass in ``keys.c``."""

from __future__ import annotations

import numpy as np

from worker.profiling.native import _kernels


def row_keys(start: int, count: int, seed: int = 0) -> np.ndarray:
    """SplitMix64 of the row numbers ``start .. start + count - 1`` (plus ``seed``):
    uniform 64-bit keys that depend on the row number alone."""
    keys = np.empty(count, dtype=np.uint64)
    _kernels.row_keys(start, seed, keys)
    return keys


def sample_below(start: int, values: np.ndarray, threshold: float) -> tuple[np.ndarray, np.ndarray]:
    """Uniform keys in [0, 1) for ``values`` (SplitMix64 of ``start`` plus each index) and
    the (keys, values) of those keyed below ``threshold``, in order."""
    x = np.ascontiguousarray(values, dtype=np.float64).reshape(-1)
    keys = np.empty_like(x)
    kept = np.empty_like(x)
    taken = _kernels.sample_below(start & ((1 << 64) - 1), x, threshold, keys, kept)
    return keys[:taken].copy(), kept[:taken].copy()
