/* Python bindings of the compiled passes (kernels.h): argument checks, then the
 * pass itself with the interpreter lock released.
 *
 * Every array comes in through the buffer protocol (numpy arrays, Arrow buffers)
 * and outputs are buffers the caller allocated, so this file needs no numpy or
 * Arrow headers. Sizes are checked here so a wrong call raises instead of
 * reading or writing outside a buffer.
 */
#define PY_SSIZE_T_CLEAN
#include <Python.h>
#include <string.h>

#include "kernels.h"

/* A buffer of at least `need` bytes, writable when asked; 0 with an exception set if not. */
static int get_buffer(PyObject *obj, Py_buffer *view, Py_ssize_t need, int writable,
                      const char *what) {
    int flags = writable ? PyBUF_WRITABLE | PyBUF_C_CONTIGUOUS : PyBUF_C_CONTIGUOUS;
    if (PyObject_GetBuffer(obj, view, flags) != 0) return 0;
    if (view->len < need) {
        PyErr_Format(PyExc_ValueError, "%s holds %zd bytes, %zd needed", what, view->len, need);
        PyBuffer_Release(view);
        return 0;
    }
    return 1;
}

/* A column's buffers, held while a pass reads them. */
typedef struct {
    Py_buffer validity, offsets, data;
    column_layout layout;
} held_column;

static void release_column(held_column *held) {
    if (held->data.obj != NULL) PyBuffer_Release(&held->data);
    if (held->offsets.obj != NULL) PyBuffer_Release(&held->offsets);
    if (held->validity.obj != NULL) PyBuffer_Release(&held->validity);
}

/* Takes and checks one column's buffers; 0 with an exception set (nothing held) if bad. */
static int hold_column(held_column *held, Py_ssize_t rows, PyObject *validity_obj,
                       Py_ssize_t validity_offset, PyObject *offsets_obj, int offset_bits,
                       PyObject *data_obj, Py_ssize_t width) {
    memset(held, 0, sizeof(*held));
    if (rows < 0 || validity_offset < 0 || width < 0 ||
        (offset_bits != 0 && offset_bits != 32 && offset_bits != 64)) {
        PyErr_SetString(PyExc_ValueError, "bad column layout");
        return 0;
    }
    int has_validity = validity_obj != Py_None, has_offsets = offset_bits != 0;
    int ok = !has_validity || get_buffer(validity_obj, &held->validity,
                                         (validity_offset + rows + 7) / 8, 0, "validity");
    ok = ok && (!has_offsets || get_buffer(offsets_obj, &held->offsets,
                                           (rows + 1) * (offset_bits / 8), 0, "offsets"));
    ok = ok && get_buffer(data_obj, &held->data, has_offsets ? 0 : rows * width, 0, "data");
    if (ok && has_offsets && rows > 0) {
        /* Every cell must lie inside the data buffer: offsets ascend, so the ends tell. */
        int64_t first, last;
        if (offset_bits == 32) {
            first = ((const int32_t *)held->offsets.buf)[0];
            last = ((const int32_t *)held->offsets.buf)[rows];
        } else {
            first = ((const int64_t *)held->offsets.buf)[0];
            last = ((const int64_t *)held->offsets.buf)[rows];
        }
        if (first < 0 || last < first || last > held->data.len) {
            PyErr_SetString(PyExc_ValueError, "offsets point outside the data");
            ok = 0;
        }
    }
    if (!ok) {
        release_column(held);
        return 0;
    }
    held->layout = (column_layout){
        .validity = has_validity ? held->validity.buf : NULL,
        .validity_offset = validity_offset,
        .offsets = has_offsets ? held->offsets.buf : NULL,
        .offset_bits = offset_bits,
        .data = held->data.buf,
        .data_length = held->data.len,
        .width = width,
    };
    return 1;
}

