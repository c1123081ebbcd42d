"""Excel workbooks (.xlsx), read row by row with openpyxl's read-only mode.

The first sheet is read unless another is named; every sheet's name is
listed in the source description. Cells become text as Excel would show
them without formatting: numbers in their shortest form, dates in ISO 8601,
booleans as TRUE and FALSE. The workbook's XML is parsed by defusedxml
(openpyxl uses it when installed) and, before that, every part is checked for
document type declarations, which a workbook never needs and which entity
expansion attacks ("billion laughs") rely on.
"""

from __future__ import annotations

import datetime as dt
import zipfile
from collections.abc import Iterator
from pathlib import Path
from typing import Any

import pyarrow as pa

from worker.profiling.errors import ProfileError
from worker.profiling.options import ProfileOptions
from worker.profiling.readers.compressed import check_declared_sizes
from worker.profiling.readers.names import numbered_names, unique_names
from worker.profiling.readers.sniff import looks_like_data
from worker.profiling.readers.source import SourceInfo, TableSource

_DOCTYPE_SCAN_BYTES = 64 * 1024
_SNIFF_ROWS = 50  # rows looked at to find where the table starts


def is_xlsx(path: Path) -> bool:
    """True for a zip that holds an Office Open XML workbook."""
    try:
        with zipfile.ZipFile(path) as archive:
            names = set(archive.namelist())
    except (zipfile.BadZipFile, OSError):
        return False
    return "[Content_Types].xml" in names and "xl/workbook.xml" in names


def _refuse_unsafe_xml(path: Path, options: ProfileOptions) -> None:
    """ProfileError for a workbook whose XML declares a document type (or that inflates too far)."""
    with zipfile.ZipFile(path) as archive:
        check_declared_sizes(archive, options)
        for info in archive.infolist():
            if not info.filename.endswith((".xml", ".rels", ".vml")):
                continue
            with archive.open(info) as part:
                start = part.read(_DOCTYPE_SCAN_BYTES)
            if b"<!DOCTYPE" in start or b"<!ENTITY" in start:
                raise ProfileError(
                    f"the workbook part {info.filename} declares XML entities; "
                    "it is refused as unsafe"
                )


class XlsxSource(TableSource):
    """One sheet of an Excel workbook."""

    def __init__(self, path: Path, options: ProfileOptions, *, sheet: str | None = None) -> None:
        super().__init__(path, options.parse_error_limit)
        import openpyxl  # loaded for workbooks only: a fifth of a second to import

        if not openpyxl.DEFUSEDXML:
            raise ProfileError("Excel files are refused: the safe XML parser is not enabled")
        _refuse_unsafe_xml(path, options)
        self._batch_rows = options.batch_rows
        try:
            self._book = openpyxl.load_workbook(path, read_only=True, data_only=True)
        except Exception as exc:  # openpyxl raises many kinds for a damaged workbook
            raise ProfileError(f"the workbook cannot be opened ({exc})") from exc
        sheets = list(self._book.sheetnames)
        if not sheets:
            raise ProfileError("the workbook has no sheets")
        chosen = sheets[0] if sheet is None else sheet
        if chosen not in sheets:
            self._book.close()
            raise ProfileError(f"the workbook has no sheet {sheet!r}; it has {', '.join(sheets)}")
        self._sheet = self._book[chosen]
        self._expected_rows = self._sheet.max_row or 0
        self._start_row = 1
        self._widest = 0
        first = self._first_row()
        header = bool(first) and not any(
            cell is not None and (not isinstance(cell, str) or looks_like_data(cell, "."))
            for cell in first
        )
        if header:
            self.column_names, fixes = unique_names(first)
            for fix in fixes:
                self._errors.add(self._start_row, fix)
        else:
            self.column_names = numbered_names(self._widest)
        self._header = header
        self.info = SourceInfo(format="xlsx", header=header, sheets=sheets, sheet=chosen)

    def _first_row(self) -> list[Any]:
        """The header candidate: the first row not part of a title block above the table.

        Rows above the table (a title, an export note) hold at most half the
        cells most of the first rows hold; they are skipped and reported.
        """
        leading: list[tuple[int, list[Any]]] = []
        for number, row in enumerate(self._sheet.iter_rows(values_only=True), start=1):
            values = list(row)
            while values and values[-1] is None:
                values.pop()
            if values:
                leading.append((number, values))
            if len(leading) >= _SNIFF_ROWS:
                break
        if not leading:
            raise ProfileError(f"the sheet {self._sheet.title!r} is empty")
        widths = [len(values) for _, values in leading]
        modal = max(set(widths), key=widths.count)
        self._widest = max(widths)
        # A row of the modal width always qualifies, so one is found.
        index = next(i for i, width in enumerate(widths) if width * 2 > modal)
        self._start_row, values = leading[index]
        if index:
            self._errors.add(
                1,
                f"the {self._start_row - 1} row(s) above the table were skipped, "
                f"starting {leading[0][1][0]!r}",
            )
        return values

    def batches(self) -> Iterator[pa.RecordBatch]:
        width = len(self.column_names)
        rows: list[list[str | None]] = []
        skipped_header = not self._header
        try:
            for number, row in enumerate(self._sheet.iter_rows(values_only=True), start=1):
                if number < self._start_row:
                    continue
                cells = [_cell_text(value) for value in row]
                while cells and cells[-1] is None:
                    cells.pop()
                if not cells:
                    continue
                if not skipped_header:
                    skipped_header = True
                    continue
                if len(cells) > width:
                    self._errors.add(
                        number, f"the row has {len(cells)} cells where {width} columns belong"
                    )
                    continue
                rows.append(cells + [None] * (width - len(cells)))
                if len(rows) >= self._batch_rows:
                    self._consumed = self._estimate(number)
                    yield self._batch(rows)
                    rows = []
        except ProfileError:
            raise
        except Exception as exc:  # a damaged sheet fails inside openpyxl's parser
            raise ProfileError(f"the sheet cannot be read to its end ({exc})") from exc
        finally:
            self.close()
        if rows:
            yield self._batch(rows)
        self._consumed = self.total_bytes

    def _estimate(self, row_number: int) -> int:
        if not self._expected_rows:
            return 0
        return int(self.total_bytes * row_number / self._expected_rows)

    def _batch(self, rows: list[list[str | None]]) -> pa.RecordBatch:
        columns = [pa.array(list(values), type=pa.string()) for values in zip(*rows, strict=True)]
        return pa.RecordBatch.from_arrays(columns, names=self.column_names)

    def close(self) -> None:
        self._book.close()


def _cell_text(value: object) -> str | None:
    """A cell's value as the text a person would type for it."""
    if value is None or value == "":
        return None
    if isinstance(value, str):
        return value
    if isinstance(value, bool):
        return "TRUE" if value else "FALSE"
    if isinstance(value, float):
        if value.is_integer() and abs(value) < 2**53:
            return str(int(value))
        # Excel shows at most 15 significant digits (Microsoft's Excel
        # specifications and limits, recalled from memory): 0.1 + 0.2 is 0.3.
        return format(value, ".15g")
    if isinstance(value, dt.datetime):
        if value.time() == dt.time(0):
            return value.date().isoformat()
        return value.isoformat(sep=" ")
    if isinstance(value, dt.date | dt.time):
        return value.isoformat()
    return str(value)
