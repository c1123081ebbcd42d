"""Supplier history figures: one point per delivery, in delivery order."""

from __future__ import annotations

from datetime import UTC, datetime

import plotly.graph_objects as go

from server.pages.figures import column_history_figure, timeline_figure

WHEN = [datetime(2031, 3, d, tzinfo=UTC) for d in (2, 9, 16)]


def test_timeline_has_scores_over_rows() -> None:
    entries = [
        {"intake_id": i, "name": f"<w{i}>", "delivered_at": w, "rows": 100 * i, "score": 90 + i}
        for i, w in enumerate(WHEN, start=1)
    ]
    figure = timeline_figure(entries)
    go.Figure(figure)  # plotly's schema accepts it
    rows, scores = figure["data"]
    assert rows["y"] == [100, 200, 300] and scores["y"] == [91, 92, 93]
    assert rows["x"] == [w.isoformat() for w in WHEN] and rows["yaxis"] == "y2"
    assert rows["customdata"][0] == ["&lt;w1&gt;", 1]  # names from files are escaped
    assert timeline_figure([]) is None


def test_column_history_draws_a_band_for_numbers_and_shares_for_labels() -> None:
    numeric = [
        {
            "delivered_at": w,
            "mean": m,
            "median": m,
            "min": m - 2,
            "max": m + 2,
            "missing_share": 0.1,
        }
        for w, m in zip(WHEN, (10.0, 11.0, 14.0), strict=True)
    ]
    figure = column_history_figure(numeric, "water_temp_c")
    go.Figure(figure)
    names = [t["name"] for t in figure["data"]]
    assert names == ["max", "min to max", "mean", "median", "share missing"]
    assert figure["data"][2]["y"] == [10.0, 11.0, 14.0]
    labels = [
        {"delivered_at": w, "missing_share": 0.0, "top_label": "ok", "top_label_share": s}
        for w, s in zip(WHEN, (0.8, 0.7, 0.9), strict=True)
    ]
    figure = column_history_figure(labels, "status")
    go.Figure(figure)
    assert [t["name"] for t in figure["data"]] == ["share missing", "top label's share"]
    assert figure["layout"]["yaxis"]["range"] == [0, 1]