static PyObject *hash_column(PyObject *self, PyObject *args) {
    (void)self;
    PyObject *out_obj, *validity_obj, *offsets_obj, *data_obj;
    Py_ssize_t rows, validity_offset, width;
    int offset_bits;
    unsigned long long seed;
    if (!PyArg_ParseTuple(args, "OnOnOiOnK", &out_obj, &rows, &validity_obj, &validity_offset,
                          &offsets_obj, &offset_bits, &data_obj, &width, &seed))
        return NULL;
    Py_buffer out;
    if (!get_buffer(out_obj, &out, rows * 8, 1, "the row hashes")) return NULL;
    held_column held;
    if (!hold_column(&held, rows, validity_obj, validity_offset, offsets_obj, offset_bits,
                     data_obj, width)) {
        PyBuffer_Release(&out);
        return NULL;
    }
    Py_BEGIN_ALLOW_THREADS
    row_hash_column(out.buf, rows, &held.layout, seed);
    Py_END_ALLOW_THREADS
    release_column(&held);
    PyBuffer_Release(&out);
    Py_RETURN_NONE;
}

static PyObject *parse_decimals_of(PyObject *self, PyObject *args) {
    (void)self;
    PyObject *out_obj, *validity_obj, *offsets_obj, *data_obj;
    Py_ssize_t rows, validity_offset;
    int offset_bits;
    if (!PyArg_ParseTuple(args, "OnOnOiO", &out_obj, &rows, &validity_obj, &validity_offset,
                          &offsets_obj, &offset_bits, &data_obj))
        return NULL;
    if (offset_bits == 0) {
        PyErr_SetString(PyExc_ValueError, "decimals are parsed from text");
        return NULL;
    }
    Py_buffer out;
    if (!get_buffer(out_obj, &out, rows * 8, 1, "the numbers")) return NULL;
    held_column held;
    if (!hold_column(&held, rows, validity_obj, validity_offset, offsets_obj, offset_bits,
                     data_obj, 0)) {
        PyBuffer_Release(&out);
        return NULL;
    }
    int64_t parsed;
    Py_BEGIN_ALLOW_THREADS
    parsed = parse_decimals(&held.layout, rows, out.buf);
    Py_END_ALLOW_THREADS
    release_column(&held);
    PyBuffer_Release(&out);
    return PyLong_FromLongLong(parsed);
}

static PyObject *text_codes_of(PyObject *self, PyObject *args) {
    (void)self;
    PyObject *codes_obj, *firsts_obj, *validity_obj, *offsets_obj, *data_obj;
    Py_ssize_t rows, validity_offset;
    int offset_bits;
    if (!PyArg_ParseTuple(args, "OOnOnOiO", &codes_obj, &firsts_obj, &rows, &validity_obj,
                          &validity_offset, &offsets_obj, &offset_bits, &data_obj))
        return NULL;
    if (offset_bits == 0 || rows > INT32_MAX) {
        PyErr_SetString(PyExc_ValueError, "codes are taken of text, fewer than 2**31 rows");
        return NULL;
    }
    Py_buffer codes, firsts = {0};
    if (!get_buffer(codes_obj, &codes, rows * 4, 1, "the codes")) return NULL;
    if (!get_buffer(firsts_obj, &firsts, rows * 8, 1, "the first rows")) {
        PyBuffer_Release(&codes);
        return NULL;
    }
    held_column held;
    if (!hold_column(&held, rows, validity_obj, validity_offset, offsets_obj, offset_bits,
                     data_obj, 0)) {
        PyBuffer_Release(&firsts);
        PyBuffer_Release(&codes);
        return NULL;
    }
    int64_t count;
    Py_BEGIN_ALLOW_THREADS
    count = text_codes(&held.layout, rows, codes.buf, firsts.buf);
    Py_END_ALLOW_THREADS
    release_column(&held);
    PyBuffer_Release(&firsts);
    PyBuffer_Release(&codes);
    if (count < 0) return PyErr_NoMemory();
    return PyLong_FromLongLong(count);
}

/* One count over a text column's cells (padded_cells, number_leads). */
static PyObject *count_cells(PyObject *args, int64_t (*pass)(const column_layout *, int64_t)) {
    PyObject *validity_obj, *offsets_obj, *data_obj;
    Py_ssize_t rows, validity_offset;
    int offset_bits;
    if (!PyArg_ParseTuple(args, "nOnOiO", &rows, &validity_obj, &validity_offset, &offsets_obj,
                          &offset_bits, &data_obj))
        return NULL;
    if (offset_bits == 0) {
        PyErr_SetString(PyExc_ValueError, "cells are counted in text");
        return NULL;
    }
    held_column held;
    if (!hold_column(&held, rows, validity_obj, validity_offset, offsets_obj, offset_bits,
                     data_obj, 0))
        return NULL;
    int64_t count;
    Py_BEGIN_ALLOW_THREADS
    count = pass(&held.layout, rows);
    Py_END_ALLOW_THREADS
    release_column(&held);
    return PyLong_FromLongLong(count);
}

