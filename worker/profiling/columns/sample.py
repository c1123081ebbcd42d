"""A bounded uniform sample of a stream of numbers, mergeable (bottom-k by random keys).

Every value gets an independent uniform key; the sample is the ``size`` values
with the smallest keys, so the union of two samples cut to ``size`` is again a
uniform sample of the union of their streams.

References: E. Cohen and H. Kaplan, "Summarizing data using bottom-k sketches", PODC 2007.
"""

from __future__ import annotations

import numpy as np


class SampleState:
    """Up to ``size`` values drawn uniformly without replacement from all values seen."""

    def __init__(self, size: int, seed: int = 0) -> None:
        self.size = size
        self._rng = np.random.default_rng(seed)
        self.keys = np.empty(0)
        self.values = np.empty(0)

    def update(self, values: np.ndarray) -> None:
        if values.size == 0:
            return
        keys = self._rng.random(values.size)
        if self.keys.size == self.size:
            # Only keys below the current largest kept key can enter.
            entering = keys < self.keys.max()
            keys, values = keys[entering], values[entering]
        self._keep(np.concatenate([self.keys, keys]), np.concatenate([self.values, values]))

    def _keep(self, keys: np.ndarray, values: np.ndarray) -> None:
        if keys.size > self.size:
            chosen = np.argpartition(keys, self.size - 1)[: self.size]
            keys, values = keys[chosen], values[chosen]
        self.keys, self.values = keys, values

    def merge(self, other: SampleState) -> SampleState:
        out = SampleState(self.size, seed=int(self._rng.integers(1 << 31)))
        out._keep(
            np.concatenate([self.keys, other.keys]), np.concatenate([self.values, other.values])
        )
        return out
