"""On-demand questions over an intake's columnar copy (see ``worker.profiling.columnar``).

Pure functions of a Parquet path: a crosstab of two label columns, the label
counts of one column, sample rows and one column's values, each optionally
within a filter ``where`` ({column: label}, all must hold; None as a label
means "missing"). Only the columns a question needs are read, and labels are
cleaned exactly as the engine cleans them (``worker.profiling.prepared``:
trimmed, and null when blank or a missing token), so "Female " and "Female"
are one label here as in the profile. The crosstab's statistics are the
profile's own (``worker.profiling.relations.crosstab``).
"""

from __future__ import annotations

import os
from collections.abc import Mapping
from pathlib import Path
from typing import Any

import numpy as np
import pyarrow as pa
import pyarrow.compute as pc
import pyarrow.parquet as pq

from worker.profiling.options import ProfileOptions
from worker.profiling.prepared import BatchPlan, prepare_column
from worker.profiling.relations.crosstab import crosstab_statistics

Where = Mapping[str, str | None] | None
OTHER_LABEL = "(other labels)"


class QueryError(ValueError):
    """A question that cannot be answered (no copy, unknown column); the message says why."""


def _open(path: str | os.PathLike[str]) -> pq.ParquetFile:
    try:
        return pq.ParquetFile(Path(path))
    except (FileNotFoundError, OSError, pa.ArrowInvalid) as exc:
        raise QueryError("the intake has no readable columnar copy") from exc


def _check_columns(file: pq.ParquetFile, names: list[str]) -> None:
    known = set(file.schema_arrow.names)
    unknown = [name for name in names if name not in known]
    if unknown:
        raise QueryError(f"no column named {', '.join(repr(n) for n in unknown)}")


def _clean_labels(raw: pa.Array, options: ProfileOptions) -> pa.Array:
    """Labels as the engine prepares them (``prepare_column``): trimmed, null where missing."""
    plan = BatchPlan(
        numeric=frozenset(), labels=frozenset(["v"]), missing_tokens=tuple(options.missing_tokens)
    )
    labels = prepare_column("v", raw, plan).labels
    assert labels is not None
    return labels


class LabelColumn:
    """A label column as codes into its labels: -1 where the cell is missing.

    The engine's cleaning is applied to each row group's dictionary of distinct
    raw texts (Parquet stores text dictionary-encoded), not to every cell, and
    the cleaned dictionaries are encoded once more into one label list, so a
    million rows of a few labels cost little more than reading their codes.
    """

    def __init__(self, column: pa.ChunkedArray, options: ProfileOptions) -> None:
        chunks = [
            chunk if pa.types.is_dictionary(chunk.type) else pc.dictionary_encode(chunk)
            for chunk in column.chunks
        ]
        cleaned = [_clean_labels(chunk.dictionary, options) for chunk in chunks]
        if cleaned:
            both = pc.dictionary_encode(pa.concat_arrays([c.cast(pa.string()) for c in cleaned]))
            self.labels: list[str] = both.dictionary.to_pylist()
            global_codes = both.indices.fill_null(-1).to_numpy(zero_copy_only=False)
        else:
            self.labels, global_codes = [], np.empty(0, dtype=np.int64)
        parts, start = [], 0
        for chunk, clean in zip(chunks, cleaned, strict=True):
            lookup = np.append(global_codes[start : start + len(clean)], -1).astype(np.int64)
            local = chunk.indices.fill_null(len(clean)).to_numpy(zero_copy_only=False)
            parts.append(lookup[local])
            start += len(clean)
        self.codes = np.concatenate(parts) if parts else np.empty(0, dtype=np.int64)

    def matches(self, value: str | None) -> np.ndarray:
        """Rows whose cleaned label is ``value`` (None: rows where the cell is missing)."""
        if value is None:
            return self.codes < 0
        try:
            return self.codes == self.labels.index(str(value).strip())
        except ValueError:
            return np.zeros(len(self.codes), dtype=bool)


def _read(
    path: str | os.PathLike[str],
    labels_of: list[str],
    where: Where,
    options: ProfileOptions,
) -> tuple[pq.ParquetFile, dict[str, LabelColumn], np.ndarray | None]:
    """The file, the label columns of ``labels_of`` and of the filter, and the row mask."""
    file = _open(path)
    where = dict(where or {})
    needed = list(dict.fromkeys([*labels_of, *where]))
    _check_columns(file, needed)
    text = [name for name in needed if pa.types.is_string(file.schema_arrow.field(name).type)]
    table = pq.read_table(path, columns=needed, read_dictionary=text) if needed else None
    labels = {name: LabelColumn(table.column(name), options) for name in needed} if needed else {}
    mask = None
    for name, value in where.items():
        hit = labels[name].matches(value)
        mask = hit if mask is None else (mask & hit)
    return file, labels, mask


def _take_rows(file: pq.ParquetFile, rows: np.ndarray, columns: list[str]) -> pa.Table:
    """The given rows (ascending row numbers) of ``columns``, reading only their row groups."""
    sizes = [file.metadata.row_group(i).num_rows for i in range(file.num_row_groups)]
    starts = np.concatenate([[0], np.cumsum(sizes)]).astype(np.int64)
    groups = np.unique(np.searchsorted(starts, rows, side="right") - 1)
    if len(groups) == 0:
        return file.schema_arrow.empty_table().select(columns)
    table = file.read_row_groups([int(g) for g in groups], columns=columns)
    local_starts = np.concatenate([[0], np.cumsum([sizes[g] for g in groups])])
    group_of = np.searchsorted(starts, rows, side="right") - 1
    position = np.searchsorted(groups, group_of)
    local = local_starts[position] + (rows - starts[group_of])
    return table.take(pa.array(local))