static PyObject *padded_cells_of(PyObject *self, PyObject *args) {
    (void)self;
    return count_cells(args, padded_cells);
}

static PyObject *number_leads_of(PyObject *self, PyObject *args) {
    (void)self;
    return count_cells(args, number_leads);
}

static PyObject *hash_finish(PyObject *self, PyObject *args) {
    (void)self;
    PyObject *out_obj;
    if (!PyArg_ParseTuple(args, "O", &out_obj)) return NULL;
    Py_buffer out;
    if (!get_buffer(out_obj, &out, 0, 1, "the row hashes")) return NULL;
    Py_BEGIN_ALLOW_THREADS
    row_hash_finish(out.buf, out.len / 8);
    Py_END_ALLOW_THREADS
    PyBuffer_Release(&out);
    Py_RETURN_NONE;
}

static PyObject *partition_of(PyObject *self, PyObject *args) {
    (void)self;
    PyObject *hashes_obj, *sorted_obj, *positions_obj, *bounds_obj;
    int bits;
    if (!PyArg_ParseTuple(args, "OiOOO", &hashes_obj, &bits, &sorted_obj, &positions_obj,
                          &bounds_obj))
        return NULL;
    if (bits < 1 || bits > 8) {
        PyErr_SetString(PyExc_ValueError, "bits must be 1 to 8");
        return NULL;
    }
    Py_buffer hashes, sorted = {0}, positions = {0}, bounds = {0};
    if (!get_buffer(hashes_obj, &hashes, 0, 0, "the hashes")) return NULL;
    Py_ssize_t count = hashes.len / 8;
    int ok = count <= (Py_ssize_t)UINT32_MAX;
    if (!ok) PyErr_SetString(PyExc_ValueError, "too many hashes for 32-bit positions");
    ok = ok && get_buffer(sorted_obj, &sorted, count * 8, 1, "the sorted hashes");
    ok = ok && get_buffer(positions_obj, &positions, count * 4, 1, "the positions");
    ok = ok && get_buffer(bounds_obj, &bounds, (((Py_ssize_t)1 << bits) + 1) * 8, 1, "bounds");
    if (ok) {
        Py_BEGIN_ALLOW_THREADS
        partition_by_top_bits(hashes.buf, count, bits, sorted.buf, positions.buf, bounds.buf);
        Py_END_ALLOW_THREADS
    }
    if (bounds.obj != NULL) PyBuffer_Release(&bounds);
    if (positions.obj != NULL) PyBuffer_Release(&positions);
    if (sorted.obj != NULL) PyBuffer_Release(&sorted);
    PyBuffer_Release(&hashes);
    if (!ok) return NULL;
    Py_RETURN_NONE;
}

static PyObject *row_keys_of(PyObject *self, PyObject *args) {
    (void)self;
    long long start;
    unsigned long long seed;
    PyObject *keys_obj;
    if (!PyArg_ParseTuple(args, "LKO", &start, &seed, &keys_obj)) return NULL;
    Py_buffer keys;
    if (!get_buffer(keys_obj, &keys, 0, 1, "the keys")) return NULL;
    Py_BEGIN_ALLOW_THREADS
    row_keys(start, keys.len / 8, seed, keys.buf);
    Py_END_ALLOW_THREADS
    PyBuffer_Release(&keys);
    Py_RETURN_NONE;
}

static PyObject *ascii_of(PyObject *self, PyObject *args) {
    (void)self;
    PyObject *data_obj;
    if (!PyArg_ParseTuple(args, "O", &data_obj)) return NULL;
    Py_buffer data;
    if (!get_buffer(data_obj, &data, 0, 0, "the bytes")) return NULL;
    int ascii;
    Py_BEGIN_ALLOW_THREADS
    ascii = bytes_are_ascii(data.buf, data.len);
    Py_END_ALLOW_THREADS
    PyBuffer_Release(&data);
    return PyBool_FromLong(ascii);
}

