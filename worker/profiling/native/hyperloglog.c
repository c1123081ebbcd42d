/* HyperLogLog register updates: each hash's top bits choose a register, which keeps
 * the largest rank (trailing zeros + 1 of the hash, capped) seen.
 *
 * References: Flajolet, Fusy, Gandouet & Meunier (2007), "HyperLogLog: the analysis
 * of a near-optimal cardinality estimation algorithm", AofA.
 */
#include "kernels.h"

void hll_add(uint8_t *restrict registers, int precision, const uint64_t *restrict hashes,
             int64_t count) {
    const int cap = 64 - precision + 1;
    for (int64_t i = 0; i < count; i++) {
        uint64_t h = hashes[i];
        int rank = h ? __builtin_ctzll(h) + 1 : 65;
        rank = rank < cap ? rank : cap;
        uint8_t *slot = registers + (h >> (64 - precision));
        if (rank > *slot) *slot = (uint8_t)rank;
    }
}
