/* 64-bit row hashes over a batch's raw cells, one column at a time.
 *
 * A row's hash takes each cell in turn as one or more words (its length and bytes, see
 * mix_cell: "1" and "1.0" differ, a null differs from an empty text, and the column's
 * seed in every word makes swapping two columns' cells change the hash), with the
 * rounds and the final avalanche of XXH64. Every round is invertible in the running hash, so two rows
 * that differ collide only by chance, about one in 2^64 per pair.
 * Going column by column reads each column's buffers in order, and the row hashes
 * (8 bytes a row) stay in the second-level cache for a batch of some 50,000 rows.
 * partition_by_top_bits then groups a batch's hashes by their top bits, a counting
 * sort, for the duplicate count's slices.
 *
 * References: Collet, "xxHash: extremely fast hash algorithm", XXH64 specification
 * (https://github.com/Cyan4973/xxHash/blob/dev/doc/xxhash_spec.md).
 */
#include "hashing.h"
#include "kernels.h"

/* A null cell: the word of all ones (top byte 0xFF, which no cell's first word has). */
static inline uint64_t mix_null(uint64_t h, uint64_t seed) { return round_word(h, ~seed); }

void row_hash_column(uint64_t *h, int64_t rows, const column_layout *c, uint64_t seed) {
    const uint8_t *end = c->data + c->data_length;
    if (c->offset_bits == 32) {
        const int32_t *offsets = (const int32_t *)c->offsets;
        for (int64_t r = 0; r < rows; r++)
            h[r] = cell_valid(c, r) ? mix_cell(h[r], c->data + offsets[r],
                                             offsets[r + 1] - offsets[r], end, seed)
                                  : mix_null(h[r], seed);
    } else if (c->offset_bits == 64) {
        const int64_t *offsets = (const int64_t *)c->offsets;
        for (int64_t r = 0; r < rows; r++)
            h[r] = cell_valid(c, r) ? mix_cell(h[r], c->data + offsets[r],
                                             offsets[r + 1] - offsets[r], end, seed)
                                  : mix_null(h[r], seed);
    } else {
        for (int64_t r = 0; r < rows; r++)
            h[r] = cell_valid(c, r) ? mix_cell(h[r], c->data + r * c->width, c->width, end, seed)
                                  : mix_null(h[r], seed);
    }
}

void row_hash_finish(uint64_t *h, int64_t rows) {
    for (int64_t r = 0; r < rows; r++) h[r] = avalanche(h[r]);
}

void partition_by_top_bits(const uint64_t *restrict hashes, int64_t count, int bits,
                           uint64_t *restrict sorted, uint32_t *restrict positions,
                           int64_t *restrict bounds) {
    const int64_t slices = (int64_t)1 << bits;
    const int shift = 64 - bits;
    for (int64_t v = 0; v <= slices; v++) bounds[v] = 0;
    for (int64_t i = 0; i < count; i++) bounds[(hashes[i] >> shift) + 1]++;
    for (int64_t v = 0; v < slices; v++) bounds[v + 1] += bounds[v];
    /* A counting sort: each slice's next free place, rows in order within it. */
    int64_t next[1 << 8];
    for (int64_t v = 0; v < slices; v++) next[v] = bounds[v];
    for (int64_t i = 0; i < count; i++) {
        int64_t at = next[hashes[i] >> shift]++;
        sorted[at] = hashes[i];
        positions[at] = (uint32_t)i;
    }
}
