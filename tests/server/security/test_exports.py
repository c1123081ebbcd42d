"""Spreadsheet formula neutralisation (OWASP CSV Injection guidance)."""

from __future__ import annotations

import pytest

from server.security.exports import neutralise_cell, neutralise_row


@pytest.mark.parametrize(
    "cell",
    [
        "=1+1",
        '=HYPERLINK("http://evil.example","x")',
        "+41 22",
        "-2+3",
        "@SUM(A1:A2)",
        "\t=1+1",
        "\r=1+1",
    ],
)
def test_formula_starts_get_a_quote(cell: str) -> None:
    # The formula-triggering first characters listed by OWASP's CSV Injection page.
    assert neutralise_cell(cell) == "'" + cell


@pytest.mark.parametrize("cell", ["north", "1+1", " =1", "", "ada@example.org", "'=already"])
def test_plain_text_is_untouched(cell: str) -> None:
    assert neutralise_cell(cell) == cell


def test_numbers_stay_numbers() -> None:
    assert neutralise_row([-3.5, 0, None, "-3.5"]) == [-3.5, 0, None, "'-3.5"]
