"""Disguised missing values in a numeric column: sentinel codes and spikes of zeros.

Suppliers often write a code such as -999 or 9999 where a value is unknown.
The candidates are a configurable list of such codes plus zero. A code is
suspected when it stands apart from the bulk of the other values: outside
their far-out Tukey fences (3 × IQR; J. W. Tukey, Exploratory Data Analysis,
1977), beyond the range of the other values by at least their IQR, or negative
where every other value is at least zero; and it is a spike: its share of the
column exceeds the share of the other values within one bin width of it, so a
long tail's ordinary 999.00 is not taken for a code. Zero is suspected
when it is a spike: at least ``zero_share`` of the values are zero while
almost no other values lie within one Freedman–Diaconis bin width of zero
(D. Freedman and P. Diaconis, Z. Wahrscheinlichkeitstheorie 57, 1981). The
figures come from the exact values, or from a uniform sample above the exact
bound. Suspected values are reported, never counted as missing.
"""

from __future__ import annotations

from collections import Counter
from collections.abc import Sequence
from typing import Any

import numpy as np


class SentinelCounts:
    """Counts of each candidate code (and zero) in a column, mergeable."""

    def __init__(self, candidates: Sequence[float]) -> None:
        self.candidates = np.asarray(sorted(set(candidates) | {0.0}), dtype=np.float64)
        self.counts: Counter[float] = Counter()

    def add(self, counts: np.ndarray) -> None:
        """Add counts of each candidate (in the order of ``candidates``)."""
        for value, count in zip(self.candidates.tolist(), counts.tolist(), strict=True):
            if count:
                self.counts[value] += count

    def merge(self, other: SentinelCounts) -> SentinelCounts:
        out = SentinelCounts(self.candidates.tolist())
        out.counts = self.counts + other.counts
        return out


def suspected_sentinels(
    counts: Counter[float],
    values: np.ndarray,
    total: int,
    *,
    zero_share: float = 0.05,
    frequent: Counter[float] | None = None,
) -> list[dict[str, Any]]:
    """The candidate codes that stand apart from the bulk, with their counts in the column.

    ``values`` are the column's values (all of them, or a uniform sample) and
    ``total`` the column's non-missing count. ``frequent`` are the column's most
    frequent values with their counts: each is weighed against the bulk without
    the configured codes, one at a time.
    """
    present = {value: count for value, count in counts.items() if count}
    extra = {v: c for v, c in (frequent or {}).items() if c and v not in present}
    if not (present or extra) or values.size == 0:
        return []
    codes = np.array(sorted(present), dtype=np.float64)
    others = values[~np.isin(values, codes)]
    found: list[dict[str, Any]] = []
    if others.size < 4:
        return found
    q1, q3 = np.quantile(others, [0.25, 0.75])
    iqr = q3 - q1
    low, high = q1 - 3.0 * iqr, q3 + 3.0 * iqr
    lowest, highest = float(others.min()), float(others.max())
    all_non_negative = lowest >= 0
    integers = bool(np.array_equal(others, np.trunc(others)))
    width = 2.0 * iqr / others.size ** (1.0 / 3.0) if iqr > 0 else 0.0
    if integers:
        width = max(width, 1.0)  # whole numbers cannot come nearer than 1
    candidates = {**present, **extra}
    for code in sorted(candidates):
        count = candidates[code]
        share = count / total
        # The share of other values within one bin width of the code: a code is a
        # spike when it alone outweighs its whole neighbourhood.
        nearby = np.abs(others - code) <= width
        bottom, top, non_negative = lowest, highest, all_non_negative
        if code in extra:
            rest = others[others != code]
            if rest.size == 0:
                continue
            nearby &= others != code
            bottom, top = float(rest.min()), float(rest.max())
            non_negative = bottom >= 0
        near = np.count_nonzero(nearby) / others.size
        spike = share > near
        if code == 0.0:
            if share >= zero_share and near < 0.1 * share:
                found.append({"value": 0.0, "count": count})
            continue
        gap = max(bottom - code, code - top)
        apart = code < low or code > high or gap >= max(iqr, 1e-12)
        if spike and (apart or (code < 0 and non_negative)):
            found.append({"value": code, "count": count})
    return found
