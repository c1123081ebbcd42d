/* The engine's compiled per-batch passes: plain C over raw buffers, no Python.
 *
 * module.c parses Python arguments into these buffers and calls the passes with
 * the interpreter lock released, so both cores can run them beside the reader.
 */
#ifndef TIDEWAITER_KERNELS_H
#define TIDEWAITER_KERNELS_H

#include <stddef.h>
#include <stdint.h>

/* On x86-64 with GCC, a second build of a pass for AVX2, chosen at load time where
 * the processor has it: loops written in independent lanes then run as vector
 * instructions, and other processors run the baseline build. */
#if defined(__x86_64__) && defined(__GNUC__) && !defined(__clang__)
#define VECTOR_CLONES __attribute__((target_clones("avx2", "default")))
#else
#define VECTOR_CLONES
#endif

/* One column of a batch as Arrow lays it out.
 * Text: offsets (32 or 64 bit, already moved to the array's first row) into data.
 * Fixed width: width bytes per row in data, from the array's first row.
 * validity: Arrow's bitmap (bit validity_offset + row), or NULL when no row is null. */
typedef struct {
    const uint8_t *validity;
    int64_t validity_offset;
    const void *offsets;
    int offset_bits; /* 32 or 64 for text, 0 for fixed width */
    const uint8_t *data;
    int64_t data_length;
    int64_t width;
} column_layout;

/* 1 when row's cell is not null (every cell is when there is no bitmap). */
static inline int cell_valid(const column_layout *c, int64_t row) {
    if (c->validity == NULL) return 1;
    int64_t bit = c->validity_offset + row;
    return (c->validity[bit >> 3] >> (bit & 7)) & 1;
}

/* Where row's cell starts in a text column's data (row + 1: where it ends). */
static inline int64_t cell_start(const column_layout *c, int64_t row) {
    return c->offset_bits == 32 ? ((const int32_t *)c->offsets)[row]
                                : ((const int64_t *)c->offsets)[row];
}

/* Mixes one column's cells into the running row hashes h[0..rows). */
void row_hash_column(uint64_t *h, int64_t rows, const column_layout *column, uint64_t seed);

/* Ends the row hashes (a final avalanche, so every input bit reaches every output bit). */
void row_hash_finish(uint64_t *h, int64_t rows);

/* Groups count hashes by their top bits (1 <= bits <= 8): slice v is sorted[bounds[v] ..
 * bounds[v + 1]), the hashes of that slice in row order, positions[i] the row of
 * sorted[i]; bounds holds 2^bits + 1 entries. */
void partition_by_top_bits(const uint64_t *hashes, int64_t count, int bits, uint64_t *sorted,
                           uint32_t *positions, int64_t *bounds);

/* keys.c. keys[i] = SplitMix64 of row number start + i (plus seed): a uniform 64-bit key per row
 * that does not depend on how the table was cut into batches (Steele, Lea & Flood 2014). */
void row_keys(int64_t start, int64_t count, uint64_t seed, uint64_t *keys);

/* Gives value i the key u = SplitMix64(start + i) / 2^64 (53 bits, uniform in [0, 1))
 * and keeps, in order, the values whose key is below threshold with their keys; returns
 * how many. Each value enters independently with probability threshold. */
int64_t sample_below(uint64_t start, const double *values, int64_t count, double threshold,
                     double *keys, double *kept);

/* Sums of one batch for the co-moments of p numeric columns and the per-label moments.
 *
 * x[i][r] is column i's value in row r, NaN (or any non-finite value) where missing.
 * shift[i] receives a center of column i: the mean of its present values in the first
 * 2,048 rows (in all rows when fewer than 32 are present there); every sum below is over
 * z = x - shift, 0 where missing.
 * Per column i, over the rows where it is present: n[i], s[i] = sum z_i, q[i] = sum
 * z_i^2. Per ordered pair (i, j), over the rows where i is present and j missing:
 * lost_n[i*p+j], lost_s[i*p+j] = sum z_i, lost_q[i*p+j] = sum z_i^2. Over all rows:
 * cross[i*p+j] = sum z_i z_j for i < j.
 * For each of k label columns, codes[l][r] is the row's label (-1 where missing) and
 * label c's entries start at bases[l] + c: gn, gs and gq (one row of p per label) get
 * the count, sum z and sum z^2 of each numeric column present in the rows with that label.
 * For each pair of label columns (a < b, in order), tables[pair_offsets[pair] +
 * codes[a][r] * sizes[b] + codes[b][r]] counts the rows where both are present.
 * Codes at or past their column's size are skipped. */
