"""Figures of a numeric column: moments, quantiles, outliers, histogram, density and box.

Moments come from ``MomentsState`` (exact, mergeable); order statistics come
from ``QuantileState`` (exact up to the bound, a uniform sample above it).
Above the bound the quantiles, the counts of outliers and histogram bars, the
median absolute deviation and the density are estimated from that sample;
``exact`` says which and ``rank_error`` how far a rank may be off.

References: J. W. Tukey, Exploratory Data Analysis (1977) for the fences at
1.5 × IQR and the far-out fences at 3 × IQR; B. Iglewicz and D. C. Hoaglin,
How to Detect and Handle Outliers (1993) for the modified z-score
0.6745 (x − median) / MAD above 3.5; D. Freedman and P. Diaconis (1981) for
the bin width 2 IQR n^(-1/3); D. W. Scott, Multivariate Density Estimation
(1992) for the kernel bandwidth rule.
"""

from __future__ import annotations

import math
from collections import Counter
from typing import Any

import numpy as np

from worker.profiling.columns.moments import MomentsState
from worker.profiling.columns.quantiles import QuantileState
from worker.profiling.columns.sentinels import SentinelCounts, suspected_sentinels
from worker.profiling.native import number_summary
from worker.profiling.options import ProfileOptions

_PERCENTILES = np.linspace(0.0, 1.0, 101)
_MODIFIED_Z = 0.6745  # the 0.75 quantile of the standard normal, as Iglewicz & Hoaglin use it


class NumericState:
    """Everything the numeric section of a column needs, mergeable batch by batch."""

    def __init__(self, options: ProfileOptions) -> None:
        self.options = options
        self.moments = MomentsState()
        self.quantiles = QuantileState(options.exact_bound, options.sample_size)
        self.sentinels = SentinelCounts(options.sentinel_values)
        self.zeros = 0
        self.negatives = 0
        self.integers = True

    def update(self, numbers: np.ndarray) -> None:
        """Add one batch's parsed numbers (NaN where missing or not a number)."""
        summary = number_summary(numbers, self.sentinels.candidates)
        if summary.n == 0:
            return
        self.moments.add(summary)
        self.quantiles.update(summary.values)
        self.zeros += summary.zeros
        self.negatives += summary.negatives
        self.integers = self.integers and summary.integers
        self.sentinels.add(summary.candidate_counts)

    def merge(self, other: NumericState) -> NumericState:
        out = NumericState(self.options)
        out.moments = self.moments.merge(other.moments)
        out.quantiles = self.quantiles.merge(other.quantiles)
        out.sentinels = self.sentinels.merge(other.sentinels)
        out.zeros = self.zeros + other.zeros
        out.negatives = self.negatives + other.negatives
        out.integers = self.integers and other.integers
        return out

    def sample_values(self) -> np.ndarray:
        """The exact values, or the uniform sample above the bound; sorted."""
        return self.quantiles.sorted_sample()

    def finalize(self) -> tuple[dict[str, Any], list[dict[str, Any]]]:
        """The numeric section of the profile and the suspected sentinels."""
        out = self.moments.finalize()
        n = self.moments.n
        exact = self.quantiles.exact
        out.update(
            {
                "zeros": self.zeros,
                "negatives": self.negatives,
                "integers": self.integers if n else None,
                "exact": exact,
                "rank_error": self.quantiles.rank_error,
            }
        )
        if n == 0:
            out.update(_empty_order_statistics())
            return out, []
        percentiles = self.quantiles.quantiles(_PERCENTILES)
        percentiles[0], percentiles[-1] = self.moments.minimum, self.moments.maximum
        q1, median, q3 = (float(v) for v in self.quantiles.quantiles([0.25, 0.5, 0.75]))
        iqr = q3 - q1
        values = self.sample_values()
        mad = float(np.median(np.abs(values - median)))
        out.update(
            {
                "q1": q1,
                "median": median,
                "q3": q3,
                "iqr": iqr,
                "mad": mad,
                "percentiles": [float(v) for v in percentiles],
            }
        )
        out["outliers"] = self._outliers(q1, q3, iqr, median, mad, values)
        out["box"] = self._box(q1, median, q3, iqr)
        out["histogram"] = self._histogram(iqr)
        out["density"] = _density(values, self.options.kde_sample_size, self.options.kde_points)
        sentinels = suspected_sentinels(
            self.sentinels.counts,
            values,
            n,
            zero_share=self.options.zero_spike_share,
            frequent=frequent_values(values) if exact else None,
        )
        return out, sentinels

    def _count_outside(self, low: float, high: float) -> tuple[int, int]:
        below = self.quantiles.count_below([low], inclusive=False)[0]
        at_or_below = self.quantiles.count_below([high], inclusive=True)[0]
        return int(below), int(self.moments.n - at_or_below)

    def _outliers(
        self, q1: float, q3: float, iqr: float, median: float, mad: float, values: np.ndarray
    ) -> dict[str, Any]:
        low, high = q1 - 1.5 * iqr, q3 + 1.5 * iqr
        far_low, far_high = q1 - 3.0 * iqr, q3 + 3.0 * iqr
        tukey_low, tukey_high = self._count_outside(low, high)
        far_below, far_above = self._count_outside(far_low, far_high)
        modified_z = None
        z_fences = None
        if mad > 0:
            reach = 3.5 * mad / _MODIFIED_Z
            z_fences = [median - reach, median + reach]
            z_low, z_high = self._count_outside(*z_fences)
            modified_z = z_low + z_high
        examples = sorted(
            {float(v) for v in values[:5] if v < low} | {float(v) for v in values[-5:] if v > high}
        )
        return {
            "tukey_low": tukey_low,
            "tukey_high": tukey_high,
            "tukey_far": far_below + far_above,
            "modified_z": modified_z,
            "fences": {"low": low, "high": high, "far_low": far_low, "far_high": far_high},
            "modified_z_fences": z_fences,
            "examples": examples,
        }

    def _box(self, q1: float, median: float, q3: float, iqr: float) -> dict[str, Any]:
        """Whiskers are the most extreme values within the 1.5 × IQR fences (Tukey 1977)."""
        low, high = q1 - 1.5 * iqr, q3 + 1.5 * iqr
        if self.quantiles.exact:
            values = self.quantiles.sorted_values()
            whisker_low = float(values[np.searchsorted(values, low, side="left")])
            whisker_high = float(values[np.searchsorted(values, high, side="right") - 1])
        else:
            whisker_low = max(self.moments.minimum, low)
            whisker_high = min(self.moments.maximum, high)
        return {
            "q1": q1,
            "median": median,
            "q3": q3,
            "whisker_low": whisker_low,
            "whisker_high": whisker_high,
        }

    def _histogram(self, iqr: float) -> dict[str, Any]:
        """Freedman–Diaconis bins (width 2 IQR n^(-1/3)), as numpy's "fd" rule counts them,
        capped at ``histogram_max_bins``; Sturges' rule when the IQR is zero."""
        cap = self.options.histogram_max_bins
        n = self.moments.n
        low, high = self.moments.minimum, self.moments.maximum
        width = 2.0 * iqr / n ** (1.0 / 3.0) if iqr > 0 else 0.0
        span = high - low
        bins = 1 + math.ceil(math.log2(n)) if n > 1 else 1
        if width > 0 and math.isfinite(span / width):
            bins = max(1, math.ceil(span / width))
        bins = min(bins, cap)
        if span > 0:
            edges = np.linspace(low, high, bins + 1)
            if not np.all(np.diff(edges) > 0):  # a span too small to split
                edges = np.array([low, high])
        else:
            edges = np.array([low - 0.5, high + 0.5])
        if self.quantiles.exact:
            counts, _ = np.histogram(self.quantiles.sorted_values(), bins=edges)
        else:
            below = self.quantiles.count_below(edges[1:-1], inclusive=False)
            cumulative = np.concatenate([[0], below, [n]])
            counts = np.maximum(np.diff(cumulative), 0)
        return {"edges": [float(e) for e in edges], "counts": [int(c) for c in counts]}


