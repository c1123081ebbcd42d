"""Distances between two distributions known only from their stored summaries.

A numeric column is known by its 101 percentiles (0 %, 1 %, ..., 100 %); a
label column by its label counts. Raw files may have been purged, so drift is
computed from these alone.
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np


def percentile_cdf(
    percentiles: Sequence[float], x: np.ndarray, *, left: bool = False
) -> np.ndarray:
    """The cumulative distribution read off stored percentiles, at points ``x``.

    Between two stored percentiles the distribution is taken as uniform (the
    cumulative share grows linearly), which is exact for Hyndman & Fan type 7
    quantiles of a continuous sample. A value held by many rows appears as a
    run of equal percentiles: there the function jumps. ``left=True`` gives
    the limit from the left, F(x-), needed to see the jump's lower end.
    """
    values = np.asarray(percentiles, dtype=float)
    shares = np.linspace(0.0, 1.0, len(values))
    unique, first = np.unique(values, return_index=True)
    last = np.searchsorted(values, unique, side="right") - 1
    low, high = shares[first], shares[last]  # F just below and at each distinct value
    x = np.asarray(x, dtype=float)
    i = np.searchsorted(unique, x, side="right") - 1  # largest distinct value <= x
    inside = (i >= 0) & (i < len(unique) - 1)
    j = np.clip(i, 0, len(unique) - 1)
    k = np.clip(i + 1, 0, len(unique) - 1)
    span = np.where(inside, unique[k] - unique[j], 1.0)
    between = high[j] + (low[k] - high[j]) * np.where(inside, (x - unique[j]) / span, 0.0)
    on_knot = (i >= 0) & (x == unique[j])
    result = np.where(i < 0, 0.0, np.where(i >= len(unique) - 1, 1.0, between))
    return np.where(on_knot, low[j] if left else high[j], result)


def psi(expected: Sequence[float], actual: Sequence[float], *, floor: float = 1e-4) -> float:
    """Population stability index: Σ (actual - expected) · ln(actual / expected) over bins.

    Shares below ``floor`` (empty bins) are raised to ``floor`` so the
    logarithm stays finite; the shares are not renormalised afterwards, so a
    bin empty on one side adds about (share - floor) · ln(share / floor).

    References: Yurdakul (2018), Statistical properties of population stability
    index, Western Michigan University dissertation (definition and the usual
    0.1 / 0.25 reading of its value; recalled from memory).
    """
    e = np.maximum(np.asarray(expected, dtype=float), floor)
    a = np.maximum(np.asarray(actual, dtype=float), floor)
    return float(np.sum((a - e) * np.log(a / e)))


def decile_psi(
    baseline: Sequence[float], target: Sequence[float], *, floor: float = 1e-4
) -> tuple[float, list[float], list[float], list[float]]:
    """PSI of a numeric column on the baseline's deciles, from both sides' stored percentiles.

    The bins are cut at the baseline's 10th, 20th, ..., 90th percentiles (equal
    cut points from a value held by many rows are merged); each side's share
    per bin is read off its own percentiles. Returns the PSI, the edges and
    both sides' shares.
    """
    base = np.asarray(baseline, dtype=float)
    steps = len(base) - 1
    edges = np.unique(base[[round(steps * k / 10) for k in range(1, 10)]])

    def shares(percentiles: Sequence[float]) -> np.ndarray:
        cumulative = np.concatenate([[0.0], percentile_cdf(percentiles, edges), [1.0]])
        return np.clip(np.diff(cumulative), 0.0, 1.0)

    expected, actual = shares(base), shares(target)
    return psi(expected, actual, floor=floor), edges.tolist(), expected.tolist(), actual.tolist()


def ks_from_percentiles(baseline: Sequence[float], target: Sequence[float]) -> float:
    """Kolmogorov-Smirnov distance sup |F_b - F_t| between two percentile summaries.

    Both cumulative functions are linear between their stored points, so the
    largest gap lies at one of those points (from the right or the left).
    The error against the raw samples is at most about one percentile step
    (0.01) on each side, plus the sample's own rounding.

    References: Smirnov (1948), Table for estimating the goodness of fit of
    empirical distributions, Annals of Mathematical Statistics 19:279-281.
    """
    points = np.union1d(np.asarray(baseline, float), np.asarray(target, float))
    gaps = [
        np.abs(percentile_cdf(baseline, points) - percentile_cdf(target, points)),
        np.abs(
            percentile_cdf(baseline, points, left=True) - percentile_cdf(target, points, left=True)
        ),
    ]
    return float(max(g.max() for g in gaps))


def ks_exact(baseline: Sequence[float], target: Sequence[float]) -> float:
    """Kolmogorov-Smirnov distance sup |F_b - F_t| between two samples' empirical functions."""
    x, y = np.sort(np.asarray(baseline, float)), np.sort(np.asarray(target, float))
    points = np.concatenate([x, y])
    fx = np.searchsorted(x, points, side="right") / len(x)
    fy = np.searchsorted(y, points, side="right") / len(y)
    return float(np.abs(fx - fy).max())