static PyObject *sample_below_of(PyObject *self, PyObject *args) {
    (void)self;
    unsigned long long start;
    double threshold;
    PyObject *values_obj, *keys_obj, *kept_obj;
    if (!PyArg_ParseTuple(args, "KOdOO", &start, &values_obj, &threshold, &keys_obj, &kept_obj))
        return NULL;
    Py_buffer values, keys = {0}, kept = {0};
    if (!get_buffer(values_obj, &values, 0, 0, "the values")) return NULL;
    int ok = get_buffer(keys_obj, &keys, values.len, 1, "the keys");
    ok = ok && get_buffer(kept_obj, &kept, values.len, 1, "the kept values");
    int64_t taken = 0;
    if (ok) {
        Py_BEGIN_ALLOW_THREADS
        taken = sample_below(start, values.buf, values.len / 8, threshold, keys.buf, kept.buf);
        Py_END_ALLOW_THREADS
    }
    if (kept.obj != NULL) PyBuffer_Release(&kept);
    if (keys.obj != NULL) PyBuffer_Release(&keys);
    PyBuffer_Release(&values);
    if (!ok) return NULL;
    return PyLong_FromLongLong(taken);
}

/* Buffers of a sequence of arrays, each of at least `need` bytes; the count taken, or -1. */
static Py_ssize_t get_buffers(PyObject *seq, Py_buffer *views, Py_ssize_t count,
                              Py_ssize_t need, const char *what) {
    for (Py_ssize_t i = 0; i < count; i++) {
        PyObject *item = PySequence_Fast_GET_ITEM(seq, i);
        if (!get_buffer(item, &views[i], need, 0, what)) {
            for (Py_ssize_t j = 0; j < i; j++) PyBuffer_Release(&views[j]);
            return -1;
        }
    }
    return count;
}

enum { SHIFT, N, S, Q, CROSS, LOST_N, LOST_S, LOST_Q, GN, GS, GQ, TABLES, OUTPUTS };

