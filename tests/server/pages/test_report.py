"""The standalone report: one offline file, every value from the file escaped."""

from __future__ import annotations

import json
import re
from datetime import UTC, datetime
from pathlib import Path

import pandas as pd

from server.pages import figures
from server.pages.report import render_report
from tests.server.pages.profile_sections import crosstab, label_column, numeric_column

HOSTILE = "</script><script>alert(1)</script>"
FIXED = datetime(2026, 3, 1, 9, 30, tzinfo=UTC)
JSON_BLOCK = re.compile(r'<script type="application/json" id="(fig-[^"]+)">(.*?)</script>', re.S)


def hostile_profile() -> dict:
    frame = pd.DataFrame({HOSTILE: ["a", HOSTILE, "a", "b"] * 5, "depth": [1.0, 2.5, 3.0, 4.5] * 5})
    labels = label_column(HOSTILE, frame[HOSTILE], position=0)
    depth = numeric_column("depth", frame["depth"], position=1)
    return {
        "format_version": 1,
        "source": {"name": HOSTILE + ".csv", "bytes": 120, "format": "csv"},
        "dataset": {"rows": 20, "columns": 2, "missing_cells": 0, "parse_errors": []},
        "columns": [labels, depth],
        "pairs": [{"a": HOSTILE, "b": "depth", "method": "eta", "value": 0.4, "n": 20}],
        "twins": [],
        "crosstabs": [crosstab(frame.assign(other=["x", "y"] * 10), HOSTILE, "other")],
        "flags": [
            {
                "code": "balance.dominant-label",
                "severity": "warning",
                "columns": [HOSTILE],
                "message": f"'{HOSTILE}' is mostly one label.",
                "evidence": {},
            }
        ],
        "score": {"overall": 80, "dimensions": {"balance": 80}, "reasons": {"balance": HOSTILE}},
        "verdict": "review",
    }


def test_values_from_the_file_never_reach_the_page_as_markup() -> None:
    html = render_report(hostile_profile(), generated_at=FIXED)
    assert HOSTILE not in html
    assert "<script>alert(1)" not in html
    assert "&lt;/script&gt;&lt;script&gt;alert(1)&lt;/script&gt;" in html  # shown as text


def test_embedded_figures_are_json_that_parses_back_to_the_figures() -> None:
    profile = hostile_profile()
    html = render_report(profile, generated_at=FIXED)
    blocks = {key: json.loads(text) for key, text in JSON_BLOCK.findall(html)}
    assert blocks["fig-col-1"] == figures.numeric_figure(profile["columns"][1])
    assert blocks["fig-col-0"] == figures.labels_figure(profile["columns"][0])
    assert blocks["fig-xt-0"] == figures.crosstab_figure(profile["crosstabs"][0])
    assert blocks["fig-corr-eta"]["data"][0]["type"] == "heatmap"
    # Every [data-figure] placeholder has its JSON block.
    assert set(re.findall(r'data-figure="([^"]+)"', html)) == set(blocks)


def test_report_is_self_contained() -> None:
    html = render_report(hostile_profile(), generated_at=FIXED)
    assert not re.search(r"""<(script|img|link|iframe)[^>]+(src|href)=["']?(https?:)?//""", html)
    assert "<link" not in html
    assert "Plotly" in html and "--tw-blue" in html  # plotly.js and the stylesheet inlined
    # Exactly the scripts we put there: plotly, ours, and the JSON blocks.
    code_scripts = re.findall(r"<script>", html)
    assert len(code_scripts) == 2


def test_report_of_a_bare_profile_renders(tmp_path: Path) -> None:
    bare = {"source": {"name": "empty.csv"}, "dataset": {"rows": 0}, "columns": []}
    html = render_report(bare, generated_at=FIXED)
    assert "No flags were raised." in html and "No scorecard in this profile." in html
    assert render_report(bare, generated_at=FIXED) == html  # same input, same report
