"""One batch of a table, prepared once for every per-column and across-column state.

The reader hands over raw text (or typed Arrow arrays for Parquet). Trimming,
spotting missing cells and parsing numbers are done here, once per batch and
vectorised, so that the column states (``worker.profiling.columns``) and the
relations states read the same arrays instead of each parsing again.

Which columns are parsed as numbers or treated as labels is a ``BatchPlan``,
decided by the engine from the first non-empty batch (candidate kinds); the
final kind of a column is decided later from the counts of every batch.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
import pyarrow as pa
import pyarrow.compute as pc
import pyarrow.types as pat


@dataclass(frozen=True)
class MissingCounts:
    """How the missing cells of one column in one batch are missing."""

    null: int
    blank: int
    tokens: dict[str, int]

    @property
    def total(self) -> int:
        return self.null + self.blank + sum(self.tokens.values())


@dataclass(frozen=True)
class BatchPlan:
    """Which columns to parse as numbers and which to keep as labels.

    ``decimal`` and ``thousands`` come from the reader's ``SourceInfo``.
    """

    numeric: frozenset[str]
    labels: frozenset[str]
    missing_tokens: tuple[str, ...]
    decimal: str = "."
    thousands: str | None = None


@dataclass(frozen=True)
class PreparedBatch:
    """A batch with its missing masks, parsed numbers and trimmed labels.

    ``missing``: every column, True where null, blank/whitespace or a missing token.
    ``numbers``: numeric-candidate columns, float64, NaN where missing or not a number.
    ``labels``: label-candidate columns, trimmed text, null where missing.
    ``text``: every text column, trimmed text, null where missing (a superset of ``labels``).
    ``missing_counts``: every column, how its missing cells are missing.
    """

    raw: pa.RecordBatch
    offset: int
    missing: dict[str, np.ndarray]
    numbers: dict[str, np.ndarray]
    labels: dict[str, pa.Array]
    text: dict[str, pa.Array] = field(default_factory=dict)
    missing_counts: dict[str, MissingCounts] = field(default_factory=dict)

    @property
    def num_rows(self) -> int:
        return self.raw.num_rows


def is_text_type(data_type: pa.DataType) -> bool:
    """True for the Arrow string types the text readers produce."""
    return (
        pat.is_string(data_type) or pat.is_large_string(data_type) or pat.is_string_view(data_type)
    )


def to_numpy_bool(mask: pa.Array | pa.ChunkedArray) -> np.ndarray:
    """An Arrow boolean array as numpy, nulls read as False."""
    if isinstance(mask, pa.ChunkedArray):
        mask = mask.combine_chunks()
    return mask.fill_null(False).to_numpy(zero_copy_only=False)


def parse_numbers(
    trimmed: pa.Array, *, decimal: str = ".", thousands: str | None = None
) -> np.ndarray:
    """Parse trimmed text as float64; NaN where null, not a number or not finite.

    The fast path is Arrow's cast; when one value fails it, polars' lenient
    cast gives null for the values that are not numbers.
    """
    text = trimmed
    if thousands:
        text = pc.replace_substring(text, thousands, "")
    if decimal != ".":
        text = pc.replace_substring(text, decimal, ".")
    try:
        parsed = pc.cast(text, pa.float64())
    except (pa.ArrowInvalid, pa.ArrowNotImplementedError):
        import polars as pl

        parsed = pl.from_arrow(text).cast(pl.Float64, strict=False).to_arrow()
    values = np.asarray(parsed.to_numpy(zero_copy_only=False), dtype=np.float64)
    values = np.where(np.isfinite(values), values, np.nan)
    return values


def typed_numbers(array: pa.Array) -> np.ndarray:
    """A typed numeric Arrow array (Parquet input) as float64 with NaN for null."""
    values = pc.cast(array, pa.float64()).to_numpy(zero_copy_only=False)
    values = np.asarray(values, dtype=np.float64)
    return np.where(np.isfinite(values), values, np.nan)


def _text_missing(
    raw: pa.Array, tokens: tuple[str, ...]
) -> tuple[pa.Array, np.ndarray, MissingCounts]:
    trimmed = pc.utf8_trim_whitespace(raw)
    blank = pc.equal(pc.utf8_length(trimmed), 0)
    is_token = pc.is_in(trimmed, value_set=pa.array(tokens, type=trimmed.type))
    missing = to_numpy_bool(pc.or_(blank, is_token)) | to_numpy_bool(pc.is_null(raw))
    token_counts: dict[str, int] = {}
    token_hits = int(pc.sum(is_token).as_py() or 0)
    if token_hits:
        counted = pc.value_counts(pc.filter(trimmed, is_token))
        for item in counted.to_pylist():
            token_counts[item["values"]] = int(item["counts"])
    counts = MissingCounts(
        null=raw.null_count, blank=int(pc.sum(blank).as_py() or 0), tokens=token_counts
    )
    cleaned = pc.if_else(pa.array(missing), pa.scalar(None, trimmed.type), trimmed)
    return cleaned, missing, counts


def prepare_batch(raw: pa.RecordBatch, offset: int, plan: BatchPlan) -> PreparedBatch:
    """Trim, mark missing cells and parse numbers once for the whole batch."""
    missing: dict[str, np.ndarray] = {}
    numbers: dict[str, np.ndarray] = {}
    labels: dict[str, pa.Array] = {}
    text: dict[str, pa.Array] = {}
    counts: dict[str, MissingCounts] = {}
    for name, column in zip(raw.schema.names, raw.columns, strict=True):
        if is_text_type(column.type):
            cleaned, mask, detail = _text_missing(column, plan.missing_tokens)
            text[name] = cleaned
            if name in plan.numeric:
                numbers[name] = parse_numbers(
                    cleaned, decimal=plan.decimal, thousands=plan.thousands
                )
            if name in plan.labels:
                labels[name] = cleaned
        else:
            mask = to_numpy_bool(pc.is_null(column))
            if pat.is_floating(column.type):
                mask = mask | to_numpy_bool(pc.is_nan(column))
            detail = MissingCounts(null=int(mask.sum()), blank=0, tokens={})
            if name in plan.numeric and (
                pat.is_integer(column.type)
                or pat.is_floating(column.type)
                or pat.is_decimal(column.type)
            ):
                numbers[name] = typed_numbers(column)
            if name in plan.labels:
                labels[name] = pc.cast(column, pa.string())
                text[name] = labels[name]
        missing[name] = mask
        counts[name] = detail
    return PreparedBatch(
        raw=raw,
        offset=offset,
        missing=missing,
        numbers=numbers,
        labels=labels,
        text=text,
        missing_counts=counts,
    )
