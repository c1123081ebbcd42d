"""Which columns tend to be missing in the same rows.

Per batch the rows that miss something are grouped by which columns they miss
(delivered files show few such patterns), and a product of the few patterns
weighted by their counts gives, for every pair of columns, how many rows miss
both; with the per-column missing counts and the
row count that is the whole 2×2 table of the two masks, so the state is a
p×p integer matrix and merging is addition. The strength of the tendency is
the phi coefficient of the two masks (Pearson r of two 0/1 variables) and
their Jaccard index (rows missing both over rows missing either).

References: Yule (1912), "On the methods of measuring association between two
attributes" (phi); Jaccard (1912), "The distribution of the flora in the
alpine zone".
"""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

import numpy as np


class MissingTogether:
    """Counts of rows missing both columns, for every pair of ``columns``."""

    def __init__(self, columns: list[str]) -> None:
        self.columns = list(columns)
        self.rows = 0
        self.both = np.zeros((len(self.columns),) * 2, dtype=np.int64)

    def update(self, missing: Mapping[str, np.ndarray]) -> None:
        if not self.columns:
            return
        masks = [np.asarray(missing[name]) for name in self.columns]
        self.rows += len(masks[0])
        # Only the columns and rows missing something add to a count: the product
        # runs over those.
        gaps = [i for i, mask in enumerate(masks) if mask.any()]
        if not gaps:
            return
        gapped = masks[gaps[0]].copy()
        for i in gaps[1:]:
            gapped |= masks[i]
        rows = np.flatnonzero(gapped)
        self.both[np.ix_(gaps, gaps)] += _pair_counts([masks[i][rows] for i in gaps])

    def merge(self, other: MissingTogether) -> MissingTogether:
        if other.columns != self.columns:
            raise ValueError("missing-together states over different columns cannot be merged")
        merged = MissingTogether(self.columns)
        merged.rows = self.rows + other.rows
        merged.both = self.both + other.both
        return merged

    def finalize(self, min_phi: float) -> list[dict[str, Any]]:
        """Pairs missing together at least once with phi ≥ ``min_phi``, strongest first."""
        out = []
        n = self.rows
        miss = np.diag(self.both)
        for i, a in enumerate(self.columns):
            for j in range(i + 1, len(self.columns)):
                both = int(self.both[i, j])
                if both == 0:
                    continue
                ma, mb = int(miss[i]), int(miss[j])
                denominator = float(ma) * (n - ma) * mb * (n - mb)
                if denominator <= 0:
                    continue  # a column missing everywhere (or nowhere) says nothing here
                phi = (both * n - ma * mb) / np.sqrt(denominator)
                if phi < min_phi:
                    continue
                out.append(
                    {
                        "a": a,
                        "b": self.columns[j],
                        "both": both,
                        "a_missing": ma,
                        "b_missing": mb,
                        "phi": float(phi),
                        "jaccard": both / (ma + mb - both),
                    }
                )
        out.sort(key=lambda item: (-item["phi"], item["a"], item["b"]))
        return out


def _pair_counts(masks: list[np.ndarray]) -> np.ndarray:
    """[i, j]: rows where both masks i and j are set (the masks over the same rows).

    Up to 64 columns each row's pattern is one 64-bit word: the distinct words and
    their counts make the product small and integer, so no BLAS threads wake for
    it; wider tables take one float product of the masks.
    """
    if len(masks) > 64:
        # float32 sums of ones are exact below 2**24 rows; larger batches take float64.
        width = np.float32 if masks[0].size < 2**24 else np.float64
        m = np.column_stack(masks).astype(width)
        return np.rint(m.T @ m).astype(np.int64)
    words = np.zeros(masks[0].size, dtype=np.uint64)
    for bit, mask in enumerate(masks):
        words |= mask.astype(np.uint64) << np.uint64(bit)
    patterns, counts = np.unique(words, return_counts=True)
    bits = (patterns[:, None] >> np.arange(len(masks), dtype=np.uint64)) & np.uint64(1)
    bits = bits.astype(np.int64)
    return (bits * counts[:, None]).T @ bits
