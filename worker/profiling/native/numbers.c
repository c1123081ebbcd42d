/* One numeric column of a batch: its present values and their summary in two passes.
 *
 * The finite values are kept first (NaN marks a missing or unparsed cell); then,
 * over the kept values while they are in cache, come the sum, extremes and counts
 * (zeros, negatives, whole numbers, each sentinel candidate, found by binary search
 * in the sorted candidates) and the central moments about the mean, itself corrected
 * by the mean deviation (the "corrected two-pass algorithm"), which keeps the
 * accuracy a sum of squares loses on data such as NIST's NumAcc sets.
 *
 * References: Chan, Golub & LeVeque (1983), "Algorithms for computing the sample
 * variance: analysis and recommendations", The American Statistician 37(3).
 */
#include <math.h>

#include "kernels.h"

#define LANES 4
#define FEW_CANDIDATES 16 /* up to this many, one pass per candidate */

/* The first of the k sorted candidates that is not below v (k when none). */
static inline int64_t lower_bound(const double *restrict candidates, int64_t k, double v) {
    int64_t low = 0, high = k;
    while (low < high) {
        int64_t middle = (low + high) / 2;
        if (candidates[middle] < v)
            low = middle + 1;
        else
            high = middle;
    }
    return low;
}

/* Adds each candidate's count among the kept values. Zero's count is the zeros. A few
 * candidates are counted one at a time with a comparison of every value (no branch
 * to mispredict, and the loop vectorises); a long list is searched value by value, and
 * a value nearer zero than every other candidate is none of them and skips the search. */
VECTOR_CLONES
static void count_candidates(const double *restrict kept, int64_t n,
                             const double *restrict candidates, int64_t k, int64_t zeros,
                             int64_t *restrict counts) {
    double nearest = INFINITY;
    for (int64_t c = 0; c < k; c++) {
        if (candidates[c] == 0.0) counts[c] += zeros;
        else if (fabs(candidates[c]) < nearest) nearest = fabs(candidates[c]);
    }
    if (k <= FEW_CANDIDATES) {
        for (int64_t c = 0; c < k; c++) {
            const double candidate = candidates[c];
            if (candidate == 0.0) continue;
            int64_t count = 0;
            for (int64_t i = 0; i < n; i++) count += kept[i] == candidate;
            counts[c] += count;
        }
        return;
    }
    for (int64_t i = 0; i < n; i++) {
        double v = kept[i];
        if (fabs(v) < nearest) continue;
        int64_t at = lower_bound(candidates, k, v);
        if (at < k && candidates[at] == v) counts[at]++;
    }
}

VECTOR_CLONES
int64_t number_batch(const double *restrict x, int64_t rows, const double *restrict candidates,
                     int64_t k, double *restrict kept, number_summary *out) {
    int64_t n = 0;
    for (int64_t r = 0; r < rows; r++) {
        kept[n] = x[r];
        n += x[r] - x[r] == 0.0; /* 0 for NaN and infinities */
    }
    int64_t zeros = 0, negatives = 0, fractions = 0;
    /* Four lanes of every sum and extreme, so the additions do not wait on each other. */
    double sum[LANES] = {0}, low[LANES], high[LANES];
    for (int l = 0; l < LANES; l++) {
        low[l] = INFINITY;
        high[l] = -INFINITY;
    }
    int64_t i = 0;
    for (; i + LANES <= n; i += LANES)
        for (int l = 0; l < LANES; l++) {
            double v = kept[i + l];
            sum[l] += v;
            fractions += v != trunc(v);
            zeros += v == 0.0;
            negatives += v < 0.0;
            low[l] = v < low[l] ? v : low[l];
            high[l] = v > high[l] ? v : high[l];
        }
    for (; i < n; i++) {
        double v = kept[i];
        sum[0] += v;
        fractions += v != trunc(v);
        zeros += v == 0.0;
        negatives += v < 0.0;
        low[0] = v < low[0] ? v : low[0];
        high[0] = v > high[0] ? v : high[0];
    }
    double minimum = INFINITY, maximum = -INFINITY;
    for (int l = 0; l < LANES; l++) {
        minimum = low[l] < minimum ? low[l] : minimum;
        maximum = high[l] > maximum ? high[l] : maximum;
    }
    if (k > 0) count_candidates(kept, n, candidates, k, zeros, out->candidate_counts);
    out->n = n;
    out->zeros = zeros;
    out->negatives = negatives;
    out->integers = fractions == 0;
    out->total = (sum[0] + sum[1]) + (sum[2] + sum[3]);
    out->minimum = minimum;
    out->maximum = maximum;
    out->mean = out->m2 = out->m3 = out->m4 = 0.0;
    if (n == 0) return 0;
    double mean = out->total / (double)n, correction[LANES] = {0};
    for (i = 0; i + LANES <= n; i += LANES)
        for (int l = 0; l < LANES; l++) correction[l] += kept[i + l] - mean;
    for (; i < n; i++) correction[0] += kept[i] - mean;
    mean += ((correction[0] + correction[1]) + (correction[2] + correction[3])) / (double)n;
    double m2[LANES] = {0}, m3[LANES] = {0}, m4[LANES] = {0};
    for (i = 0; i + LANES <= n; i += LANES)
        for (int l = 0; l < LANES; l++) {
            double d = kept[i + l] - mean, d2 = d * d;
            m2[l] += d2;
            m3[l] += d2 * d;
            m4[l] += d2 * d2;
        }
    for (; i < n; i++) {
        double d = kept[i] - mean, d2 = d * d;
        m2[0] += d2;
        m3[0] += d2 * d;
        m4[0] += d2 * d2;
    }
    out->mean = mean;
    out->m2 = (m2[0] + m2[1]) + (m2[2] + m2[3]);
    out->m3 = (m3[0] + m3[1]) + (m3[2] + m3[3]);
    out->m4 = (m4[0] + m4[1]) + (m4[2] + m4[3]);
    return n;
}
