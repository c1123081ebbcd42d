"""What every reader hands the engine: the source's description and its batches."""

from __future__ import annotations

from collections.abc import Iterator
from dataclasses import asdict, dataclass, field
from pathlib import Path
from types import TracebackType
from typing import Any

import pyarrow as pa


@dataclass
class SourceInfo:
    """How the file was read: the facts the profile's ``source`` section reports."""

    format: str
    encoding: str | None = None
    delimiter: str | None = None
    quotechar: str | None = None
    header: bool = True
    decimal: str = "."
    thousands: str | None = None
    compression: str | None = None
    sheets: list[str] = field(default_factory=list)
    sheet: str | None = None

    def as_dict(self) -> dict[str, Any]:
        """The fields as a plain dict for the profile document."""
        return asdict(self)


class ParseErrors:
    """Broken rows of one file: all counted, the first ``limit`` kept with their line."""

    def __init__(self, limit: int) -> None:
        self.limit = limit
        self.count = 0
        self.kept: list[dict[str, Any]] = []

    def add(self, line: int | None, message: str) -> None:
        """Count one broken row; keep it when there is room."""
        self.count += 1
        if len(self.kept) < self.limit:
            self.kept.append({"line": line, "message": message})


class TableSource:
    """A readable table: column names, batches of rows, and what went wrong on the way.

    Subclasses set ``info``, ``column_names`` and ``total_bytes`` in their
    constructor (reading only what they need to know them) and implement
    ``batches``. Text formats give every column as strings (null for an empty
    cell, the raw text otherwise); Parquet gives its native Arrow types.
    """

    info: SourceInfo
    column_names: list[str]
    total_bytes: int

    def __init__(self, path: Path, parse_error_limit: int) -> None:
        self.path = path
        self.total_bytes = path.stat().st_size
        self._errors = ParseErrors(parse_error_limit)
        self._consumed = 0

    @property
    def parse_errors(self) -> list[dict[str, Any]]:
        """The broken rows kept, each ``{"line": int | None, "message": str}``."""
        return self._errors.kept

    @property
    def parse_error_count(self) -> int:
        """How many broken rows there were, kept or not."""
        return self._errors.count

    def bytes_read(self) -> int:
        """Bytes of the file on disk consumed so far (an estimate while reading)."""
        return min(self._consumed, self.total_bytes)

    def batches(self) -> Iterator[pa.RecordBatch]:
        """The rows in batches, columns in ``column_names`` order."""
        raise NotImplementedError

    def close(self) -> None:
        """Release open files; safe to call twice."""

    def __enter__(self) -> TableSource:
        return self

    def __exit__(
        self,
        exc_type: type[BaseException] | None,
        exc: BaseException | None,
        tb: TracebackType | None,
    ) -> None:
        self.close()