def frequent_values(ordered: np.ndarray, top: int = 5) -> Counter[float]:
    """The most frequent values of sorted numbers with their counts (run lengths), so
    codes outside the configured list, such as -1, are weighed as sentinels too."""
    if ordered.size == 0:
        return Counter()
    starts = np.flatnonzero(np.concatenate([[True], ordered[1:] != ordered[:-1]]))
    counts = np.diff(np.concatenate([starts, [ordered.size]]))
    chosen = np.argsort(counts, kind="stable")[-top:]
    return Counter({float(ordered[starts[i]]): int(counts[i]) for i in chosen if counts[i] > 1})


def _density(values: np.ndarray, sample_size: int, points: int) -> dict[str, Any] | None:
    """A Gaussian kernel density with Scott's bandwidth, on an even grid from min to max.

    The kernel's standard deviation is n^(-1/5) times the sample's (Scott 1992,
    for one dimension), the estimate the mean of the kernels at each grid point:
    what ``scipy.stats.gaussian_kde(values, bw_method="scott")`` gives, in numpy
    without loading scipy.stats.
    """
    if values.size < 2 or values[0] == values[-1]:
        return None
    if values.size > sample_size:
        chosen = np.random.default_rng(0).choice(values.size, sample_size, replace=False)
        values = values[chosen]
    spread = float(np.std(values, ddof=1))
    bandwidth = values.size ** (-1.0 / 5.0) * spread
    if not bandwidth > 0:
        return None
    grid = np.linspace(float(values.min()), float(values.max()), points)
    density = np.empty(points)
    step = max(1, 2_000_000 // values.size)  # grid points per block: a few MB at a time
    for start in range(0, points, step):
        scaled = (grid[start : start + step, None] - values[None, :]) / bandwidth
        density[start : start + step] = np.exp(-0.5 * scaled * scaled).sum(axis=1)
    density /= values.size * bandwidth * math.sqrt(2.0 * math.pi)
    return {
        "x": [float(v) for v in grid],
        "y": [float(v) for v in density],
        "bandwidth": bandwidth,
    }


def _empty_order_statistics() -> dict[str, Any]:
    return {
        "q1": None,
        "median": None,
        "q3": None,
        "iqr": None,
        "mad": None,
        "percentiles": None,
        "outliers": None,
        "box": None,
        "histogram": None,
        "density": None,
    }
