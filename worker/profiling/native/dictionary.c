/* Dictionary codes of a text column: each distinct cell numbered in order of first
 * appearance, as Arrow's dictionary_encode numbers them (nulls get no code).
 *
 * Label columns repeat a few hundred values over thousands of rows; each cell is
 * hashed into an open-addressing table of codes (linear probing, doubled when half
 * full), and a cell whose hash meets a code's is compared byte for byte with that
 * code's first cell, so equal codes mean equal bytes. A cell of at most 16 bytes, as
 * labels mostly are, is read as two words, hashed by two multiplications and compared
 * word by word; a longer one takes the word mixing of the row hashes (hashing.h).
 */
#include <stdlib.h>

#include "hashing.h"
#include "kernels.h"

#define SEED 0x5DEECE66DULL
#define FIRST_SLOTS 1024

/* Puts code into the first free slot for hash (mask + 1 slots, -1 where free). */
static inline void place(int32_t *slots, uint64_t mask, uint64_t hash, int32_t code) {
    uint64_t at = hash & mask;
    while (slots[at] >= 0) at = (at + 1) & mask;
    slots[at] = code;
}

/* The (up to) 16 bytes of a short cell as two words, zero past its end. */
static inline void short_words(const uint8_t *p, int64_t n, const uint8_t *end, uint64_t *w0,
                               uint64_t *w1) {
    *w0 = n >= 8 || n == 0 ? 0 : load_tail(p, n, end); /* load_tail needs a byte */
    *w1 = 0;
    if (n >= 8) {
        memcpy(w0, p, 8);
        *w1 = n > 8 ? load_tail(p + 8, n - 8, end) : 0;
    }
}

static inline uint64_t short_hash(uint64_t w0, uint64_t w1, int64_t n) {
    return avalanche((w0 * PRIME1) ^ rotl(w1 * PRIME2, 29) ^ (uint64_t)n);
}

int64_t text_codes(const column_layout *c, int64_t rows, int32_t *codes, int64_t *firsts) {
    const uint8_t *end = c->data + c->data_length;
    uint64_t mask = FIRST_SLOTS - 1;
    int32_t *slots = malloc(sizeof(int32_t) * (mask + 1));
    uint64_t *hashes = malloc(sizeof(uint64_t) * (size_t)(rows > 0 ? rows : 1));
    int64_t count = 0;
    if (slots == NULL || hashes == NULL) {
        free(slots);
        free(hashes);
        return -1;
    }
    memset(slots, 0xFF, sizeof(int32_t) * (mask + 1));
    for (int64_t r = 0; r < rows; r++) {
        if (!cell_valid(c, r)) {
            codes[r] = -1;
            continue;
        }
        const int64_t start = cell_start(c, r), n = cell_start(c, r + 1) - start;
        const uint8_t *p = c->data + start;
        uint64_t w0 = 0, w1 = 0, hash;
        if (n <= 16) {
            short_words(p, n, end, &w0, &w1);
            hash = short_hash(w0, w1, n);
        } else {
            hash = avalanche(mix_cell(SEED, p, n, end, 0));
        }
        uint64_t at = hash & mask;
        int32_t code;
        for (;;) {
            code = slots[at];
            if (code < 0) break;
            if (hashes[code] == hash) {
                const int64_t first = cell_start(c, firsts[code]);
                if (cell_start(c, firsts[code] + 1) - first == n) {
                    if (n > 16) {
                        if (memcmp(c->data + first, p, (size_t)n) == 0) break;
                    } else {
                        uint64_t v0, v1;
                        short_words(c->data + first, n, end, &v0, &v1);
                        if (v0 == w0 && v1 == w1) break;
                    }
                }
            }
            at = (at + 1) & mask;
        }
        if (code < 0) {
            code = (int32_t)count++;
            hashes[code] = hash;
            firsts[code] = r;
            slots[at] = code;
            if ((uint64_t)count > (mask + 1) / 2) {
                /* Half full: twice the slots, every code placed again. */
                free(slots);
                mask = 2 * mask + 1;
                slots = malloc(sizeof(int32_t) * (mask + 1));
                if (slots == NULL) {
                    free(hashes);
                    return -1;
                }
                memset(slots, 0xFF, sizeof(int32_t) * (mask + 1));
                for (int32_t k = 0; k < (int32_t)count; k++) place(slots, mask, hashes[k], k);
            }
        }
        codes[r] = code;
    }
    free(slots);
    free(hashes);
    return count;
}
