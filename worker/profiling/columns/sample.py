"""A bounded uniform sample of a stream of numbers, mergeable (bottom-k by random keys).

Every value gets an independent uniform key; the sample is the ``size`` values
with the smallest keys, so the union of two samples cut to ``size`` is again a
uniform sample of the union of their streams.

Once the sample is full, only keys below the largest key kept (τ) can enter.
Rather than drawing a key for every value and comparing, a batch of b values
draws how many enter, c ~ Binomial(b, τ), which of them (c positions chosen
uniformly without replacement) and their keys (uniform below τ): the same
distribution as iid uniform keys filtered by τ, at a cost that grows with the
c entering values, not with b. Entering values are buffered and the buffer is
cut back to ``size`` only when it holds twice as many.

References: E. Cohen and H. Kaplan, "Summarizing data using bottom-k sketches", PODC 2007.
"""

from __future__ import annotations

import numpy as np


class SampleState:
    """Up to ``size`` values drawn uniformly without replacement from all values seen."""

    def __init__(self, size: int, seed: int = 0) -> None:
        self.size = size
        self._rng = np.random.default_rng(seed)
        self._keys: list[np.ndarray] = []
        self._values: list[np.ndarray] = []
        self._buffered = 0
        self._threshold = np.inf  # keys at or above it can no longer enter

    @property
    def values(self) -> np.ndarray:
        """The sampled values (in no particular order)."""
        self._compact()
        return self._values[0] if self._values else np.empty(0)

    @property
    def keys(self) -> np.ndarray:
        self._compact()
        return self._keys[0] if self._keys else np.empty(0)

    def update(self, values: np.ndarray) -> None:
        if values.size == 0:
            return
        if self._threshold == np.inf:
            self._add(self._rng.random(values.size), values)
            return
        entering = int(self._rng.binomial(values.size, self._threshold))
        if entering == 0:
            return
        positions = self._rng.choice(values.size, size=entering, replace=False)
        self._add(self._rng.random(entering) * self._threshold, values[positions])

    def _add(self, keys: np.ndarray, values: np.ndarray) -> None:
        if keys.size == 0:
            return
        self._keys.append(keys)
        self._values.append(values)
        self._buffered += int(keys.size)
        if self._buffered >= 2 * self.size:
            self._compact()

    def _compact(self) -> None:
        if len(self._keys) <= 1 and self._buffered <= self.size:
            return
        keys = np.concatenate(self._keys)
        values = np.concatenate(self._values)
        if keys.size > self.size:
            chosen = np.argpartition(keys, self.size - 1)[: self.size]
            keys, values = keys[chosen], values[chosen]
            self._threshold = float(keys.max())
        self._keys, self._values, self._buffered = [keys], [values], int(keys.size)

    def merge(self, other: SampleState) -> SampleState:
        out = SampleState(self.size, seed=int(self._rng.integers(1 << 31)))
        out._add(
            np.concatenate([self.keys, other.keys]), np.concatenate([self.values, other.values])
        )
        out._compact()
        return out
