"""Row hashes of a raw batch, from the compiled pass in ``rowhash.c``.

Text columns are hashed from Arrow's own offsets and bytes, fixed-width columns
(numbers, dates and times of Parquet input) from their values' bytes; any other
type is first turned into one 64-bit hash per cell by polars. A null cell has a
hash of its own, the same in every row of a column.
"""

from __future__ import annotations

import numpy as np
import pyarrow as pa
import pyarrow.types as pat

from worker.profiling.native import _kernels

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
    bits = _offset_bits(kind)
    if bits:
        validity, offsets, data = column.buffers()[:3]
        window = np.frombuffer(offsets, dtype=np.int64 if bits == 64 else np.int32)
        window = window[column.offset : column.offset + len(column) + 1]
        return _bitmap(column, validity), window, bits, data if data is not None else b"", 0
    if _fixed_width(kind):
        validity, values = column.buffers()[:2]
        width = kind.bit_width // 8
        start = column.offset * width
        data = np.frombuffer(values, dtype=np.uint8)[start : start + len(column) * width]
        return _bitmap(column, validity), None, 0, data, width
    import polars as pl

    from worker.profiling.prepared import as_string_view

    series = pl.from_arrow(as_string_view(column))
    assert isinstance(series, pl.Series)
    cells = np.ascontiguousarray(series.hash(seed=0).to_numpy(), dtype=np.uint64)
    return None, None, 0, cells.view(np.uint8), 8


def _bitmap(column: pa.Array, validity: pa.Buffer | None) -> pa.Buffer | None:
    return validity if column.null_count and validity is not None else None


def _offset_bits(kind: pa.DataType) -> int:
    """32 or 64 for text and bytes (the width of their offsets), else 0."""
    if pat.is_string(kind) or pat.is_binary(kind):
        return 32
    if pat.is_large_string(kind) or pat.is_large_binary(kind):
        return 64
    return 0


def _fixed_width(kind: pa.DataType) -> bool:
    """Types whose values are whole bytes, one value after another (no bit-packed booleans)."""
    try:
        bits = kind.bit_width
    except ValueError:
        return False
    plain = pat.is_integer(kind) or pat.is_floating(kind) or pat.is_temporal(kind)
    return (plain or pat.is_decimal(kind) or pat.is_fixed_size_binary(kind)) and bits % 8 == 0
