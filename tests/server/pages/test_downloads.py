"""The column summary download: one row per column, formula-like cells neutralised."""

from __future__ import annotations

import csv
import io

from server.pages.downloads import SUMMARY_FIELDS, summary_csv

PROFILE = {
    "dataset": {"rows": 4},
    "columns": [
        {
            "name": '=HYPERLINK("x")',
            "position": 0,
            "kind": "categorical",
            "count": 4,
            "missing": 0,
            "distinct": 2,
            "labels": {"top": [{"value": "@sum", "share": 0.75}]},
        },
        {
            "name": "depth",
            "position": 1,
            "kind": "numeric",
            "count": 3,
            "missing": 1,
            "distinct": 3,
            "numeric": {"min": -2.5, "median": 1.0, "max": 4.0, "mean": 0.8},
        },
    ],
    "flags": [{"code": "completeness.missing-share", "severity": "warning", "columns": ["depth"]}],
}


def test_summary_rows_and_neutralised_cells() -> None:
    rows = list(csv.reader(io.StringIO(summary_csv(PROFILE))))
    assert rows[0] == list(SUMMARY_FIELDS)
    first, second = (dict(zip(SUMMARY_FIELDS, r, strict=True)) for r in rows[1:])
    # OWASP "CSV Injection": text starting with = + - @ gets a leading quote.
    assert first["name"] == '\'=HYPERLINK("x")' and first["top_label"] == "'@sum"
    assert second["min"] == "-2.5"  # a negative number stays a number
    assert second["missing_share"] == "0.25" and second["flags"] == "completeness.missing-share"
    assert first["position"] == "1" and second["mean"] == "0.8" and second["q1"] == ""
