"""Label counts of a categorical or boolean column, exact while few, then a frequent-items summary.

Each batch is counted by Arrow (``value_counts``, vectorised); batch counts
add into the state. While the number of distinct labels stays within
``exact_bound`` the counts are exact. Above it the state keeps the
``summary_size`` most frequent labels as a Misra–Gries summary: after adding,
the (k+1)-th largest count is subtracted from every counter and counters at or
below zero are dropped, so each kept count is a lower bound at most
``count_error`` below the truth. This summary is mergeable.

References: J. Misra and D. Gries, "Finding repeated elements", Science of
Computer Programming 2 (1982); P. K. Agarwal et al., "Mergeable summaries",
PODS 2012.
"""

from __future__ import annotations

import math
import re
import unicodedata
from collections import Counter
from collections.abc import Mapping
from typing import Any

import numpy as np
import pyarrow as pa
import pyarrow.compute as pc

_PUNCTUATION = re.compile(r"[\W_]+", re.UNICODE)


def fold_label(label: str) -> str:
    """A label folded for comparison: case, accents of width, punctuation and spacing removed."""
    text = unicodedata.normalize("NFKC", label).casefold()
    return " ".join(_PUNCTUATION.sub(" ", text).split())


class LabelState:
    """Counts per label (exact, or a Misra–Gries summary above ``exact_bound`` labels)."""

    def __init__(self, exact_bound: int = 10_000, summary_size: int = 1_000) -> None:
        self.exact_bound = exact_bound
        self.summary_size = summary_size
        self.counts: Counter[str] = Counter()
        self.n = 0
        self.count_error = 0

    @property
    def exact(self) -> bool:
        return self.count_error == 0

    def update(self, labels: pa.Array) -> list[str] | None:
        """Count the non-null labels of one batch.

        Returns every label counted so far when this batch turned the exact counts
        into a summary (so a distinct count can start from them), else None.
        """
        present = labels.drop_null() if labels.null_count else labels
        if len(present) == 0:
            return None
        return self.update_counts(pc.value_counts(present))

    def update_counts(self, counted: pa.StructArray) -> list[str] | None:
        """Add one batch's label counts (Arrow ``value_counts`` of its non-null labels);
        returns as ``update`` does."""
        if len(counted) == 0:
            return None
        was_exact = self.exact
        values = counted.field("values")
        counts = counted.field("counts").to_numpy()
        self.n += int(counts.sum())
        if len(counts) > self.exact_bound:
            # Prune the batch alone first, so a batch of many distinct labels never
            # becomes a Python loop per label.
            keep, floor = _top_indexes(counts, self.summary_size)
            self.count_error += floor
            counts = counts[keep] - floor
            values = values.take(pa.array(keep))
        self.counts.update(dict(zip(values.to_pylist(), counts.tolist(), strict=True)))
        seen = list(self.counts) if was_exact else None
        self._prune()
        return seen if was_exact and not self.exact else None

    def _prune(self) -> None:
        if len(self.counts) <= self.exact_bound:
            return
        ordered = sorted(self.counts.values(), reverse=True)
        floor = ordered[self.summary_size] if len(ordered) > self.summary_size else 0
        self.count_error += floor
        self.counts = Counter({k: c - floor for k, c in self.counts.items() if c > floor})

    def merge(self, other: LabelState) -> LabelState:
        out = LabelState(self.exact_bound, self.summary_size)
        out.counts = self.counts + other.counts
        out.n = self.n + other.n
        out.count_error = self.count_error + other.count_error
        out._prune()
        return out

    def folded_values(self) -> set[str]:
        return {fold_label(value) for value in self.counts}

    def finalize(
        self,
        *,
        top: int = 20,
        rare_share: float = 0.01,
        synonyms: Mapping[str, str] | None = None,
    ) -> dict[str, Any]:
        """Top labels with shares, entropy, imbalance ratio, rare labels and variants.

        ``entropy`` is Shannon's, in bits (Shannon 1948), with ``entropy_normalized``
        dividing it by log2 of the number of labels. ``imbalance_ratio`` is the count of
        the most frequent label divided by the count of the least frequent one, the
        "IR" of the class-imbalance literature (e.g. A. Orriols-Puig and
        E. Bernadó-Mansilla, Soft Computing 13, 2009; definition recalled from memory).
        Both are None once the counts are a summary.
        """
        n = self.n
        ordered = sorted(self.counts.items(), key=lambda kv: (-kv[1], kv[0]))
        top_items = [
            {"value": value, "count": count, "share": count / n if n else None}
            for value, count in ordered[:top]
        ]
        entropy = entropy_normalized = imbalance = None
        if self.exact and n:
            shares = np.array([c for _, c in ordered], dtype=np.float64) / n
            entropy = float(-(shares * np.log2(shares)).sum())
            entropy_normalized = entropy / math.log2(len(shares)) if len(shares) > 1 else 0.0
            imbalance = ordered[0][1] / ordered[-1][1]
        rare = [
            {"value": value, "count": count, "share": count / n}
            for value, count in reversed(ordered)
            if n and count / n < rare_share
        ]
        return {
            "top": top_items,
            "other_count": n - sum(item["count"] for item in top_items),
            "labels": len(ordered) if self.exact else None,
            "entropy": entropy,
            "entropy_normalized": entropy_normalized,
            "imbalance_ratio": imbalance,
            "rare": rare[:50],
            "rare_count": len(rare) if self.exact else None,
            "variants": label_variants(ordered, synonyms or {}),
            "exact": self.exact,
            "count_error": self.count_error,
        }


def label_variants(
    ordered: list[tuple[str, int]], synonyms: Mapping[str, str], limit: int = 20
) -> list[list[str]]:
    """Groups of raw labels that are equal after folding (and declared synonyms)."""
    aliases = {fold_label(alias): fold_label(canonical) for alias, canonical in synonyms.items()}
    groups: dict[str, list[str]] = {}
    for value, _count in ordered:
        key = fold_label(value)
        key = aliases.get(key, key)
        groups.setdefault(key, []).append(value)
    found = [members for members in groups.values() if len(members) > 1]
    return found[:limit]


def _top_indexes(counts: np.ndarray, k: int) -> tuple[np.ndarray, int]:
    """Indexes of counts above the (k+1)-th largest, and that count (Misra–Gries step)."""
    if len(counts) <= k:
        return np.arange(len(counts)), 0
    floor = int(np.partition(counts, len(counts) - k - 1)[len(counts) - k - 1])
    return np.flatnonzero(counts > floor), floor
