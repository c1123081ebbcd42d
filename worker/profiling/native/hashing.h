/* The word mixing of XXH64 for the passes that hash cells (rowhash.c, dictionary.c).
 *
 * References: Collet, "xxHash: extremely fast hash algorithm", XXH64 specification
 * (https://github.com/Cyan4973/xxHash/blob/dev/doc/xxhash_spec.md).
 */
#ifndef TIDEWAITER_HASHING_H
#define TIDEWAITER_HASHING_H

#include <stdint.h>
#include <string.h>

#define PRIME1 0x9E3779B185EBCA87ULL
#define PRIME2 0xC2B2AE3D27D4EB4FULL
#define PRIME3 0x165667B19E3779F9ULL
#define PRIME4 0x85EBCA77C2B2AE63ULL

static inline uint64_t rotl(uint64_t x, int r) { return (x << r) | (x >> (64 - r)); }

static inline uint64_t round_word(uint64_t h, uint64_t word) {
    h ^= rotl(word * PRIME2, 31) * PRIME1;
    return rotl(h, 27) * PRIME1 + PRIME4;
}

static inline uint64_t avalanche(uint64_t h) {
    h ^= h >> 33;
    h *= PRIME2;
    h ^= h >> 29;
    h *= PRIME3;
    h ^= h >> 32;
    return h;
}

/* The n < 8 bytes at p as the low bytes of a word; reads a whole word when it can. */
static inline uint64_t load_tail(const uint8_t *p, int64_t n, const uint8_t *end) {
    uint64_t word = 0;
    if (p + 8 <= end) {
        memcpy(&word, p, 8);
        return word & (~0ULL >> (64 - 8 * n));
    }
    memcpy(&word, p, (size_t)n);
    return word;
}

/* Mixes one cell into the row's hash, in words xored with the column's seed. A cell
 * of at most 7 bytes is one word: its bytes, and its length in the top byte (0 to 7).
 * A longer cell is a word of its length with the top byte 0x80, then its bytes eight
 * at a time. A null is the word of all ones (``mix_null``). No two cells of a column
 * give the same sequence of words. */
static inline uint64_t mix_cell(uint64_t h, const uint8_t *p, int64_t n, const uint8_t *end,
                                uint64_t seed) {
    if (n < 8) return round_word(h, seed ^ (n > 0 ? load_tail(p, n, end) : 0) ^ ((uint64_t)n << 56));
    h = round_word(h, seed ^ (uint64_t)n ^ (0x80ULL << 56));
    while (n >= 8) {
        uint64_t word;
        memcpy(&word, p, 8);
        h = round_word(h, seed ^ word);
        p += 8;
        n -= 8;
    }
    if (n > 0) h = round_word(h, seed ^ load_tail(p, n, end));
    return h;
}

#endif
