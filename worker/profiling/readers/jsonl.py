"""JSON Lines: one flat JSON object per line, read as a table of text columns.

Columns are the keys in order of first appearance (a first pass collects
them, so a key that appears late still gets its column). Scalars keep their
JSON text (``true``, ``12.5``), nested values become JSON text, an empty
string or ``null`` is an empty cell. A line that is not a JSON object is
reported with its number and reading goes on.

References: JSON Lines text format, https://jsonlines.org (one UTF-8 JSON
value per line).
"""

from __future__ import annotations

import io
import json
import math
from collections.abc import Iterator
from pathlib import Path
from typing import Any

import orjson
import pyarrow as pa

from worker.profiling.errors import ProfileError
from worker.profiling.options import ProfileOptions
from worker.profiling.readers.compressed import GuardedStream, open_decompressed, read_head
from worker.profiling.readers.encoding import detect_encoding
from worker.profiling.readers.names import unique_names
from worker.profiling.readers.source import SourceInfo, TableSource


class JsonlSource(TableSource):
    """A JSON Lines file, plain or compressed."""

    def __init__(
        self, path: Path, options: ProfileOptions, *, compression: str | None = None
    ) -> None:
        super().__init__(path, options.parse_error_limit)
        self._options = options
        self._compression = compression
        self._raw: Any = None
        with self._binary() as stream:
            encoding = detect_encoding(read_head(stream, options.sniff_sample_bytes))
        self.info = SourceInfo(format="jsonl", encoding=encoding, compression=compression)
        keys = self._keys()
        if not keys:
            raise ProfileError("no line of the file holds a JSON object")
        self.column_names, fixes = unique_names(keys)
        for fix in fixes:
            self._errors.add(None, fix)
        self._column_of = dict(zip(keys, range(len(keys)), strict=True))

    def _binary(self) -> Any:
        if self._compression is None:
            self._raw = open(self.path, "rb")  # noqa: SIM115 (closed by the caller)
            return self._raw
        self._raw = open_decompressed(self.path, self._compression, self._options)
        return io.BufferedReader(self._raw)

    def _lines(self) -> Iterator[tuple[int, str]]:
        with (
            self._binary() as binary,
            io.TextIOWrapper(binary, encoding=self.info.encoding, errors="replace") as text,
        ):
            for number, line in enumerate(text, start=1):
                yield number, line.lstrip("\ufeff") if number == 1 else line

    def _keys(self) -> list[str]:
        """Every key of every object, in order of first appearance."""
        seen: dict[str, None] = {}
        for _, line in self._lines():
            try:
                value = _parse(line)
            except ValueError:
                continue
            if isinstance(value, dict):
                seen.update(dict.fromkeys(value))
        return list(seen)

    def bytes_read(self) -> int:
        if isinstance(self._raw, GuardedStream):
            return min(self._raw.compressed_bytes_read(), self.total_bytes)
        if self._raw is not None and not self._raw.closed:
            return min(self._raw.tell(), self.total_bytes)
        return self._consumed

    def batches(self) -> Iterator[pa.RecordBatch]:
        width = len(self.column_names)
        rows: list[list[str | None]] = []
        for number, line in self._lines():
            if not line.strip():
                continue
            try:
                value = _parse(line)
            except json.JSONDecodeError as exc:
                self._errors.add(
                    number, f"the line is not valid JSON ({exc.msg}, column {exc.colno})"
                )
                continue
            if not isinstance(value, dict):
                self._errors.add(number, "the line holds a JSON value that is not an object")
                continue
            row: list[str | None] = [None] * width
            for key, cell in value.items():
                row[self._column_of[key]] = _cell_text(cell)
            rows.append(row)
            if len(rows) >= self._options.batch_rows:
                yield self._batch(rows)
                rows = []
        if rows:
            yield self._batch(rows)
        self._consumed = self.total_bytes

    def _batch(self, rows: list[list[str | None]]) -> pa.RecordBatch:
        columns = [pa.array(list(values), type=pa.string()) for values in zip(*rows, strict=True)]
        return pa.RecordBatch.from_arrays(columns, names=self.column_names)

    def close(self) -> None:
        if self._raw is not None:
            self._raw.close()


_INT64_BOUND = 2.0**63  # orjson gives a float for an integer this large


def _parse(line: str) -> Any:
    """One line's JSON value, parsed by orjson (several times faster than the standard
    library). orjson turns integers past 64 bits into floats, so a line with a value that
    large is parsed again by ``json.loads``, keeping an identifier's digits; so is a line
    orjson refuses (NaN, for one), and ``json``'s ``JSONDecodeError`` names the fault."""
    try:
        value = orjson.loads(line)
    except orjson.JSONDecodeError:
        return json.loads(line)
    if isinstance(value, dict) and any(
        type(cell) is float and abs(cell) >= _INT64_BOUND for cell in value.values()
    ):
        return json.loads(line)
    return value


_ENCODER = json.JSONEncoder(ensure_ascii=False)  # one encoder, not one per call of json.dumps


def _cell_text(value: object) -> str | None:
    """A JSON value as cell text: strings as they are, everything else as JSON.

    Booleans, integers and finite floats take the text json.dumps would give them
    (``true``, ``12``, ``float.__repr__``) without a trip through the encoder.
    """
    if value is None or value == "":
        return None
    if isinstance(value, str):
        return value
    if value is True:
        return "true"
    if value is False:
        return "false"
    if isinstance(value, int):
        return str(value)
    if isinstance(value, float) and math.isfinite(value):
        return repr(value)
    return _ENCODER.encode(value)
