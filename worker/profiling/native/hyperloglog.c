/* HyperLogLog register updates: each hash's top bits choose a register, which keeps
 * the largest rank (trailing zeros + 1 of the hash, capped) seen.
 *
 * References: Flajolet, Fusy, Gandouet & Meunier (2007), "HyperLogLog: the analysis
 * of a near-optimal cardinality estimation algorithm", AofA.
 */
#include <string.h>

#include "kernels.h"

static inline void take(uint8_t *restrict registers, int precision, int cap, uint64_t h) {
    int rank = h ? __builtin_ctzll(h) + 1 : 65;
    rank = rank < cap ? rank : cap;
    uint8_t *slot = registers + (h >> (64 - precision));
    if (rank > *slot) *slot = (uint8_t)rank;
}

void hll_add(uint8_t *restrict registers, int precision, const uint64_t *restrict hashes,
             int64_t count) {
    const int cap = 64 - precision + 1;
    for (int64_t i = 0; i < count; i++) take(registers, precision, cap, hashes[i]);
}

void hll_add_numbers(uint8_t *restrict registers, int precision, const double *restrict values,
                     int64_t count, uint64_t seed) {
    const int cap = 64 - precision + 1;
    for (int64_t i = 0; i < count; i++) {
        double v = values[i] + 0.0; /* -0.0 and 0.0 are one number */
        if (v != v) continue;       /* NaN: missing */
        uint64_t h;
        memcpy(&h, &v, 8);
        /* SplitMix64's finaliser (Steele, Lea & Flood 2014), as numbers are hashed
         * everywhere else (worker.profiling.columns.distinct.hash_numbers). */
        h ^= seed;
        h ^= h >> 30;
        h *= 0xBF58476D1CE4E5B9ULL;
        h ^= h >> 27;
        h *= 0x94D049BB133111EBULL;
        h ^= h >> 31;
        take(registers, precision, cap, h);
    }
}
