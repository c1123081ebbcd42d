"""Arrow arrays as the buffers the compiled passes read (``column_layout`` in C)."""

from __future__ import annotations

import numpy as np
import pyarrow as pa
import pyarrow.types as pat


def offset_bits(kind: pa.DataType) -> int:
    """32 or 64 for text and bytes (the width of their offsets), else 0."""
    if pat.is_string(kind) or pat.is_binary(kind):
        return 32
    if pat.is_large_string(kind) or pat.is_large_binary(kind):
        return 64
    return 0


def bitmap(column: pa.Array, validity: pa.Buffer | None) -> pa.Buffer | None:
    """The validity bitmap when the column has nulls, else None (every row valid)."""
    return validity if column.null_count and validity is not None else None


def text_layout(column: pa.Array) -> tuple[pa.Buffer | None, np.ndarray, int, object]:
    """(validity bitmap or None, offsets from the array's first row, offset bits, data)
    of a text or bytes array."""
    bits = offset_bits(column.type)
    if not bits:
        raise TypeError(f"{column.type} is not text")
    validity, offsets, data = column.buffers()[:3]
    window = np.frombuffer(offsets, dtype=np.int64 if bits == 64 else np.int32)
    window = window[column.offset : column.offset + len(column) + 1]
    return bitmap(column, validity), window, bits, data if data is not None else b""