def label_counts(
    path: str | os.PathLike[str],
    column: str,
    where: Where = None,
    *,
    limit: int = 100,
    options: ProfileOptions | None = None,
) -> list[dict[str, Any]]:
    """Counts and shares of a column's labels among the rows matching ``where``.

    Most frequent first; at most ``limit`` labels, then one entry
    "(other labels)" for the rest; missing cells last as ``value`` None.
    Shares are of the matching rows, missing ones included.
    """
    options = options or ProfileOptions()
    _, labels, mask = _read(path, [column], where, options)
    label = labels[column]
    codes = label.codes if mask is None else label.codes[mask]
    total = len(codes)
    counts = np.bincount(codes[codes >= 0], minlength=len(label.labels))
    counted = sorted(
        ((label.labels[i], int(c)) for i, c in enumerate(counts) if c), key=lambda x: (-x[1], x[0])
    )
    out = [
        {"value": value, "count": count, "share": count / total} for value, count in counted[:limit]
    ]
    rest = sum(count for _, count in counted[limit:])
    if rest:
        out.append({"value": OTHER_LABEL, "count": rest, "share": rest / total, "other": True})
    missing = int((codes < 0).sum())
    if missing:
        out.append({"value": None, "count": missing, "share": missing / total})
    return out


def crosstab(
    path: str | os.PathLike[str],
    a: str,
    b: str,
    where: Where = None,
    *,
    max_labels: int = 30,
    options: ProfileOptions | None = None,
) -> dict[str, Any]:
    """The crosstab of label columns ``a`` (rows) and ``b`` (columns) within ``where``.

    Rows missing either label are left out. When a column has more than
    ``max_labels`` labels, the most frequent are kept and the rest folded into
    "(other labels)" (``folded`` says which sides were). The statistics are
    those of the profile's crosstabs; they are None when fewer than two labels
    remain on a side.
    """
    if a == b:
        raise QueryError("a crosstab needs two different columns")
    options = options or ProfileOptions()
    _, labels, mask = _read(path, [a, b], where, options)
    code_a, code_b = labels[a].codes, labels[b].codes
    keep = (code_a >= 0) & (code_b >= 0)
    if mask is not None:
        keep &= mask
    folded, sides, codes = [], [], []
    for name, label, code in ((a, labels[a], code_a[keep]), (b, labels[b], code_b[keep])):
        counts = np.bincount(code, minlength=len(label.labels))
        present = np.flatnonzero(counts)
        ranked = present[
            np.lexsort((np.array(label.labels, dtype=object)[present], -counts[present]))
        ]
        kept = sorted(ranked[:max_labels], key=lambda i: label.labels[i])
        lookup = np.full(len(label.labels), len(kept), dtype=np.int64)
        lookup[kept] = np.arange(len(kept))
        names = [label.labels[i] for i in kept]
        if len(ranked) > max_labels:
            folded.append(name)
            names.append(OTHER_LABEL)
        sides.append(names)
        codes.append(lookup[code])
    size_a, size_b = len(sides[0]), len(sides[1])
    table = np.bincount(codes[0] * size_b + codes[1], minlength=size_a * size_b)
    table = table.reshape(size_a, size_b)
    thresholds = options.thresholds
    doc = crosstab_statistics(
        a,
        b,
        sides[0],
        sides[1],
        table,
        sort_labels=False,
        min_expected=thresholds.cochran_min_expected,
        low_share=thresholds.cochran_low_share,
    )
    if doc is None:
        doc = {
            "a": a,
            "b": b,
            "n": int(table.sum()),
            "counts": {"a_labels": sides[0], "b_labels": sides[1], "matrix": table.tolist()},
            "row_shares": None,
            "chi2": None,
            "dof": None,
            "p_value": None,
            "residuals": None,
            "cochran_ok": None,
        }
    doc["where"] = dict(where or {})
    doc["folded"] = folded
    return doc


def sample_rows(
    path: str | os.PathLike[str],
    n: int,
    where: Where = None,
    *,
    seed: int = 0,
    options: ProfileOptions | None = None,
) -> list[dict[str, Any]]:
    """Up to ``n`` rows drawn uniformly (seeded) among those matching ``where``, in row order.

    Each row is {"row": its 0-based row number, "values": {column: raw cell}}: the
    cells as delivered, untrimmed, so a person sees what the supplier sent.
    """
    options = options or ProfileOptions()
    file, _, mask = _read(path, [], where, options)
    candidates = np.arange(file.metadata.num_rows) if mask is None else np.flatnonzero(mask)
    if len(candidates) > n:
        chosen = np.sort(np.random.default_rng(seed).choice(candidates, n, replace=False))
    else:
        chosen = candidates
    records = _take_rows(file, chosen, file.schema_arrow.names).to_pylist()
    return [
        {"row": int(row), "values": record} for row, record in zip(chosen, records, strict=True)
    ]


def column_values(
    path: str | os.PathLike[str],
    column: str,
    limit: int = 100,
    *,
    offset: int = 0,
    where: Where = None,
    options: ProfileOptions | None = None,
) -> dict[str, Any]:
    """One column's raw cells in row order: ``limit`` of them from the ``offset``-th match.

    Returns {"column", "total" (matching rows), "offset", "rows" (0-based row numbers),
    "values" (raw cells, None for an empty cell)}.
    """
    options = options or ProfileOptions()
    file, _, mask = _read(path, [], where, options)
    _check_columns(file, [column])
    rows = np.arange(file.metadata.num_rows) if mask is None else np.flatnonzero(mask)
    page = rows[offset : offset + limit]
    values = _take_rows(file, page, [column]).column(column).to_pylist()
    return {
        "column": column,
        "total": len(rows),
        "offset": offset,
        "rows": [int(r) for r in page],
        "values": values,
    }