static PyObject *relation_sums_of(PyObject *self, PyObject *args) {
    (void)self;
    PyObject *x_obj, *codes_obj, *bases_obj, *sizes_obj, *pair_offsets_obj, *outputs_obj;
    Py_ssize_t rows;
    if (!PyArg_ParseTuple(args, "nOOOOOO", &rows, &x_obj, &codes_obj, &bases_obj, &sizes_obj,
                          &pair_offsets_obj, &outputs_obj))
        return NULL;
    PyObject *x_seq = PySequence_Fast(x_obj, "values must be a sequence");
    if (x_seq == NULL) return NULL;
    PyObject *codes_seq = PySequence_Fast(codes_obj, "codes must be a sequence");
    PyObject *out_seq = codes_seq ? PySequence_Fast(outputs_obj, "outputs must be a sequence")
                                  : NULL;
    PyObject *result = NULL;
    Py_ssize_t p = PySequence_Fast_GET_SIZE(x_seq);
    Py_ssize_t k = codes_seq ? PySequence_Fast_GET_SIZE(codes_seq) : 0;
    Py_buffer *x_views = PyMem_Calloc((size_t)p + 1, sizeof(Py_buffer));
    Py_buffer *code_views = PyMem_Calloc((size_t)k + 1, sizeof(Py_buffer));
    const double **x = PyMem_Calloc((size_t)p + 1, sizeof(double *));
    const int64_t **codes = PyMem_Calloc((size_t)k + 1, sizeof(int64_t *));
    Py_buffer bases = {0}, sizes = {0}, pair_offsets = {0}, outs[OUTPUTS];
    Py_ssize_t got_x = -1, got_codes = -1, got_outs = 0;
    int small = 0;
    if (out_seq == NULL) goto done;
    if (!x_views || !code_views || !x || !codes) {
        PyErr_NoMemory();
        goto done;
    }
    if (rows < 0 || PySequence_Fast_GET_SIZE(out_seq) != OUTPUTS) {
        PyErr_SetString(PyExc_ValueError, "bad row count or number of outputs");
        goto done;
    }
    got_x = get_buffers(x_seq, x_views, p, rows * 8, "a numeric column");
    if (got_x < 0) goto done;
    got_codes = get_buffers(codes_seq, code_views, k, rows * 8, "a label column's codes");
    if (got_codes < 0) goto done;
    if (!get_buffer(bases_obj, &bases, k * 8, 0, "bases")) goto done;
    if (!get_buffer(sizes_obj, &sizes, k * 8, 0, "sizes")) goto done;
    if (!get_buffer(pair_offsets_obj, &pair_offsets, (k * (k - 1) / 2) * 8, 0, "pair offsets"))
        goto done;
    const int64_t *size = sizes.buf, *base = bases.buf, *pair_at = pair_offsets.buf;
    Py_ssize_t labels = 0, cells = 0;
    for (Py_ssize_t l = 0; l < k; l++) {
        if (size[l] < 0 || base[l] < 0) small = 1;
        if (base[l] + size[l] > labels) labels = base[l] + size[l];
    }
    for (Py_ssize_t a = 0, pair = 0; a < k; a++)
        for (Py_ssize_t b = a + 1; b < k; b++, pair++)
            if (pair_at[pair] < 0) small = 1;
            else if (pair_at[pair] + size[a] * size[b] > cells)
                cells = pair_at[pair] + size[a] * size[b];
    if (small) {
        PyErr_SetString(PyExc_ValueError, "negative label sizes or offsets");
        goto done;
    }
    Py_ssize_t need[OUTPUTS] = {
        [SHIFT] = p * 8,      [N] = p * 8,          [S] = p * 8,          [Q] = p * 8,
        [CROSS] = p * p * 8,  [LOST_N] = p * p * 8, [LOST_S] = p * p * 8, [LOST_Q] = p * p * 8,
        [GN] = labels * p * 8, [GS] = labels * p * 8, [GQ] = labels * p * 8, [TABLES] = cells * 8,
    };
    for (; got_outs < OUTPUTS; got_outs++)
        if (!get_buffer(PySequence_Fast_GET_ITEM(out_seq, got_outs), &outs[got_outs],
                        need[got_outs], 1, "an output"))
            goto done;
    for (Py_ssize_t i = 0; i < p; i++) x[i] = x_views[i].buf;
    for (Py_ssize_t l = 0; l < k; l++) codes[l] = code_views[l].buf;
    relation_input in = {
        .rows = rows, .p = (int)p, .x = x, .k = (int)k, .codes = codes,
        .bases = base, .sizes = size, .pair_offsets = pair_at,
    };
    relation_sums sums = {
        .shift = outs[SHIFT].buf, .n = outs[N].buf, .s = outs[S].buf, .q = outs[Q].buf,
        .cross = outs[CROSS].buf, .lost_n = outs[LOST_N].buf, .lost_s = outs[LOST_S].buf,
        .lost_q = outs[LOST_Q].buf, .gn = outs[GN].buf, .gs = outs[GS].buf, .gq = outs[GQ].buf,
        .tables = outs[TABLES].buf,
    };
    int status;
    Py_BEGIN_ALLOW_THREADS
    status = relation_batch(&in, &sums);
    Py_END_ALLOW_THREADS
    if (status != 0) {
        PyErr_NoMemory();
        goto done;
    }
    result = Py_None;
    Py_INCREF(result);
done:
    for (Py_ssize_t i = 0; i < got_outs; i++) PyBuffer_Release(&outs[i]);
    if (pair_offsets.obj) PyBuffer_Release(&pair_offsets);
    if (sizes.obj) PyBuffer_Release(&sizes);
    if (bases.obj) PyBuffer_Release(&bases);
    for (Py_ssize_t i = 0; i < got_codes; i++) PyBuffer_Release(&code_views[i]);
    for (Py_ssize_t i = 0; i < got_x; i++) PyBuffer_Release(&x_views[i]);
    PyMem_Free(x_views);
    PyMem_Free(code_views);
    PyMem_Free(x);
    PyMem_Free(codes);
    Py_XDECREF(out_seq);
    Py_XDECREF(codes_seq);
    Py_DECREF(x_seq);
    return result;
}

