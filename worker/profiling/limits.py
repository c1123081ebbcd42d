"""Limits on what a delivered file may hold, refused with a plain reason.

A hostile or broken file can carry a million columns or a single cell of a
gigabyte; either would exhaust the worker long before anything useful comes
out. These checks run as the file is read: the columns once, the cells per
batch, and end the profiling with a ``ProfileError`` that names the limit and
the setting that raises it.
"""

from __future__ import annotations

from collections.abc import Sequence

import pyarrow as pa
import pyarrow.compute as pc

from worker.profiling.errors import ProfileError
from worker.profiling.options import ProfileOptions


def check_columns(names: Sequence[str], options: ProfileOptions) -> None:
    """Refuse a table with more columns than ``options.max_columns``."""
    if len(names) > options.max_columns:
        raise ProfileError(
            f"the file has {len(names):,} columns and at most {options.max_columns:,} are "
            "profiled (setting TIDEWAITER_PROFILING__MAX_COLUMNS)"
        )


def check_cells(batch: pa.RecordBatch, options: ProfileOptions) -> None:
    """Refuse a batch with a text cell longer than ``options.max_cell_chars`` characters."""
    limit = options.max_cell_chars
    for name, column in zip(batch.schema.names, batch.columns, strict=True):
        if not (pa.types.is_string(column.type) or pa.types.is_large_string(column.type)):
            continue
        # Bytes bound characters from above, so the cheap byte count rules most columns out.
        if column.nbytes <= limit:
            continue
        longest = pc.max(pc.utf8_length(column)).as_py()
        if longest is not None and longest > limit:
            raise ProfileError(
                f"a cell of column '{name}' holds {longest:,} characters and at most "
                f"{limit:,} are accepted (setting TIDEWAITER_PROFILING__MAX_CELL_CHARS)"
            )
