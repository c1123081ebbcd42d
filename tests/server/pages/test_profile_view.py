"""What the pages show of a profile: card facts, flag groups, headline numbers."""

from __future__ import annotations

from server.pages.profile_view import (
    WHOLE_FILE,
    column_cards,
    column_facts,
    dataset_facts,
    file_size,
    flag_groups,
    flags_by_column,
    score_rows,
)


def flag(code: str, severity: str, *columns: str) -> dict:
    return {"code": code, "severity": severity, "columns": list(columns), "message": code}


PROFILE = {
    "dataset": {"rows": 100, "columns": 3, "missing_cells": 25, "duplicate_rows": 4},
    "source": {"bytes": 3 * 1024 * 1024},
    "columns": [
        {"name": "berth", "position": 0, "kind": "categorical", "count": 100, "missing": 0},
        {
            "name": "depth",
            "position": 1,
            "kind": "numeric",
            "count": 80,
            "missing": 20,
            "numeric": {
                "min": -999.0,
                "median": 4.5,
                "outliers": {"tukey_low": 3, "tukey_high": 0, "tukey_far": 3},
            },
        },
        {"name": "pilot", "position": 2, "kind": "text", "count": 95, "missing": 5},
    ],
    "flags": [
        flag("information.single-value", "info", "pilot"),
        flag("completeness.missing-share", "warning", "depth"),
        flag("completeness.disguised-missing", "critical", "depth"),
        flag("uniqueness.repeated-rows", "warning"),
        flag("redundancy.strong-pair", "info", "berth", "depth"),
    ],
}


def test_flag_groups_put_the_whole_file_first_then_the_worst_columns() -> None:
    groups = flag_groups(PROFILE)
    assert [g.column for g in groups] == [WHOLE_FILE, "depth", "berth", "pilot"]
    depth = groups[1]
    assert [f["severity"] for f in depth.flags] == ["critical", "warning"]
    assert depth.anchor == "col-1" and groups[0].anchor is None


def test_a_flag_on_two_columns_shows_on_both_cards() -> None:
    grouped = flags_by_column(PROFILE["flags"])
    assert [f["code"] for f in grouped["berth"]] == ["redundancy.strong-pair"]
    assert [f["code"] for f in grouped["depth"]][-1] == "redundancy.strong-pair"
    cards = column_cards(PROFILE)
    assert [c.worst for c in cards] == ["info", "critical", "info"]


def test_column_facts_by_kind() -> None:
    facts = {f.label: f for f in column_facts(PROFILE["columns"][1], rows=100)}
    assert facts["missing"].value == "20 (20.0 %)"
    assert facts["min"].value == "-999" and facts["median"].value == "4.5"
    assert facts["beyond Tukey's fences"].value == "3 below · 0 above"
    assert facts["mean"].value == "–"  # not in this profile: shown as unknown, not as 0


def test_dataset_facts_and_sizes() -> None:
    facts = {f.label: f for f in dataset_facts(PROFILE)}
    assert facts["missing cells"].hint == "8.3 %"  # 25 of 300 cells
    assert facts["repeated rows"].value == "4" and facts["file size"].value == "3.0 MiB"
    assert file_size(512) == "512 bytes" and file_size(1536) == "1.5 KiB"


def test_score_rows_lowest_first_without_repeating_the_name() -> None:
    score = {
        "dimensions": {"completeness": 98, "balance": 70, "stability": None},
        "reasons": {"completeness": "completeness 98: 2 % missing", "balance": "one label"},
    }
    rows = score_rows(score)
    assert [r["name"] for r in rows] == ["balance", "completeness"]
    assert rows[1]["reason"] == "2 % missing"
    assert score_rows(None) == []