static PyObject *number_summary_of(PyObject *self, PyObject *args) {
    (void)self;
    PyObject *x_obj, *candidates_obj, *kept_obj, *counts_obj;
    if (!PyArg_ParseTuple(args, "OOOO", &x_obj, &candidates_obj, &kept_obj, &counts_obj))
        return NULL;
    Py_buffer x, candidates = {0}, kept = {0}, counts = {0};
    if (!get_buffer(x_obj, &x, 0, 0, "the values")) return NULL;
    int ok = get_buffer(candidates_obj, &candidates, 0, 0, "the candidates");
    ok = ok && get_buffer(kept_obj, &kept, x.len, 1, "the kept values");
    ok = ok && get_buffer(counts_obj, &counts, candidates.len, 1, "the candidate counts");
    PyObject *result = NULL;
    if (ok) {
        number_summary summary = {.candidate_counts = counts.buf};
        Py_BEGIN_ALLOW_THREADS
        number_batch(x.buf, x.len / 8, candidates.buf, candidates.len / 8, kept.buf, &summary);
        Py_END_ALLOW_THREADS
        result = Py_BuildValue("(LLLNddddddd)", (long long)summary.n, (long long)summary.zeros,
                               (long long)summary.negatives, PyBool_FromLong(summary.integers),
                               summary.total, summary.minimum, summary.maximum, summary.mean,
                               summary.m2, summary.m3, summary.m4);
    }
    if (counts.obj != NULL) PyBuffer_Release(&counts);
    if (kept.obj != NULL) PyBuffer_Release(&kept);
    if (candidates.obj != NULL) PyBuffer_Release(&candidates);
    PyBuffer_Release(&x);
    return result;
}

/* 2^precision writable registers and a buffer of items to add to them; 0 with an
 * exception set (nothing held) if either is wrong. */
static int hold_sketch(PyObject *registers_obj, int precision, PyObject *items_obj,
                       Py_buffer *registers, Py_buffer *items) {
    if (precision < 4 || precision > 24) {
        PyErr_SetString(PyExc_ValueError, "precision must be 4 to 24");
        return 0;
    }
    if (!get_buffer(registers_obj, registers, (Py_ssize_t)1 << precision, 1, "the registers"))
        return 0;
    if (!get_buffer(items_obj, items, 0, 0, "the items")) {
        PyBuffer_Release(registers);
        return 0;
    }
    return 1;
}

static PyObject *hll_add_of(PyObject *self, PyObject *args) {
    (void)self;
    PyObject *registers_obj, *hashes_obj;
    int precision;
    if (!PyArg_ParseTuple(args, "OiO", &registers_obj, &precision, &hashes_obj)) return NULL;
    Py_buffer registers, hashes;
    if (!hold_sketch(registers_obj, precision, hashes_obj, &registers, &hashes)) return NULL;
    Py_BEGIN_ALLOW_THREADS
    hll_add(registers.buf, precision, hashes.buf, hashes.len / 8);
    Py_END_ALLOW_THREADS
    PyBuffer_Release(&hashes);
    PyBuffer_Release(&registers);
    Py_RETURN_NONE;
}

static PyObject *hll_add_numbers_of(PyObject *self, PyObject *args) {
    (void)self;
    PyObject *registers_obj, *values_obj;
    int precision;
    unsigned long long seed;
    if (!PyArg_ParseTuple(args, "OiOK", &registers_obj, &precision, &values_obj, &seed))
        return NULL;
    Py_buffer registers, values;
    if (!hold_sketch(registers_obj, precision, values_obj, &registers, &values)) return NULL;
    Py_BEGIN_ALLOW_THREADS
    hll_add_numbers(registers.buf, precision, values.buf, values.len / 8, seed);
    Py_END_ALLOW_THREADS
    PyBuffer_Release(&values);
    PyBuffer_Release(&registers);
    Py_RETURN_NONE;
}

static PyObject *number_set_add_of(PyObject *self, PyObject *args) {
    (void)self;
    PyObject *table_obj, *values_obj;
    Py_ssize_t filled;
    if (!PyArg_ParseTuple(args, "OnO", &table_obj, &filled, &values_obj)) return NULL;
    Py_buffer table, values;
    if (!get_buffer(table_obj, &table, 0, 1, "table")) return NULL;
    Py_ssize_t slots = table.len / 8;
    int bits = 0;
    while (bits < 40 && ((Py_ssize_t)1 << bits) < slots) bits++;
    if (slots < 2 || ((Py_ssize_t)1 << bits) != slots || table.len % 8 || filled < 0 ||
        filled > slots / 2) {
        PyErr_SetString(PyExc_ValueError,
                        "the table needs a power of two uint64 slots, at most half filled");
        PyBuffer_Release(&table);
        return NULL;
    }
    if (!get_buffer(values_obj, &values, 0, 0, "values")) {
        PyBuffer_Release(&table);
        return NULL;
    }
    int64_t used = filled, done;
    Py_BEGIN_ALLOW_THREADS
    done = number_set_add(table.buf, bits, &used, values.buf, values.len / 8);
    Py_END_ALLOW_THREADS
    PyBuffer_Release(&values);
    PyBuffer_Release(&table);
    return Py_BuildValue("LL", (long long)done, (long long)used);
}