def ks_p_value(statistic: float, n_baseline: int, n_target: int) -> float | None:
    """Approximate p-value of the two-sample KS statistic.

    The one-sample distribution of the statistic for n = n_b·n_t / (n_b + n_t)
    rows (scipy.stats.kstwo), the usual approximation for two large samples.

    References: Smirnov (1948); Simard & L'Ecuyer (2011), Computing the
    two-sided Kolmogorov-Smirnov distribution, Journal of Statistical Software 39(11).
    """
    if n_baseline <= 0 or n_target <= 0:
        return None
    effective = n_baseline * n_target / (n_baseline + n_target)
    from scipy import stats  # loaded when needed (slow to import)

    return float(stats.kstwo.sf(statistic, max(1, round(effective))))


def js_distance(p: Sequence[float], q: Sequence[float]) -> float:
    """Jensen-Shannon distance, base 2 (0 for equal distributions, 1 for disjoint ones).

    The square root of the Jensen-Shannon divergence, the mean Kullback-Leibler
    divergence of each distribution from their average.

    References: Lin (1991), Divergence measures based on the Shannon entropy,
    IEEE Transactions on Information Theory 37:145-151; Endres & Schindelin
    (2003), A new metric for probability distributions, IEEE TIT 49:1858-1860.
    """
    p = np.asarray(p, dtype=float)
    q = np.asarray(q, dtype=float)
    p, q = p / p.sum(), q / q.sum()
    m = (p + q) / 2

    def kl(a: np.ndarray) -> float:
        mask = a > 0
        return float(np.sum(a[mask] * np.log2(a[mask] / m[mask])))

    return float(np.sqrt(max(0.0, (kl(p) + kl(q)) / 2)))


SMALL_SAMPLE = 51
"""Largest sample whose sorted values can be read back from its 101 percentiles."""


def values_from_percentiles(percentiles: Sequence[float], n: int) -> np.ndarray | None:
    """The sorted sample behind 101 type-7 percentiles, when it has at most 51 values.

    Type-7 quantiles are linear in p between p = i/(n-1) and (i+1)/(n-1),
    ending at the order statistics x[i] and x[i+1]. With n <= 51 each such
    piece holds at least two of the percentiles p = k/100, which fix the line
    and so its ends. The result is checked by recomputing the percentiles
    with numpy; None when they do not match (a sketch, or another n).

    References: Hyndman & Fan (1996), Sample quantiles in statistical
    packages, The American Statistician 50:361-365 (definition 7).
    """
    q = np.asarray(percentiles, dtype=float)
    if not 2 <= n <= SMALL_SAMPLE or len(q) != 101 or not np.all(np.isfinite(q)):
        return None
    values = np.empty(n)
    values[0], values[-1] = q[0], q[-1]
    for i in range(1, n - 1):
        # the percentile grid inside the piece just left of the knot p = i/(n-1)
        low = int(np.ceil(100 * (i - 1) / (n - 1) - 1e-9))
        high = int(np.floor(100 * i / (n - 1) + 1e-9))
        if 100 * i % (n - 1) == 0:
            values[i] = q[100 * i // (n - 1)]
            continue
        k1, k2 = high - 1, high
        if k1 < low:
            return None
        h1, h2 = k1 * (n - 1) / 100, k2 * (n - 1) / 100
        values[i] = q[k2] + (q[k2] - q[k1]) * (i - h2) / (h2 - h1)
    scale = max(1.0, float(np.abs(q).max()))
    recomputed = np.percentile(values, np.arange(101))
    if not np.allclose(recomputed, q, rtol=0, atol=1e-9 * scale):
        return None
    return values
