"""How a delimited text file is written, guessed from a sample of its first lines.

The delimiter is the candidate (comma, semicolon, tab, pipe) that splits the
sample's records into the most consistent number of fields; the header is
present unless the first record looks like data; the decimal mark and the
thousands separator come from the shapes of the numbers in the sample.
"""

from __future__ import annotations

import csv
import re
from collections import Counter
from dataclasses import dataclass

CANDIDATES = (",", ";", "\t", "|")
# On equal consistency, a rarer delimiter wins: a file that splits evenly on
# semicolons or tabs uses them on purpose (commas also appear inside values).
PRIORITY = {"\t": 0, ";": 1, "|": 2, ",": 3}
MAX_SAMPLE_RECORDS = 500

_POINT_DECIMAL = re.compile(r"^[+-]?(\d{1,3}(,\d{3})+|\d+)\.\d+$")
_COMMA_DECIMAL = re.compile(r"^[+-]?(\d{1,3}(\.\d{3})+|\d+),\d+$")
_COMMA_GROUPS = re.compile(r"^[+-]?\d{1,3}(,\d{3})+(\.\d+)?$")
_DOT_GROUPS = re.compile(r"^[+-]?\d{1,3}(\.\d{3})+(,\d+)?$")
_SPACE_GROUPS = re.compile(r"^[+-]?\d{1,3}([ \u00a0\u202f]\d{3})+([.,]\d+)?$")
_NUMBER = re.compile(r"^[+-]?(\d[\d.,  \u00a0\u202f]*|[.,]\d+)([eE][+-]?\d+)?$")
_SEP_LINE = re.compile(r"sep=[^\w\s]|sep=\t")
_DATE = re.compile(r"^\d{4}-\d{1,2}-\d{1,2}|^\d{1,2}[/.-]\d{1,2}[/.-]\d{2,4}$")


@dataclass(frozen=True)
class Dialect:
    """The writing conventions of one delimited file."""

    delimiter: str = ","
    quotechar: str = '"'
    header: bool = True
    decimal: str = "."
    thousands: str | None = None


def declared_delimiter(text: str) -> str | None:
    """The delimiter a first line ``sep=;`` declares (spreadsheet programs write and
    honour it), or None."""
    first = text.split("\n", 1)[0].rstrip("\r")
    return first[4] if _SEP_LINE.fullmatch(first) else None


def sniff_dialect(text: str, *, complete: bool, delimiter: str | None = None) -> Dialect:
    """Guess the dialect of ``text``, the decoded start of a file.

    ``complete`` says the sample is the whole file; otherwise its last line
    may be cut off and is ignored. ``delimiter``, when given, is not guessed.
    """
    lines = text.splitlines()
    if not complete and len(lines) > 1:
        lines = lines[:-1]
    lines = [line for line in lines if line.strip()][:MAX_SAMPLE_RECORDS]
    if not lines:
        return Dialect()
    quotechar = _quotechar(lines)
    delimiter = delimiter or _delimiter(lines, quotechar)
    records = split_records(lines, delimiter, quotechar)
    decimal, thousands = _number_style([cell for row in records[1:] for cell in row])
    return Dialect(
        delimiter=delimiter,
        quotechar=quotechar,
        header=_has_header(records, decimal),
        decimal=decimal,
        thousands=thousands,
    )


def preamble_lines(text: str, dialect: Dialect, *, limit: int = 20) -> int:
    """How many physical lines before the table a person wrote (a title, an export note).

    They are the leading lines with at most half the fields most records of
    the sample have (blank lines among them included); 0 when the table
    starts at once. A header that is merely short is not a preamble.
    """
    lines = text.splitlines()
    records = split_records(
        [line for line in lines if line.strip()][:MAX_SAMPLE_RECORDS],
        dialect.delimiter,
        dialect.quotechar,
    )
    widths = [len(row) for row in records]
    if not widths:
        return 0
    modal = Counter(widths).most_common(1)[0][0]
    if modal < 2:
        return 0
    for index, line in enumerate(lines[: limit + 1]):
        if not line.strip():
            continue
        fields = split_records([line], dialect.delimiter, dialect.quotechar)
        if fields and len(fields[0]) * 2 > modal:
            return index
    return 0


def split_records(lines: list[str], delimiter: str, quotechar: str) -> list[list[str]]:
    """The sample's lines split into fields, quotes honoured; blank records dropped."""
    reader = csv.reader(lines, delimiter=delimiter, quotechar=quotechar, doublequote=True)
    try:
        return [row for row in reader if row]
    except csv.Error:
        return [line.split(delimiter) for line in lines]


def _quotechar(lines: list[str]) -> str:
    """A double quote unless single quotes clearly wrap the fields and doubles never appear."""
    doubles = sum(line.count('"') for line in lines)
    singles = sum(len(re.findall(r"(?:^|[,;\t|])'", line)) for line in lines)
    return "'" if doubles == 0 and singles >= len(lines) else '"'


def _delimiter(lines: list[str], quotechar: str) -> str:
    """The candidate giving the most consistent field count (more than one field)."""
    best: tuple[float, int, int] | None = None
    chosen = ","
    for candidate in CANDIDATES:
        counts = [len(row) for row in split_records(lines, candidate, quotechar)]
        if not counts:
            continue
        modal, times = Counter(counts).most_common(1)[0]
        if modal < 2:
            continue
        score = (times / len(counts), -PRIORITY[candidate], modal)
        if best is None or score > best:
            best, chosen = score, candidate
    return chosen


def _number_style(cells: list[str]) -> tuple[str, str | None]:
    """The decimal mark and thousands separator most numbers of the sample use."""
    point = comma = 0
    comma_groups = dot_groups = 0
    space: str | None = None
    for raw in cells:
        cell = raw.strip()
        if not cell or not cell[-1].isdigit():
            continue
        if _SPACE_GROUPS.match(cell):
            space = space or next(char for char in cell if char in " \u00a0\u202f")
            cell = re.sub(r"[ \u00a0\u202f]", "", cell)
        if _COMMA_GROUPS.match(cell) and (cell.count(",") > 1 or "." in cell):
            comma_groups += 1
        if _DOT_GROUPS.match(cell) and (cell.count(".") > 1 or "," in cell):
            dot_groups += 1
        if _POINT_DECIMAL.match(cell) and not _DOT_GROUPS.match(cell):
            point += 1
        elif _COMMA_DECIMAL.match(cell) and not _COMMA_GROUPS.match(cell):
            comma += 1
    decimal = "," if comma > point else "."
    thousands: str | None = None
    if space:
        thousands = space
    if decimal == "." and comma_groups:
        thousands = ","
    elif decimal == "," and dot_groups:
        thousands = "."
    return decimal, thousands


def looks_like_data(cell: str, decimal: str) -> bool:
    cell = cell.strip()
    return bool(cell) and bool(_NUMBER.match(cell) or _DATE.match(cell))


def _has_header(records: list[list[str]], decimal: str) -> bool:
    """A first record with numbers or dates, or one whose values recur below it, is data."""
    if len(records) < 2:
        return not any(looks_like_data(cell, decimal) for cell in records[0])
    first, rest = records[0], records[1:]
    if any(looks_like_data(cell, decimal) for cell in first):
        return False
    width = len(first)
    recurring = 0
    for index, cell in enumerate(first):
        below = {row[index] for row in rest if len(row) == width}
        if cell and cell in below:
            recurring += 1
    return recurring * 2 < width
