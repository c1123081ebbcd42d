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

import dataclasses
from dataclasses import dataclass, field

import numpy as np
import pyarrow as pa
import pyarrow.compute as pc
import pyarrow.types as pat

from worker.profiling.native import dictionary_encode, padded_cells, parse_decimals


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
    ``clean_labels`` remembers, per label column, labels already found to need
    no trimming and to be no missing token, so a batch of known labels is not
    checked again; it fills as batches pass.
    """

    numeric: frozenset[str]
    labels: frozenset[str]
    missing_tokens: tuple[str, ...]
    decimal: str = "."
    thousands: str | None = None
    clean_labels: dict[str, set[str]] = field(default_factory=dict, compare=False)


@dataclass(frozen=True)
class PreparedBatch:
    """A batch with its missing masks, parsed numbers and trimmed labels.

    ``missing``: every column, True where null, blank/whitespace or a missing token.
    ``numbers``: numeric-candidate columns, float64, NaN where missing or not a number.
    ``labels``: label-candidate columns, trimmed text, null where missing.
    ``text``: every text column, trimmed text, null where missing (a superset of ``labels``).
    ``missing_counts``: every column, how its missing cells are missing.
    ``padded``: every column, how many present cells had leading or trailing whitespace.
    ``encoded``: label columns whose labels were dictionary-encoded while preparing them
    (the same labels as ``labels``), so later steps need not hash them again.
    """

    raw: pa.RecordBatch
    offset: int
    missing: dict[str, np.ndarray]
    numbers: dict[str, np.ndarray]
    labels: dict[str, pa.Array]
    text: dict[str, pa.Array] = field(default_factory=dict)
    missing_counts: dict[str, MissingCounts] = field(default_factory=dict)
    padded: dict[str, int] = field(default_factory=dict)
    encoded: dict[str, pa.DictionaryArray] = field(default_factory=dict)

    @property
    def num_rows(self) -> int:
        return self.raw.num_rows


def is_text_type(data_type: pa.DataType) -> bool:
    """True for the Arrow string types the text readers produce."""
    return (
        pat.is_string(data_type) or pat.is_large_string(data_type) or pat.is_string_view(data_type)
    )


def as_string_view(array: pa.Array) -> pa.Array:
    """Text as Arrow string views, the layout polars keeps text in, so polars takes it
    without converting every value (other types as they are)."""
    if pat.is_string(array.type) or pat.is_large_string(array.type):
        return array.cast(pa.string_view())
    return array


def to_numpy_bool(mask: pa.Array | pa.ChunkedArray) -> np.ndarray:
    """An Arrow boolean array as numpy, nulls read as False."""
    if isinstance(mask, pa.ChunkedArray):
        mask = mask.combine_chunks()
    return mask.fill_null(False).to_numpy(zero_copy_only=False)


def plain_number_text(text: pa.Array, decimal: str, thousands: str | None) -> pa.Array:
    """Text with the thousands separator removed and the decimal mark made a point."""
    if thousands:
        text = pc.replace_substring(text, thousands, "")
    if decimal != ".":
        text = pc.replace_substring(text, decimal, ".")
    return text


# A decimal as Arrow's cast reads it: digits with an optional point and exponent.
_PLAIN_NUMBER = r"^[+-]?(?:[0-9]+\.?[0-9]*|\.[0-9]+)(?:[eE][+-]?[0-9]+)?$"


def parse_numbers(
    trimmed: pa.Array, *, decimal: str = ".", thousands: str | None = None
) -> np.ndarray:
    """Parse trimmed text as float64; NaN where null, not a number or not finite.

    The fast path is Arrow's cast; when one value fails it, the values written
    as plain decimals (``_PLAIN_NUMBER``) are cast and the others are null. Only
    text that the pattern takes and the cast still refuses goes to polars'
    lenient cast, so profiling rarely loads polars (0.1-0.3 s at start-up, with
    the interpreter lock held).
    """
    text = plain_number_text(trimmed, decimal, thousands)
    try:
        parsed = pc.cast(text, pa.float64())
    except (pa.ArrowInvalid, pa.ArrowNotImplementedError):
        plain = pc.match_substring_regex(text, _PLAIN_NUMBER)
        try:
            parsed = pc.cast(pc.if_else(plain, text, pa.scalar(None, text.type)), pa.float64())
        except (pa.ArrowInvalid, pa.ArrowNotImplementedError):
            import polars as pl

            lenient = pl.from_arrow(as_string_view(text)).cast(pl.Float64, strict=False)
            parsed = lenient.to_arrow()
    values = np.asarray(parsed.to_numpy(zero_copy_only=False), dtype=np.float64)
    values = np.where(np.isfinite(values), values, np.nan)
    return values


def typed_numbers(array: pa.Array) -> np.ndarray:
    """A typed numeric Arrow array (Parquet input) as float64 with NaN for null."""
    values = pc.cast(array, pa.float64()).to_numpy(zero_copy_only=False)
    values = np.asarray(values, dtype=np.float64)
    return np.where(np.isfinite(values), values, np.nan)


def _lengths(array: pa.Array) -> np.ndarray:
    """Byte length of every value (0 for null), read from the offsets without copying text."""
    if pat.is_string(array.type) or pat.is_large_string(array.type):
        width = np.int32 if pat.is_string(array.type) else np.int64
        buffer = array.buffers()[1]
        offsets = np.frombuffer(buffer, dtype=width)[array.offset : array.offset + len(array) + 1]
        return np.diff(offsets)
    return np.asarray(pc.binary_length(array).fill_null(0).to_numpy(zero_copy_only=False))


def null_mask(array: pa.Array) -> np.ndarray:
    """True where the array is null, unpacked from its validity bitmap."""
    if array.null_count == 0:
        return np.zeros(len(array), dtype=bool)
    validity = array.buffers()[0]
    if validity is None:  # null type: everything is null
        return np.ones(len(array), dtype=bool)
    bits = np.unpackbits(np.frombuffer(validity, dtype=np.uint8), bitorder="little")
    return ~bits[array.offset : array.offset + len(array)].astype(bool)


def _text_missing(
    raw: pa.Array, tokens: tuple[str, ...]
) -> tuple[pa.Array, np.ndarray, MissingCounts, int]:
    """Trimmed text with missing cells as null, the missing mask, its counts, and how
    many present cells had surrounding whitespace.

    Trimming removes ASCII whitespace (space, tab, line breaks); it is much cheaper
    than Unicode trimming, and other space characters are rare in delivered files.
    """
    raw_lengths = _lengths(raw)
    if padded_cells(raw) == 0:  # nothing to trim: the text as it is, no copy
        trimmed, lengths = raw, raw_lengths
    else:
        trimmed = pc.ascii_trim_whitespace(raw)
        lengths = _lengths(trimmed)
    null_np = null_mask(raw)
    blank_np = (lengths == 0) & ~null_np
    # A cell longer than every token cannot be one: columns of codes or sentences
    # skip the hash lookup of every cell.
    longest = max((len(token.encode()) for token in tokens), default=0)
    if np.any((lengths <= longest) & (lengths > 0)):
        is_token = pc.is_in(trimmed, value_set=pa.array(tokens, type=trimmed.type))
        token_np = to_numpy_bool(is_token)
    else:
        token_np = np.zeros(len(trimmed), dtype=bool)
    missing = null_np | blank_np | token_np
    token_counts: dict[str, int] = {}
    token_hits = int(np.count_nonzero(token_np))
    if token_hits:
        counted = pc.value_counts(pc.filter(trimmed, pa.array(token_np)))
        for item in counted.to_pylist():
            token_counts[item["values"]] = int(item["counts"])
    blanks = int(np.count_nonzero(blank_np))
    counts = MissingCounts(null=raw.null_count, blank=blanks, tokens=token_counts)
    padded = int(np.count_nonzero((raw_lengths != lengths) & ~missing))
    cleaned = trimmed
    if blanks or token_hits:
        cleaned = pc.if_else(pa.array(missing), pa.scalar(None, trimmed.type), trimmed)
    return cleaned, missing, counts, padded


def _clean_numbers(raw: pa.Array, plan: BatchPlan) -> np.ndarray | None:
    """Numbers of a text column when every present cell is a plain finite number, else None.

    This fast path skips trimming and token checks: the compiled decimal parse
    (``worker.profiling.native.parse_decimals``) and Arrow's cast both refuse
    blanks, whitespace and words, so a successful parse means there are none.
    The compiled parse takes plain decimals, exactly; text it does not take
    (decimal commas, exponents past the fast path) goes to Arrow's cast.
    """
    if plan.decimal == "." and not plan.thousands:
        values = parse_decimals(raw)
        if values is not None:
            return values
    text = plain_number_text(raw, plan.decimal, plan.thousands)
    try:
        parsed = pc.cast(text, pa.float64())
    except (pa.ArrowInvalid, pa.ArrowNotImplementedError):
        return None
    values = np.asarray(parsed.to_numpy(zero_copy_only=False), dtype=np.float64)
    if np.count_nonzero(~np.isfinite(values)) != raw.null_count:
        return None  # "nan", "inf" and the like take the careful path
    return values


@dataclass(frozen=True)
class PreparedColumn:
    """One column of a prepared batch (see ``PreparedBatch`` for the fields)."""

    missing: np.ndarray
    counts: MissingCounts
    numbers: np.ndarray | None = None
    labels: pa.Array | None = None
    text: pa.Array | None = None
    padded: int = 0
    label_counts: pa.StructArray | None = None  # value_counts of the labels, when known
    encoded: pa.DictionaryArray | None = None  # the labels dictionary-encoded, when known


def _clean_labels(name: str, column: pa.Array, plan: BatchPlan) -> PreparedColumn | None:
    """A label column whose labels need no trimming and hold no missing token, else None.

    Labels repeat, so the checks run on the distinct labels of the batch, not on
    every cell. One dictionary encoding gives both the label counts (a bincount
    of its indices, in order of first appearance as ``value_counts`` gives them)
    and the codes the across-column counts use, so the labels are hashed once.
    """
    encoded = dictionary_encode(column)
    values = encoded.dictionary
    indices = encoded.indices
    if indices.null_count:
        indices = indices.drop_null()
    tally = np.bincount(indices.to_numpy(zero_copy_only=False), minlength=len(values))
    counted = pa.StructArray.from_arrays(
        [values, pa.array(tally, pa.int64())], names=["values", "counts"]
    )
    if not _labels_are_clean(name, values, plan):
        return None
    return PreparedColumn(
        missing=null_mask(column),
        counts=MissingCounts(null=column.null_count, blank=0, tokens={}),
        labels=column,
        text=column,
        label_counts=counted,
        encoded=encoded,
    )


_ASCII_SPACE = " \t\n\v\f\r"  # what Arrow's ascii_trim_whitespace trims
_REMEMBERED_LABELS = 10_000  # per column; past it new labels are checked every batch


def _labels_are_clean(name: str, labels: pa.Array, plan: BatchPlan) -> bool:
    """True when none of a batch's distinct ``labels`` is blank, padded with whitespace
    or a missing token. A few hundred labels are checked in Python against those seen
    clean before (one conversion instead of eight Arrow calls a batch); many, in Arrow."""
    if not len(labels):
        return True
    tokens = plan.missing_tokens
    if len(labels) > 1_000:
        trimmed = pc.ascii_trim_whitespace(labels)
        return not (
            pc.any(pc.not_equal(pc.binary_length(trimmed), pc.binary_length(labels))).as_py()
            or pc.any(pc.equal(trimmed, "")).as_py()
            or pc.any(pc.is_in(trimmed, value_set=pa.array(tokens, trimmed.type))).as_py()
        )
    known = plan.clean_labels.setdefault(name, set())
    new = [label for label in labels.to_pylist() if label not in known]
    for label in new:
        trimmed = label.strip(_ASCII_SPACE)
        if trimmed != label or not trimmed or trimmed in tokens:
            return False
    if len(known) + len(new) <= _REMEMBERED_LABELS:
        known.update(new)
    return True


def _label_numbers(prepared: PreparedColumn, plan: BatchPlan) -> np.ndarray:
    """The numbers of a clean label column, parsed once per distinct label.

    The labels need no trimming and hold no missing token (``_clean_labels``
    checked), so parsing the dictionary and spreading it by the codes gives
    what parsing every cell would, at the cost of a few hundred casts.
    """
    encoded = prepared.encoded
    assert encoded is not None
    if not len(encoded.dictionary):  # every cell null
        return np.full(len(encoded), np.nan)
    per_label = parse_numbers(encoded.dictionary, decimal=plan.decimal, thousands=plan.thousands)
    numbers = per_label[encoded.indices.fill_null(0).to_numpy(zero_copy_only=False)]
    numbers[prepared.missing] = np.nan
    return numbers


def prepare_column(name: str, column: pa.Array, plan: BatchPlan) -> PreparedColumn:
    """Trim, mark missing cells and parse numbers of one column of a batch."""
    if is_text_type(column.type) and name in plan.numeric and name not in plan.labels:
        numbers = _clean_numbers(column, plan)
        if numbers is not None:
            mask = null_mask(column)
            detail = MissingCounts(null=column.null_count, blank=0, tokens={})
            return PreparedColumn(missing=mask, counts=detail, numbers=numbers, text=column)
    if is_text_type(column.type) and name in plan.labels:
        prepared = _clean_labels(name, column, plan)
        if prepared is not None:
            if name in plan.numeric:
                prepared = dataclasses.replace(prepared, numbers=_label_numbers(prepared, plan))
            return prepared
    if is_text_type(column.type):
        cleaned, mask, detail, padded = _text_missing(column, plan.missing_tokens)
        numbers = None
        if name in plan.numeric:
            numbers = parse_numbers(cleaned, decimal=plan.decimal, thousands=plan.thousands)
        return PreparedColumn(
            missing=mask,
            counts=detail,
            numbers=numbers,
            labels=cleaned if name in plan.labels else None,
            text=cleaned,
            padded=padded,
        )
    mask = null_mask(column)
    if pat.is_floating(column.type):
        mask = mask | to_numpy_bool(pc.is_nan(column))
    detail = MissingCounts(null=int(mask.sum()), blank=0, tokens={})
    numbers = labels = None
    if name in plan.numeric and (
        pat.is_integer(column.type) or pat.is_floating(column.type) or pat.is_decimal(column.type)
    ):
        numbers = typed_numbers(column)
    if name in plan.labels:
        labels = pc.cast(column, pa.string())
    return PreparedColumn(missing=mask, counts=detail, numbers=numbers, labels=labels, text=labels)


def assemble_batch(
    raw: pa.RecordBatch, offset: int, columns: dict[str, PreparedColumn]
) -> PreparedBatch:
    """A ``PreparedBatch`` from its prepared columns (in the batch's column order)."""
    return PreparedBatch(
        raw=raw,
        offset=offset,
        missing={name: c.missing for name, c in columns.items()},
        numbers={name: c.numbers for name, c in columns.items() if c.numbers is not None},
        labels={name: c.labels for name, c in columns.items() if c.labels is not None},
        text={name: c.text for name, c in columns.items() if c.text is not None},
        missing_counts={name: c.counts for name, c in columns.items()},
        padded={name: c.padded for name, c in columns.items()},
        encoded={name: c.encoded for name, c in columns.items() if c.encoded is not None},
    )


def prepare_batch(raw: pa.RecordBatch, offset: int, plan: BatchPlan) -> PreparedBatch:
    """Trim, mark missing cells and parse numbers once for the whole batch."""
    columns = {
        name: prepare_column(name, column, plan)
        for name, column in zip(raw.schema.names, raw.columns, strict=True)
    }
    return assemble_batch(raw, offset, columns)
