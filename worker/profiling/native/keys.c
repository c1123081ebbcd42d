/* Pseudo-random keys for uniform samples, from SplitMix64 of a counter.
 *
 * A row's key depends on its row number alone (so it does not depend on how the
 * table was cut into batches), and a numeric sample's key on the value's place in
 * the state's stream; SplitMix64's finaliser is a bijection of 64-bit integers whose
 * outputs pass the usual tests of uniformity, so keys never tie and filtering them by
 * a threshold lets each value in with that probability.
 *
 * References: Steele, Lea & Flood (2014), "Fast splittable pseudorandom number
 * generators", OOPSLA.
 */
#include "kernels.h"

static inline uint64_t splitmix(uint64_t z) {
    z = z * 0x9E3779B97F4A7C15ULL + 0x9E3779B97F4A7C15ULL;
    z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9ULL;
    z = (z ^ (z >> 27)) * 0x94D049BB133111EBULL;
    return z ^ (z >> 31);
}

void row_keys(int64_t start, int64_t count, uint64_t seed, uint64_t *restrict keys) {
    for (int64_t i = 0; i < count; i++) keys[i] = splitmix((uint64_t)(start + i) + seed);
}

int64_t sample_below(uint64_t start, const double *restrict values, int64_t count,
                     double threshold, double *restrict keys, double *restrict kept) {
    int64_t m = 0;
    for (int64_t i = 0; i < count; i++) {
        double key = (double)(splitmix(start + (uint64_t)i) >> 11) * 0x1.0p-53;
        keys[m] = key;
        kept[m] = values[i];
        m += key < threshold;
    }
    return m;
}
