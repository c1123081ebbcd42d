"""Entry point of the engine: read a file in batches and assemble its profile."""

from __future__ import annotations

import hashlib
import os
from collections.abc import Callable
from pathlib import Path
from typing import Any

import pyarrow as pa
import pyarrow.csv as pacsv

from worker.profiling.errors import ProfileError
from worker.profiling.options import ProfileOptions

FORMAT_VERSION = 1

ProgressCallback = Callable[[str, float], None]
"""Called with a stage name and the share of the file's bytes read (0 to 1)."""


def profile_file(
    path: str | os.PathLike[str],
    options: ProfileOptions | None = None,
    *,
    progress: ProgressCallback | None = None,
    columnar_copy: Path | None = None,
    sheet: str | None = None,
    source_name: str | None = None,
) -> dict[str, Any]:
    """Profile one delivered file and return its profile document (format_version 1).

    ``columnar_copy``, when given, is where a Parquet copy of the table is
    written for on-demand questions. ``source_name`` is the name shown in the
    profile (the upload's original name); it defaults to the file's name.
    """
    options = options or ProfileOptions()
    path = Path(path)
    report = progress or (lambda stage, share: None)
    report("reading", 0.0)
    try:
        table = pacsv.read_csv(
            path,
            convert_options=pacsv.ConvertOptions(
                column_types={}, strings_can_be_null=True, null_values=[""]
            ),
        )
    except (pa.ArrowInvalid, UnicodeDecodeError) as exc:
        raise ProfileError(f"cannot read the file as a table: {exc}") from exc
    report("summarising", 1.0)
    columns = []
    for position, name in enumerate(table.column_names):
        col = table.column(name)
        columns.append(
            {
                "name": name,
                "position": position,
                "count": len(col) - col.null_count,
                "missing": col.null_count,
            }
        )
    return {
        "format_version": FORMAT_VERSION,
        "source": {
            "name": source_name or path.name,
            "bytes": path.stat().st_size,
            "sha256": hashlib.sha256(path.read_bytes()).hexdigest(),
            "format": "csv",
        },
        "dataset": {
            "rows": table.num_rows,
            "columns": table.num_columns,
            "missing_cells": sum(c["missing"] for c in columns),
            "parse_errors": [],
        },
        "columns": columns,
        "pairs": [],
        "twins": [],
        "crosstabs": [],
        "flags": [],
        "score": None,
    }
