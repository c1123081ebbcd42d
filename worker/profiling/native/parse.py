"""Decimal text parsed by the compiled pass in ``parse.c`` where the result is exact,
and counts over text cells that spare Arrow calls over every cell."""

from __future__ import annotations

from collections.abc import Callable

import numpy as np
import pyarrow as pa

from worker.profiling.native import _kernels
from worker.profiling.native.layout import offset_bits, text_layout


def parse_decimals(column: pa.Array) -> np.ndarray | None:
    """float64 values of a text column of plain decimals (NaN where null), or None when
    a cell is not one (a word, a blank, a thousands separator, more than 19 digits):
    the caller then parses the column the general way."""
    if not offset_bits(column.type):
        return None
    validity, offsets, bits, data = text_layout(column)
    out = np.empty(len(column))
    parsed = _kernels.parse_decimals(out, len(column), validity, column.offset, offsets, bits, data)
    return out if parsed == len(column) else None


def bytes_are_ascii(data: object) -> bool:
    """True when every byte of ``data`` (any buffer) is below 128: ASCII, so valid UTF-8."""
    return bool(_kernels.bytes_are_ascii(data))


def padded_cells(column: pa.Array) -> int | None:
    """How many non-null cells of a text column start or end with ASCII whitespace (the
    characters ``pyarrow.compute.ascii_trim_whitespace`` trims); None when not text."""
    return _count_cells(_kernels.padded_cells, column)


def number_leads(column: pa.Array) -> int | None:
    """How many non-null cells of a text column look like the start of a number: after
    ASCII whitespace, a digit, perhaps after a sign and then a decimal mark (the
    regular expression ``^\\s*[-+]?[.,]?[0-9]``); None when not text."""
    return _count_cells(_kernels.number_leads, column)


def _count_cells(count: Callable[..., int], column: pa.Array) -> int | None:
    if not offset_bits(column.type):
        return None
    validity, offsets, bits, data = text_layout(column)
    return int(count(len(column), validity, column.offset, offsets, bits, data))