static PyMethodDef methods[] = {
    {"hash_column", hash_column, METH_VARARGS,
     "hash_column(out, rows, validity, validity_offset, offsets, offset_bits, data, width, "
     "seed): mix one column's cells into the uint64 row hashes in out."},
    {"parse_decimals", parse_decimals_of, METH_VARARGS,
     "parse_decimals(out, rows, validity, validity_offset, offsets, offset_bits, data): parse "
     "text cells as decimals into the float64 out (NaN for null); the rows parsed, all of "
     "them unless a cell cannot be parsed exactly, where it stops."},
    {"partition_by_top_bits", partition_of, METH_VARARGS,
     "partition_by_top_bits(hashes, bits, sorted, positions, bounds): group uint64 hashes "
     "by their top bits, rows in order within a group (uint32 positions, int64 bounds)."},
    {"row_keys", row_keys_of, METH_VARARGS,
     "row_keys(start, seed, keys): fill the uint64 keys with SplitMix64 of the row numbers "
     "from start."},
    {"bytes_are_ascii", ascii_of, METH_VARARGS,
     "bytes_are_ascii(data): True when every byte is below 128."},
    {"sample_below", sample_below_of, METH_VARARGS,
     "sample_below(start, values, threshold, keys, kept): key each float64 value by "
     "SplitMix64 of start + its index, keep those keyed below threshold; how many."},
    {"hash_finish", hash_finish, METH_VARARGS, "hash_finish(out): end the row hashes."},
    {"padded_cells", padded_cells_of, METH_VARARGS,
     "padded_cells(rows, validity, validity_offset, offsets, offset_bits, data): how many "
     "non-null text cells start or end with ASCII whitespace."},
    {"number_leads", number_leads_of, METH_VARARGS,
     "number_leads(rows, validity, validity_offset, offsets, offset_bits, data): how many "
     "non-null text cells start, after whitespace, [+-]?[.,]? and a digit."},
    {"text_codes", text_codes_of, METH_VARARGS,
     "text_codes(codes, firsts, rows, validity, validity_offset, offsets, offset_bits, data): "
     "number the distinct text cells in order of first appearance into the int32 codes (-1 "
     "for null), each code's first row into the int64 firsts; how many distinct cells."},
    {"relation_sums", relation_sums_of, METH_VARARGS,
     "relation_sums(rows, values, codes, bases, sizes, pair_offsets, outputs): one pass "
     "adding a batch's across-column sums to the twelve output buffers."},
    {"number_summary", number_summary_of, METH_VARARGS,
     "number_summary(values, candidates, kept, counts): copy the finite float64 values to "
     "kept, add each candidate's count to counts; (n, zeros, negatives, integers, total, "
     "minimum, maximum, mean, m2, m3, m4)."},
    {"hll_add", hll_add_of, METH_VARARGS,
     "hll_add(registers, precision, hashes): add uint64 hashes to the uint8 registers."},
    {"hll_add_numbers", hll_add_numbers_of, METH_VARARGS,
     "hll_add_numbers(registers, precision, values, seed): add float64 values (NaN "
     "skipped), hashed by SplitMix64's finaliser, to the uint8 registers."},
    {"number_set_add", number_set_add_of, METH_VARARGS,
     "number_set_add(table, filled, values): add float64 values (NaN skipped) to the "
     "uint64 open-addressing table until done or half full; (values gone through, filled)."},
    {NULL, NULL, 0, NULL},
};

static struct PyModuleDef module = {
    .m_base = PyModuleDef_HEAD_INIT,
    .m_name = "_kernels",
    .m_doc = "The engine's compiled per-batch passes.",
    .m_size = -1,
    .m_methods = methods,
};

PyMODINIT_FUNC PyInit__kernels(void) { return PyModule_Create(&module); }
