/* One pass over a batch for the across-column sums: co-moments of the numeric
 * columns, per-label moments of each numeric column, and label-pair counts.
 *
 * The batch is taken in blocks of rows small enough to stay in cache: each block's
 * values are shifted by a center of each column, the mean of its present values in
 * the first block (so sums of squares stay small and the caller's merge into running
 * moments, Chan, Golub & LeVeque 1979, loses nothing to cancellation), then every
 * figure reads the block while it is there. The first block's mean is as good a
 * center as the batch's: by Cauchy-Schwarz it lies within sqrt((n - m) / m) standard
 * deviations of the batch mean (m of the n present values in the first block; about
 * 5 for m = 2,048 of 53,000), so the squares hold at most some 26 times the spread,
 * where cancellation costs nothing; a column with fewer than MIN_CENTER present
 * values there is centered on all of its values instead. Sums over the rows where a
 * pair of columns is present are each column's sums less what it holds in the rows
 * where the other is missing: delivered files miss few values, so that correction
 * reads few rows.
 *
 * References: Chan, Golub & LeVeque (1979), "Updating formulae and a pairwise
 * algorithm for computing sample variances"; Pébay (2008), SAND2008-6212.
 */
#include <stdlib.h>

#include "kernels.h"

#define BLOCK 2048
#define MIN_CENTER 32 /* present values in the first block to center a column on */

/* 1 for a finite value, 0 for NaN and infinities (x - x is NaN for both). */
static inline int finite(double v) { return v - v == 0.0; }

static double dot(const double *restrict a, const double *restrict b, int64_t n) {
    double s0 = 0.0, s1 = 0.0, s2 = 0.0, s3 = 0.0;
    int64_t r = 0;
    for (; r + 4 <= n; r += 4) {
        s0 += a[r] * b[r];
        s1 += a[r + 1] * b[r + 1];
        s2 += a[r + 2] * b[r + 2];
        s3 += a[r + 3] * b[r + 3];
    }
    for (; r < n; r++) s0 += a[r] * b[r];
    return (s0 + s1) + (s2 + s3);
}

/* The mean of the present values of x[0..rows), and how many there are. */
static double present_mean(const double *restrict x, int64_t rows, int64_t *count) {
    double total = 0.0;
    int64_t present = 0;
    for (int64_t r = 0; r < rows; r++) {
        int ok = finite(x[r]);
        total += ok ? x[r] : 0.0;
        present += ok;
    }
    *count = present;
    return present > 0 ? total / (double)present : 0.0;
}

static void column_shifts(const relation_input *in, double *restrict shift) {
    const int64_t head = in->rows < BLOCK ? in->rows : BLOCK;
    for (int i = 0; i < in->p; i++) {
        int64_t present;
        shift[i] = present_mean(in->x[i], head, &present);
        if (present < MIN_CENTER && head < in->rows)
            shift[i] = present_mean(in->x[i], in->rows, &present);
    }
}

/* Shifts block [start, start + rows) of every column into z (column-major, 0 where
 * missing) and lists each column's missing rows; adds the per-column sums. */
static void load_block(const relation_input *in, const relation_sums *out, int64_t start,
                       int64_t rows, double *restrict z, unsigned char *restrict ok,
                       int32_t *restrict missing, int64_t *restrict missing_count) {
    for (int i = 0; i < in->p; i++) {
        const double *restrict x = in->x[i] + start;
        double *restrict zi = z + (size_t)i * BLOCK;
        unsigned char *restrict oki = ok + (size_t)i * BLOCK;
        const double shift = out->shift[i];
        double s = 0.0, q = 0.0;
        int64_t n = 0;
        for (int64_t r = 0; r < rows; r++) {
            int present = finite(x[r]);
            double v = present ? x[r] - shift : 0.0;
            zi[r] = v;
            oki[r] = (unsigned char)present;
            s += v;
            q += v * v;
            n += present;
        }
        out->s[i] += s;
        out->q[i] += q;
        out->n[i] += n;
        int32_t *restrict list = missing + (size_t)i * BLOCK;
        int64_t count = 0;
        for (int64_t r = 0; r < rows; r++) {
            list[count] = (int32_t)r;
            count += !oki[r];
        }
        missing_count[i] = count;
    }
}

