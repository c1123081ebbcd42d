"""Build prepared batches for the relations tests with the engine's own batch preparation."""

from __future__ import annotations

from collections.abc import Iterator

import pandas as pd
import pyarrow as pa

from worker.profiling.options import DEFAULT_MISSING_TOKENS
from worker.profiling.prepared import BatchPlan, PreparedBatch, prepare_batch


def as_text_batch(frame: pd.DataFrame) -> pa.RecordBatch:
    """Every column as raw text, None where the frame holds a missing value (as a CSV reader)."""
    arrays = {}
    for name in frame.columns:
        values = [
            None if pd.isna(v) else (v if isinstance(v, str) else repr(v)) for v in frame[name]
        ]
        arrays[str(name)] = pa.array(values, type=pa.string())
    return pa.record_batch(arrays)


def prepared_batches(
    frame: pd.DataFrame,
    numeric: list[str],
    labels: list[str],
    *,
    batch_rows: int = 1000,
) -> Iterator[PreparedBatch]:
    """The frame as raw text batches of ``batch_rows`` rows, prepared."""
    plan = BatchPlan(
        numeric=frozenset(numeric), labels=frozenset(labels), missing_tokens=DEFAULT_MISSING_TOKENS
    )
    for start in range(0, max(len(frame), 1), batch_rows):
        part = frame.iloc[start : start + batch_rows]
        yield prepare_batch(as_text_batch(part), start, plan)
