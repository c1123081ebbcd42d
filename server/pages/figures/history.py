"""Figures of a supplier's deliveries over time: scores and rows, one column's figures."""

from __future__ import annotations

from typing import Any

from server.pages import palette
from server.pages.figures.base import Figure, axis, base_layout, finite, safe_text, top_legend


def _when(entry: dict[str, Any]) -> str:
    value = entry.get("delivered_at")
    return value.isoformat() if hasattr(value, "isoformat") else str(value)


def timeline_figure(entries: list[dict[str, Any]]) -> Figure | None:
    """Score of each delivery (line, left axis) over its row count (bars, right axis)."""
    if not entries:
        return None
    when = [_when(e) for e in entries]
    names = [[safe_text(e.get("name")), e.get("intake_id")] for e in entries]
    data = [
        {
            "type": "bar",
            "name": "rows",
            "x": when,
            "y": [e.get("rows") for e in entries],
            "yaxis": "y2",
            "marker": {"color": palette.OKABE_ITO["sky_blue"], "opacity": 0.55},
            "customdata": names,
            "hovertemplate": "#%{customdata[1]} %{customdata[0]}<br>%{y} rows<extra></extra>",
        },
        {
            "type": "scatter",
            "mode": "lines+markers",
            "name": "overall score",
            "x": when,
            "y": [e.get("score") for e in entries],
            "line": {"color": palette.OKABE_ITO["blue"], "width": 2},
            "marker": {"size": 9, "symbol": "diamond"},
            "customdata": names,
            "hovertemplate": "#%{customdata[1]} %{customdata[0]}<br>score %{y}<extra></extra>",
        },
    ]
    layout = base_layout(height=300)
    top_legend(layout)
    layout["xaxis"] = axis("delivered", type="date")
    layout["yaxis"] = axis("overall score", range=[0, 101])
    layout["yaxis2"] = axis(
        "rows", overlaying="y", side="right", rangemode="tozero", showgrid=False
    )
    layout["margin"]["r"] = 64
    return {"data": data, "layout": layout}


def column_history_figure(points: list[dict[str, Any]], column: str) -> Figure | None:
    """One column over the deliveries: min–max band, mean and median for numbers; the
    share missing and the top label's share for any kind."""
    if not points:
        return None
    when = [_when(p) for p in points]
    numeric = any(finite(p.get("mean")) is not None for p in points)
    data: list[dict[str, Any]] = []
    if numeric:
        data += [
            {
                "type": "scatter",
                "mode": "lines",
                "name": "max",
                "x": when,
                "y": [p.get("max") for p in points],
                "line": {"width": 0},
                "hoverinfo": "skip",
                "showlegend": False,
            },
            {
                "type": "scatter",
                "mode": "lines",
                "name": "min to max",
                "x": when,
                "y": [p.get("min") for p in points],
                "fill": "tonexty",
                "fillcolor": "rgba(86,180,233,0.25)",
                "line": {"width": 0},
                "hoverinfo": "skip",
            },
            {
                "type": "scatter",
                "mode": "lines+markers",
                "name": "mean",
                "x": when,
                "y": [p.get("mean") for p in points],
                "line": {"color": palette.OKABE_ITO["blue"], "width": 2},
            },
            {
                "type": "scatter",
                "mode": "lines+markers",
                "name": "median",
                "x": when,
                "y": [p.get("median") for p in points],
                "line": {"color": palette.OKABE_ITO["orange"], "width": 2, "dash": "dash"},
            },
        ]
    data += [
        {
            "type": "scatter",
            "mode": "lines+markers",
            "name": "share missing",
            "x": when,
            "y": [p.get("missing_share") for p in points],
            "yaxis": "y2" if numeric else "y",
            "line": {"color": palette.OKABE_ITO["vermillion"], "width": 2, "dash": "dot"},
        }
    ]
    if any(finite(p.get("top_label_share")) is not None for p in points):
        data.append(
            {
                "type": "scatter",
                "mode": "lines+markers",
                "name": "top label's share",
                "x": when,
                "y": [p.get("top_label_share") for p in points],
                "yaxis": "y2" if numeric else "y",
                "customdata": [safe_text(p.get("top_label")) for p in points],
                "hovertemplate": "%{customdata}: %{y:.1%}<extra></extra>",
                "line": {"color": palette.OKABE_ITO["bluish_green"], "width": 2},
            }
        )
    layout = base_layout(height=300)
    top_legend(layout)
    layout["xaxis"] = axis("delivered", type="date")
    if numeric:
        layout["yaxis"] = axis(column)
        layout["yaxis2"] = axis(
            "share",
            overlaying="y",
            side="right",
            range=[0, 1],
            dtick=0.25,
            tickformat=".0%",
            showgrid=False,
        )
        layout["margin"]["r"] = 64
    else:
        layout["yaxis"] = axis("share", range=[0, 1], tickformat=".0%")
    return {"data": data, "layout": layout}
