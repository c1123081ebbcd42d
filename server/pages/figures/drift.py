"""Figures comparing an intake with its baseline.

The overview draws the drift document; the per-column figures put the
baseline's and the target's stored summaries on one set of axes, drawn from
the two profiles (never from raw rows).
"""

from __future__ import annotations

import itertools
from typing import Any

from server.pages import palette
from server.pages.figures.base import (
    LABEL_LIMIT,
    Figure,
    axis,
    base_layout,
    finite,
    finite_list,
    safe_text,
    top_legend,
)

PSI_MODERATE = 0.1
PSI_LARGE = 0.25
"""PSI bands used in credit scoring: below 0.1 little shift, 0.1 to 0.25 a moderate one,
above 0.25 a large one (common practice, as recalled from memory of N. Siddiqi,
Credit Risk Scorecards, Wiley, 2006). Reference lines only; flags use the settings."""


def psi_colour(psi: float) -> str:
    """The band colour of a PSI value."""
    if psi >= PSI_LARGE:
        return palette.OKABE_ITO["vermillion"]
    if psi >= PSI_MODERATE:
        return palette.OKABE_ITO["orange"]
    return palette.OKABE_ITO["blue"]


def drift_overview_figure(drift: dict[str, Any]) -> Figure | None:
    """Bars of the population stability index of every compared column, largest first."""
    rows = [
        (str(c.get("name")), float(c["psi"]), c)
        for c in drift.get("columns") or []
        if finite(c.get("psi")) is not None
    ]
    if not rows:
        return None
    rows.sort(key=lambda r: -r[1])
    positions = list(range(len(rows)))
    top = max(PSI_LARGE * 1.2, rows[0][1] * 1.05)
    data = [
        {
            "type": "bar",
            "orientation": "h",
            "x": [psi for _, psi, _ in rows],
            "y": positions,
            "marker": {"color": [psi_colour(psi) for _, psi, _ in rows]},
            "customdata": [
                [
                    safe_text(name),
                    "–" if finite(c.get("ks")) is None else f"{c['ks']:.3f}",
                    "–" if finite(c.get("mean_shift_sd")) is None else f"{c['mean_shift_sd']:+.2f}",
                ]
                for name, _, c in rows
            ],
            "hovertemplate": "%{customdata[0]}<br>PSI %{x:.3f}<br>KS %{customdata[1]}"
            "<br>mean shift %{customdata[2]} sd<extra></extra>",
        }
    ]
    shapes = [
        {
            "type": "line",
            "x0": level,
            "x1": level,
            "yref": "paper",
            "y0": 0,
            "y1": 1,
            "line": {"color": palette.MUTED, "dash": "dot", "width": 1},
        }
        for level in (PSI_MODERATE, PSI_LARGE)
    ]
    layout = base_layout(height=max(180, 70 + 24 * len(rows)), shapes=shapes)
    layout["xaxis"] = axis("population stability index", range=[0, top])
    layout["yaxis"] = axis(
        tickmode="array",
        tickvals=positions,
        ticktext=[safe_text(name, LABEL_LIMIT) for name, _, _ in rows],
        autorange="reversed",
        showgrid=False,
    )
    return {"data": data, "layout": layout}


def _density_outline(numeric: dict[str, Any]) -> tuple[list[float], list[float]] | None:
    """The stored histogram as a step outline in density units (area 1), so two files
    with different row counts and bins can share one axis."""
    histogram = numeric.get("histogram") or {}
    edges = finite_list(histogram.get("edges") or [])
    counts = histogram.get("counts") or []
    total = sum(counts)
    if not counts or len(edges) != len(counts) + 1 or None in edges or total == 0:
        return None
    xs: list[float] = []
    ys: list[float] = []
    for (lo, hi), count in zip(itertools.pairwise(edges), counts, strict=True):
        assert lo is not None and hi is not None
        height = count / total / (hi - lo) if hi > lo else 0.0
        xs += [lo, hi]
        ys += [height, height]
    return xs, ys


def drift_numeric_figure(baseline: dict[str, Any], target: dict[str, Any]) -> Figure | None:
    """The baseline's and the target's distribution of one numeric column, overlaid."""
    data = []
    for column, label, colour in (
        (baseline, "baseline", palette.BASELINE),
        (target, "this intake", palette.TARGET),
    ):
        numeric = column.get("numeric") or {}
        outline = _density_outline(numeric)
        if outline is None:
            continue
        data.append(
            {
                "type": "scatter",
                "mode": "lines",
                "name": label,
                "x": outline[0],
                "y": outline[1],
                "line": {"color": colour, "width": 2, "shape": "linear"},
                "fill": "tozeroy",
                "fillcolor": colour + "33",
                "hovertemplate": label + "<br>%{x}<extra></extra>",
            }
        )
    if len(data) < 2:
        return None
    layout = base_layout(height=260)
    top_legend(layout)
    layout["xaxis"] = axis(str(target.get("name", "")))
    layout["yaxis"] = axis("density", rangemode="tozero")
    return {"data": data, "layout": layout}


def _shares(column: dict[str, Any]) -> dict[str, float]:
    labels = column.get("labels") or {}
    total = column.get("count") or sum(int(t.get("count") or 0) for t in labels.get("top") or [])
    result = {}
    for item in labels.get("top") or []:
        share = finite(item.get("share"))
        if share is None:
            share = (item.get("count") or 0) / total if total else 0.0
        result[str(item.get("value"))] = share
    return result


def drift_labels_figure(baseline: dict[str, Any], target: dict[str, Any]) -> Figure | None:
    """Side-by-side bars of each label's share in the baseline and in the target."""
    before, after = _shares(baseline), _shares(target)
    if not before or not after:
        return None
    order = sorted(set(before) | set(after), key=lambda v: -max(before.get(v, 0), after.get(v, 0)))
    order = order[:20]
    positions = list(range(len(order)))
    names = [safe_text(v) for v in order]
    data = [
        {
            "type": "bar",
            "orientation": "h",
            "name": label,
            "x": [shares.get(v, 0.0) for v in order],
            "y": positions,
            "marker": {"color": colour},
            "customdata": names,
            "hovertemplate": "%{customdata}<br>" + label + " %{x:.1%}<extra></extra>",
        }
        for shares, label, colour in (
            (before, "baseline", palette.BASELINE),
            (after, "this intake", palette.TARGET),
        )
    ]
    layout = base_layout(height=max(180, 80 + 34 * len(order)), barmode="group")
    top_legend(layout)
    layout["xaxis"] = axis("share of rows", tickformat=".0%", rangemode="tozero")
    layout["yaxis"] = axis(
        tickmode="array",
        tickvals=positions,
        ticktext=[safe_text(v, LABEL_LIMIT) for v in order],
        autorange="reversed",
        showgrid=False,
    )
    return {"data": data, "layout": layout}


def drift_column_figure(baseline: dict[str, Any], target: dict[str, Any]) -> Figure | None:
    """The comparison figure that suits the column's kind in the target, or None."""
    kind = target.get("kind")
    if kind != baseline.get("kind"):
        return None
    if kind == "numeric":
        return drift_numeric_figure(baseline, target)
    if kind in ("categorical", "boolean"):
        return drift_labels_figure(baseline, target)
    return None
