/* Text checks: decimal numbers parsed only where the result is exact to the bit, the
 * ASCII test of a column's bytes (bytes_are_ascii), and two counts over a column's
 * cells that spare Arrow calls over every cell (padded_cells, number_leads; at the end).
 *
 * A cell is [+-]digits[.digits][(e|E)[+-]digits], with a digit on at least one side
 * of the point and nothing before or after. Its digits (at most 19 once leading zeros
 * are dropped) give an integer w and the point and exponent a power q; when w is at
 * most 2^53 and |q| at most 22, w and 10^|q| are exact doubles and one IEEE
 * multiplication or division rounds w * 10^q correctly (Clinger's fast path). A cell
 * of at most eight bytes made of digits and one point, the usual case, has its digits
 * read eight at a time in one 64-bit word (Lemire's multiply-and-shift). Any other
 * cell stops the pass, and the caller parses the column the general way, so what this
 * pass returns is always what a correctly rounding parser gives.
 *
 * References: Clinger (1990), "How to read floating point numbers accurately",
 * PLDI '90; Lemire (2021), "Number parsing at a gigabyte per second", Software:
 * Practice and Experience 51(8).
 */
#include <stddef.h>
#include <string.h>

#include "kernels.h"

static const double POWERS[23] = {1e0,  1e1,  1e2,  1e3,  1e4,  1e5,  1e6,  1e7,
                                  1e8,  1e9,  1e10, 1e11, 1e12, 1e13, 1e14, 1e15,
                                  1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22};

static inline double scaled(uint64_t w, int q, int negative) {
    double value = (double)w;
    if (w != 0) value = q >= 0 ? value * POWERS[q] : value / POWERS[-q];
    return negative ? -value : value;
}

/* The value of eight ASCII digits, the first in the lowest byte (Lemire 2021). */
static inline uint64_t eight_digits(uint64_t word) {
    word -= 0x3030303030303030ULL;
    word = (word * 10) + (word >> 8);
    word = (((word & 0x000000FF000000FFULL) * 0x000F424000000064ULL) +
            (((word >> 16) & 0x000000FF000000FFULL) * 0x0000271000000001ULL)) >>
           32;
    return word;
}

/* A cell of 1 to 8 bytes that is digits with at most one point (and a digit), read
 * from one word; 0 when it is anything else. */
static inline int parse_short(const uint8_t *p, int64_t n, const uint8_t *end, double *out) {
    int negative = 0;
    if (*p == '-' || *p == '+') {
        negative = *p == '-';
        p++;
        n--;
    }
    if (n <= 0) return 0;
    uint64_t word = 0;
    if (p + 8 <= end)
        memcpy(&word, p, 8);
    else
        memcpy(&word, p, (size_t)n);
    const uint64_t used = n == 8 ? ~0ULL : (1ULL << (8 * n)) - 1;
    /* The point's byte, if any: a zero byte of word ^ "........" within the cell. */
    uint64_t x = (word ^ 0x2E2E2E2E2E2E2E2EULL) & used;
    uint64_t zero = (x - 0x0101010101010101ULL) & ~x & 0x8080808080808080ULL & used;
    int point = -1;
    if (zero) {
        point = __builtin_ctzll(zero) / 8;
        if (zero & (zero - 1)) return 0; /* two points */
        if (n == 1) return 0;            /* a point alone */
        /* Take the point out: the bytes above it move down one. */
        uint64_t low = point ? word & ((1ULL << (8 * point)) - 1) : 0;
        uint64_t high = point + 1 < 8 ? word >> (8 * (point + 1)) : 0;
        word = low | (high << (8 * point));
        n--;
    }
    /* Every remaining byte a digit: no byte below '0' or above '9'. */
    const uint64_t digits_used = n == 8 ? ~0ULL : (1ULL << (8 * n)) - 1;
    uint64_t below = (word & digits_used) - (0x3030303030303030ULL & digits_used);
    uint64_t above = (word & digits_used) + (0x4646464646464646ULL & digits_used);
    if (((below | above) & 0x8080808080808080ULL & digits_used) != 0) return 0;
    /* Pad on the left with '0' digits to eight: shift the digits to the top bytes. */
    word = (word << (8 * (8 - n))) | (0x3030303030303030ULL & ~(~0ULL << (8 * (8 - n))));
    uint64_t w = eight_digits(word);
    int q = point < 0 ? 0 : -(int)(n - point);
    *out = scaled(w, q, negative);
    return 1;
}

