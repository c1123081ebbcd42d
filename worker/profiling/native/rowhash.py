"""Row hashes of a raw batch, from the compiled pass in ``rowhash.c``.

Text columns are hashed from Arrow's own offsets and bytes, fixed-width columns
(numbers, dates and times of Parquet input) from their values' bytes; any other
type is first turned into one 64-bit hash per cell by polars. A null cell has a
hash of its own, the same in every row of a column whatever the column's type
(a chunk whose column holds only nulls may come typed as null).
"""

from __future__ import annotations

import numpy as np
import pyarrow as pa
import pyarrow.types as pat

from worker.profiling.native import _kernels
from worker.profiling.native.layout import bitmap, offset_bits, text_layout

_MASK = (1 << 64) - 1
_GOLDEN = 0x9E3779B97F4A7C15  # spreads the column positions over the seeds


def row_hashes(batch: pa.RecordBatch, seed: int) -> np.ndarray:
    """One 64-bit hash per row of ``batch`` (the same rows give the same hashes)."""
    rows = batch.num_rows
    hashes = np.full(rows, seed & _MASK, dtype=np.uint64)
    for position, column in enumerate(batch.columns):
        column_seed = (seed + (position + 1) * _GOLDEN) & _MASK
        validity, offsets, offset_bits, data, width = _layout(column)
        _kernels.hash_column(
            hashes, rows, validity, column.offset, offsets, offset_bits, data, width, column_seed
        )
    _kernels.hash_finish(hashes)
    return hashes


def _layout(column: pa.Array) -> tuple[object, object, int, object, int]:
    """(validity bitmap, offsets, offset bits, data, width) of one column, as buffers."""
    kind = column.type
    if offset_bits(kind):
        validity, offsets, bits, data = text_layout(column)
        return validity, offsets, bits, data, 0
    if _fixed_width(kind):
        validity, values = column.buffers()[:2]
        width = kind.bit_width // 8
        start = column.offset * width
        data = np.frombuffer(values, dtype=np.uint8)[start : start + len(column) * width]
        return bitmap(column, validity), None, 0, data, width
    import polars as pl

    from worker.profiling.prepared import as_string_view

    if pat.is_null(kind):  # every cell null: a bitmap of zeros
        return bytes((column.offset + len(column) + 7) // 8), None, 0, b"", 0
    series = pl.from_arrow(as_string_view(column))
    assert isinstance(series, pl.Series)
    cells = np.ascontiguousarray(series.hash(seed=0).to_numpy(), dtype=np.uint64)
    # The column's own bitmap, so a null hashes as a null of any other type does.
    return bitmap(column, column.buffers()[0]), None, 0, cells.view(np.uint8), 8


def _fixed_width(kind: pa.DataType) -> bool:
    """Types whose values are whole bytes, one value after another (no bit-packed booleans)."""
    try:
        bits = kind.bit_width
    except ValueError:
        return False
    plain = pat.is_integer(kind) or pat.is_floating(kind) or pat.is_temporal(kind)
    return (plain or pat.is_decimal(kind) or pat.is_fixed_size_binary(kind)) and bits % 8 == 0


def partition_by_top_bits(
    hashes: np.ndarray, bits: int
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """The hashes grouped by their top ``bits`` bits, rows in order within each group:
    (grouped hashes, each one's row as uint32, the 2**bits + 1 group bounds)."""
    values = np.ascontiguousarray(hashes, dtype=np.uint64)
    grouped = np.empty_like(values)
    positions = np.empty(len(values), dtype=np.uint32)
    bounds = np.empty((1 << bits) + 1, dtype=np.int64)
    _kernels.partition_by_top_bits(values, bits, grouped, positions, bounds)
    return grouped, positions, bounds