static void pair_sums(const relation_input *in, const relation_sums *out, int64_t rows,
                      const double *restrict z, const unsigned char *restrict ok,
                      const int32_t *restrict missing, const int64_t *restrict missing_count) {
    const int p = in->p;
    for (int i = 0; i < p; i++)
        for (int j = i + 1; j < p; j++)
            out->cross[(size_t)i * p + j] += dot(z + (size_t)i * BLOCK, z + (size_t)j * BLOCK, rows);
    for (int j = 0; j < p; j++) {
        const int32_t *restrict list = missing + (size_t)j * BLOCK;
        for (int i = 0; i < p; i++) {
            if (i == j) continue;
            const double *restrict zi = z + (size_t)i * BLOCK;
            const unsigned char *restrict oki = ok + (size_t)i * BLOCK;
            double s = 0.0, q = 0.0;
            int64_t n = 0;
            for (int64_t m = 0; m < missing_count[j]; m++) {
                double v = zi[list[m]];
                s += v;
                q += v * v;
                n += oki[list[m]];
            }
            size_t at = (size_t)i * p + j;
            out->lost_n[at] += n;
            out->lost_s[at] += s;
            out->lost_q[at] += q;
        }
    }
}

/* Per-label sums: the block's values row by row (zr, row-major) added to each label's
 * row. The counts are not kept per value: each label's rows are counted (labels) and
 * the numeric column's missing rows with that label taken off afterwards (gn). */
static void group_sums(const relation_input *in, const relation_sums *out, int64_t start,
                       int64_t rows, const double *restrict z, double *restrict zr,
                       int64_t *restrict labels, const int32_t *restrict missing,
                       const int64_t *restrict missing_count) {
    const int p = in->p;
    for (int i = 0; i < p; i++)
        for (int64_t r = 0; r < rows; r++) zr[(size_t)r * p + i] = z[(size_t)i * BLOCK + r];
    for (int l = 0; l < in->k; l++) {
        const int64_t *restrict codes = in->codes[l] + start;
        const int64_t size = in->sizes[l], base = in->bases[l];
        for (int64_t r = 0; r < rows; r++) {
            int64_t code = codes[r];
            if (code < 0 || code >= size) continue;
            labels[base + code]++;
            size_t at = (size_t)(base + code) * p;
            double *restrict gs = out->gs + at, *restrict gq = out->gq + at;
            const double *restrict v = zr + (size_t)r * p;
            for (int i = 0; i < p; i++) {
                gs[i] += v[i];
                gq[i] += v[i] * v[i];
            }
        }
        for (int j = 0; j < p; j++) {
            const int32_t *restrict list = missing + (size_t)j * BLOCK;
            for (int64_t m = 0; m < missing_count[j]; m++) {
                int64_t code = codes[list[m]];
                if (code >= 0 && code < size) out->gn[(size_t)(base + code) * p + j]--;
            }
        }
    }
}

static void pair_counts(const relation_input *in, const relation_sums *out, int64_t start,
                        int64_t rows) {
    int pair = 0;
    for (int a = 0; a < in->k; a++) {
        const int64_t *restrict ca = in->codes[a] + start;
        for (int b = a + 1; b < in->k; b++, pair++) {
            const int64_t *restrict cb = in->codes[b] + start;
            const int64_t size_a = in->sizes[a], size_b = in->sizes[b];
            int64_t *restrict table = out->tables + in->pair_offsets[pair];
            for (int64_t r = 0; r < rows; r++)
                if (ca[r] >= 0 && cb[r] >= 0 && ca[r] < size_a && cb[r] < size_b)
                    table[ca[r] * size_b + cb[r]]++;
        }
    }
}

int relation_batch(const relation_input *in, relation_sums *out) {
    const size_t width = (size_t)(in->p > 0 ? in->p : 1);
    double *z = malloc(sizeof(double) * width * BLOCK);
    double *zr = malloc(sizeof(double) * width * BLOCK);
    unsigned char *ok = malloc(width * BLOCK);
    int64_t label_count = in->k > 0 ? in->bases[in->k - 1] + in->sizes[in->k - 1] : 0;
    int64_t *labels = calloc((size_t)(label_count > 0 ? label_count : 1), sizeof(int64_t));
    int32_t *missing = malloc(sizeof(int32_t) * width * BLOCK);
    int64_t *missing_count = malloc(sizeof(int64_t) * width);
    int status = -1;
    if (z && zr && ok && labels && missing && missing_count) {
        column_shifts(in, out->shift);
        for (int64_t start = 0; start < in->rows; start += BLOCK) {
            int64_t rows = in->rows - start < BLOCK ? in->rows - start : BLOCK;
            load_block(in, out, start, rows, z, ok, missing, missing_count);
            pair_sums(in, out, rows, z, ok, missing, missing_count);
            if (in->k > 0 && in->p > 0)
                group_sums(in, out, start, rows, z, zr, labels, missing, missing_count);
            pair_counts(in, out, start, rows);
        }
        /* Each label's rows, less (already taken off) its rows missing the column. */
        for (int64_t label = 0; label < label_count; label++)
            for (int i = 0; i < in->p; i++) out->gn[(size_t)label * in->p + i] += labels[label];
        status = 0;
    }
    free(z);
    free(zr);
    free(ok);
    free(labels);
    free(missing);
    free(missing_count);
    return status;
}
