"""A bounded uniform sample of a stream of numbers, mergeable (bottom-k by random keys).

Every value gets a uniform key; the sample is the ``size`` values with the
smallest keys, so the union of two samples cut to ``size`` is again a uniform
sample of the union of their streams.

A value's key is SplitMix64 of its place in the state's stream (a counter,
offset by the state's seed so that states with different seeds draw apart),
which is as good as an independent uniform draw for sampling. Once the sample
is full, only keys below the largest key kept (τ) can enter: one compiled pass
over the batch keys every value and keeps those below τ, without the
interpreter lock (``worker.profiling.native.sample_below``). Entering values
are buffered and the buffer is cut back to ``size`` only when it holds twice
as many.

References: E. Cohen and H. Kaplan, "Summarizing data using bottom-k sketches",
PODC 2007; G. L. Steele, D. Lea and C. H. Flood, "Fast splittable pseudorandom
number generators", OOPSLA 2014 (SplitMix64).
"""

from __future__ import annotations

import numpy as np

from worker.profiling.native import sample_below

_SEED_SHIFT = 40  # a seed's stream starts at seed * 2**40: streams never overlap


class SampleState:
    """Up to ``size`` values drawn uniformly without replacement from all values seen."""

    def __init__(self, size: int, seed: int = 0) -> None:
        self.size = size
        self.seed = seed % (1 << (64 - _SEED_SHIFT))
        self._drawn = 0  # values keyed so far
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
        start = (self.seed << _SEED_SHIFT) + self._drawn
        self._drawn += int(values.size)
        keys, entering = sample_below(start, values, self._threshold)
        self._add(keys, entering)

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
        out = SampleState(self.size, seed=self.seed * 1_000_003 + other.seed + 1)
        out._add(
            np.concatenate([self.keys, other.keys]), np.concatenate([self.values, other.values])
        )
        out._compact()
        return out
