"""The missing-values picture: shares per column, split by how the value is missing."""

from __future__ import annotations

import plotly.graph_objects as go
import pytest

from server.pages.figures import missing_figure, missing_parts, missing_together_figure


def column(name: str, null: int, blank: int = 0, tokens=None, sentinels=None) -> dict:
    tokens = tokens or {}
    return {
        "name": name,
        "missing": null + blank + sum(tokens.values()),
        "missing_detail": {"null": null, "blank": blank, "tokens": tokens},
        "suspected_sentinels": [{"value": v, "count": n} for v, n in (sentinels or {}).items()],
    }


PROFILE = {
    "dataset": {"rows": 200},
    "columns": [
        column("berth", 0),
        column("depth_m", 10, 4, {"NA": 6}, {-999.0: 20}),
        column("pilot", 50),
    ],
}


def test_missing_parts_add_sentinels_to_the_missing_cells() -> None:
    assert missing_parts(PROFILE["columns"][1]) == {
        "null": 10,
        "blank": 4,
        "tokens": 6,
        "sentinels": 20,
    }
    assert missing_parts({"missing": 7})["null"] == 7  # no detail: all counted as empty


def test_missing_figure_stacks_the_shares_most_affected_first() -> None:
    figure = missing_figure(PROFILE)
    go.Figure(figure)
    assert figure["layout"]["yaxis"]["ticktext"] == ["pilot", "depth_m"]  # berth has no gaps
    stacked = [sum(trace["x"][i] for trace in figure["data"]) for i in range(2)]
    assert stacked == pytest.approx([50 / 200, 40 / 200])  # by construction
    assert [t["name"] for t in figure["data"]][-1].startswith("suspected stand-in")


def test_missing_figure_is_none_without_gaps() -> None:
    assert missing_figure({"dataset": {"rows": 3}, "columns": [column("a", 0)]}) is None


def test_missing_together_heatmap_is_symmetric() -> None:
    pairs = [{"a": "depth_m", "b": "pilot", "jaccard": 0.4, "both": 8}]
    figure = missing_together_figure(pairs)
    go.Figure(figure)
    assert figure["data"][0]["z"] == [[None, 0.4], [0.4, None]]
    assert figure["data"][0]["customdata"][1][0][3] == "8"
    assert missing_together_figure([{"a": "x", "b": "y"}]) is None