/* Any cell of the grammar by one pass over its bytes; 0 outside it or the fast path. */
static inline int parse_long(const uint8_t *p, const uint8_t *end, double *out) {
    int negative = 0;
    if (p < end && (*p == '+' || *p == '-')) negative = *p++ == '-';
    uint64_t w = 0;
    int digits = 0, seen = 0, q = 0;
    for (; p < end && *p >= '0' && *p <= '9'; p++, seen++) {
        if (w == 0 && *p == '0') continue; /* leading zeros count for nothing */
        if (++digits > 19) return 0;
        w = w * 10 + (uint64_t)(*p - '0');
    }
    if (p < end && *p == '.') {
        for (p++; p < end && *p >= '0' && *p <= '9'; p++, seen++) {
            q--;
            if (w == 0 && *p == '0') continue;
            if (++digits > 19) return 0;
            w = w * 10 + (uint64_t)(*p - '0');
        }
    }
    if (seen == 0) return 0;
    if (p < end && (*p == 'e' || *p == 'E')) {
        p++;
        int exponent_negative = 0, exponent = 0, exponent_digits = 0;
        if (p < end && (*p == '+' || *p == '-')) exponent_negative = *p++ == '-';
        for (; p < end && *p >= '0' && *p <= '9'; p++, exponent_digits++) {
            if (exponent > 1000) return 0;
            exponent = exponent * 10 + (*p - '0');
        }
        if (exponent_digits == 0) return 0;
        q += exponent_negative ? -exponent : exponent;
    }
    if (p != end || w > (1ULL << 53)) return 0;
    if (w != 0 && (q > 22 || q < -22)) return 0;
    *out = scaled(w, q, negative);
    return 1;
}

int64_t parse_decimals(const column_layout *c, int64_t rows, double *out) {
    const int32_t *o32 = c->offset_bits == 32 ? (const int32_t *)c->offsets : NULL;
    const int64_t *o64 = c->offset_bits == 64 ? (const int64_t *)c->offsets : NULL;
    const uint8_t *end = c->data + c->data_length;
    const double nan = __builtin_nan("");
    for (int64_t r = 0; r < rows; r++) {
        if (c->validity != NULL) {
            int64_t bit = c->validity_offset + r;
            if (!((c->validity[bit >> 3] >> (bit & 7)) & 1)) {
                out[r] = nan;
                continue;
            }
        }
        int64_t start = o32 ? o32[r] : o64[r], stop = o32 ? o32[r + 1] : o64[r + 1];
        const uint8_t *p = c->data + start;
        int64_t n = stop - start;
        if (n >= 1 && n <= 8 && parse_short(p, n, end, &out[r])) continue;
        if (!parse_long(p, p + n, &out[r])) return r;
    }
    return rows;
}

VECTOR_CLONES
int bytes_are_ascii(const uint8_t *restrict data, int64_t length) {
    /* Eight lanes of 64-bit words ORed together, checked every 4 KB so a file of
     * other text stops early. */
    int64_t i = 0;
    while (i + 4096 <= length) {
        uint64_t seen = 0;
        for (int64_t end = i + 4096; i < end; i += 8) {
            uint64_t word;
            memcpy(&word, data + i, 8);
            seen |= word;
        }
        if (seen & 0x8080808080808080ULL) return 0;
    }
    uint8_t tail = 0;
    for (; i < length; i++) tail |= data[i];
    return (tail & 0x80) == 0;
}

static inline int is_space(uint8_t b) { return b == ' ' || (b >= '\t' && b <= '\r'); }

int64_t padded_cells(const column_layout *c, int64_t rows) {
    int64_t count = 0;
    for (int64_t r = 0; r < rows; r++) {
        const int64_t start = cell_start(c, r), stop = cell_start(c, r + 1);
        if (stop > start && cell_valid(c, r))
            count += is_space(c->data[start]) | is_space(c->data[stop - 1]);
    }
    return count;
}

int64_t number_leads(const column_layout *c, int64_t rows) {
    int64_t count = 0;
    for (int64_t r = 0; r < rows; r++) {
        if (!cell_valid(c, r)) continue;
        const uint8_t *p = c->data + cell_start(c, r), *end = c->data + cell_start(c, r + 1);
        while (p < end && is_space(*p)) p++;
        if (p < end && (*p == '+' || *p == '-')) p++;
        if (p < end && (*p == '.' || *p == ',')) p++;
        count += p < end && *p >= '0' && *p <= '9';
    }
    return count;
}
