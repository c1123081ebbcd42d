"""Flattening a profile document into column rows, and JSON-safe values."""

from __future__ import annotations

import math

import numpy as np

from worker.jobs.summaries import column_rows, json_safe, overall_score

PROFILE = {
    "dataset": {"rows": 10},
    "columns": [
        {
            "name": "weight_kg",
            "position": 0,
            "kind": "numeric",
            "count": 8,
            "missing": 2,
            "distinct": 7,
            "numeric": {"mean": 3.5, "median": 3.0, "std": 1.25, "min": 1, "max": 9.5},
        },
        {
            "name": "species",
            "position": 1,
            "kind": "categorical",
            "count": 10,
            "missing": 0,
            "distinct": 3,
            "labels": {"top": [{"value": "cod", "count": 6, "share": 0.6}]},
        },
        {"name": "empty", "position": 2, "kind": "empty", "count": 0, "missing": 10},
    ],
    "score": {"overall": 87.5},
}


def test_column_rows_copy_the_headline_figures() -> None:
    weight, species, empty = column_rows(PROFILE)
    assert weight["missing_share"] == 0.2
    assert (weight["mean"], weight["median"], weight["std"]) == (3.5, 3.0, 1.25)
    assert (weight["min"], weight["max"]) == (1.0, 9.5)
    assert weight["top_label"] is None
    assert (species["top_label"], species["top_label_share"]) == ("cod", 0.6)
    assert species["mean"] is None
    assert empty["missing_share"] == 1.0
    assert overall_score(PROFILE) == 87.5


def test_profile_without_optional_sections_still_flattens() -> None:
    rows = column_rows({"columns": [{"name": "a", "position": 0}]})
    assert rows == [
        {
            "name": "a",
            "position": 0,
            "kind": None,
            "missing_share": None,
            "distinct": None,
            "mean": None,
            "median": None,
            "std": None,
            "min": None,
            "max": None,
            "top_label": None,
            "top_label_share": None,
        }
    ]
    assert overall_score({"score": None}) is None


def test_json_safe_removes_nan_and_numpy_types() -> None:
    cleaned = json_safe(
        {"a": math.nan, "b": [np.float64(1.5), np.int64(3), math.inf], "c": (np.bool_(True),)}
    )
    assert cleaned == {"a": None, "b": [1.5, 3, None], "c": [True]}
    assert type(cleaned["b"][1]) is int
