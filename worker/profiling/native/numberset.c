/* Exact sets of distinct numbers: open addressing over float64 bit patterns.
 *
 * A column's distinct values are counted exactly until a bound (then a HyperLogLog
 * takes over); a table of their bits with linear probing takes a batch in one pass,
 * where a hash-based unique per batch and a join of the batches' uniques read every
 * value twice and allocate as they go.
 */
#include <string.h>

#include "kernels.h"

/* SplitMix64's finaliser (Steele, Lea & Flood 2014): every bit of x reaches the top bits,
 * which choose the slot. */
static inline uint64_t mix(uint64_t x) {
    x ^= x >> 30;
    x *= 0xBF58476D1CE4E5B9ULL;
    x ^= x >> 27;
    x *= 0x94D049BB133111EBULL;
    return x ^ (x >> 31);
}

int64_t number_set_add(uint64_t *restrict table, int bits, int64_t *filled,
                       const double *restrict values, int64_t count) {
    const uint64_t mask = ((uint64_t)1 << bits) - 1;
    const int64_t most = (int64_t)(mask + 1) / 2;
    int64_t used = *filled;
    int64_t i = 0;
    for (; i < count && used < most; i++) {
        double v = values[i] + 0.0; /* -0.0 and 0.0 are one number */
        if (v != v) continue;       /* NaN: missing, and never equal to the empty mark */
        uint64_t key;
        memcpy(&key, &v, 8);
        uint64_t slot = mix(key) >> (64 - bits);
        while (table[slot] != NUMBER_SET_EMPTY && table[slot] != key) slot = (slot + 1) & mask;
        if (table[slot] == NUMBER_SET_EMPTY) {
            table[slot] = key;
            used++;
        }
    }
    *filled = used;
    return i;
}