typedef struct {
    int64_t rows;
    int p;
    const double *const *x;
    int k;
    const int64_t *const *codes;
    const int64_t *bases;
    const int64_t *sizes;
    const int64_t *pair_offsets;
} relation_input;

typedef struct {
    double *shift;
    int64_t *n;
    double *s, *q, *cross;
    int64_t *lost_n;
    double *lost_s, *lost_q;
    int64_t *gn;
    double *gs, *gq;
    int64_t *tables;
} relation_sums;

/* Returns 0, or -1 when memory for p scratch values could not be had. */
int relation_batch(const relation_input *in, relation_sums *out);

/* Dictionary codes of a text column (dictionary.c): codes[r] is the number of row r's
 * cell among the distinct cells in order of first appearance (-1 for a null), and
 * firsts[code] the first row holding that cell. Returns how many distinct cells, or
 * -1 when memory for the table could not be had. */
int64_t text_codes(const column_layout *c, int64_t rows, int32_t *codes, int64_t *firsts);

/* The summary of one numeric column's batch (numbers.c). */
typedef struct {
    int64_t n, zeros, negatives, integers; /* integers: 1 when every value is whole */
    double total, minimum, maximum, mean, m2, m3, m4; /* m_k: sums of (x - mean)^k */
    int64_t *candidate_counts;                          /* one per candidate, added to */
} number_summary;

/* Copies the finite values of x[0..rows) to kept (in order) and summarises them;
 * returns how many were kept. The candidates must be sorted ascending. */
int64_t number_batch(const double *x, int64_t rows, const double *candidates,
                     int64_t candidate_count, double *kept, number_summary *out);

/* Adds count hashes to 2^precision HyperLogLog registers (4 <= precision <= 24). */
void hll_add(uint8_t *registers, int precision, const uint64_t *hashes, int64_t count);

/* Adds count float64 values (NaN skipped) to the registers, each hashed by SplitMix64's
 * finaliser over its bits xored with seed. */
void hll_add_numbers(uint8_t *registers, int precision, const double *values, int64_t count,
                     uint64_t seed);

/* numberset.c. An exact set of float64 values: table has 2^bits slots (1 <= bits <= 40),
 * NUMBER_SET_EMPTY in the free ones (a NaN pattern: NaN values are never added), and
 * *filled of them in use. Adds values from the first on (NaN skipped, -0.0 as 0.0) until
 * all are in or half the slots are used; updates *filled and returns how many values it
 * went through, so the caller grows the table and adds the rest. */
#define NUMBER_SET_EMPTY 0xFFF8DEADBEEF5E7FULL
int64_t number_set_add(uint64_t *table, int bits, int64_t *filled, const double *values,
                       int64_t count);

/* Parses each text cell of a column as a decimal number into out (NaN for a null);
 * returns rows, or the first row it cannot parse exactly (parse.c), where it stops. */
int64_t parse_decimals(const column_layout *column, int64_t rows, double *out);

/* 1 when every byte of data is below 128 (ASCII text, hence valid UTF-8). */
int bytes_are_ascii(const uint8_t *data, int64_t length);

/* Of a text column's cells that are not null: how many start or end with ASCII
 * whitespace (space, tab, line feed, vertical tab, form feed, carriage return). */
int64_t padded_cells(const column_layout *c, int64_t rows);

/* Of a text column's cells that are not null: how many start, after ASCII whitespace,
 * with a digit, perhaps after a sign and then a decimal mark ('.' or ','). */
int64_t number_leads(const column_layout *c, int64_t rows);

#endif
