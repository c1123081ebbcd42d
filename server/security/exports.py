"""Neutralising spreadsheet formulas in exported cells.

A cell whose text starts with ``=``, ``+``, ``-``, ``@``, a tab or a carriage
return is read as a formula by spreadsheet programs, which can run commands or
leak data when a reviewer opens an export. Such cells get a leading single
quote, which spreadsheets show as text. Numbers stay numbers: ``-3.5`` as a
float is not touched, only text.

References: OWASP "CSV Injection" (community page, formula characters and the
single-quote prefix).
"""

from __future__ import annotations

from collections.abc import Iterable
from typing import Any

FORMULA_STARTS = ("=", "+", "-", "@", "\t", "\r")


def neutralise_cell(value: Any) -> Any:
    """The value as it is safe to write to a spreadsheet cell."""
    if isinstance(value, str) and value.startswith(FORMULA_STARTS):
        return "'" + value
    return value


def neutralise_row(row: Iterable[Any]) -> list[Any]:
    """Every cell of one row, neutralised."""
    return [neutralise_cell(value) for value in row]
