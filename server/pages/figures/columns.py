"""Figures of one column: numbers, labels and dates.

Each builder takes one entry of the profile's ``columns[]`` and returns a
plotly figure dict, or None when the column has nothing to draw (an empty
column, a profile made before the section existed).
"""

from __future__ import annotations

import itertools
from datetime import datetime, timedelta
from typing import Any

from server.pages import palette
from server.pages.figures.base import (
    LABEL_LIMIT,
    Figure,
    axis,
    base_layout,
    finite,
    finite_list,
    rounded,
    safe_text,
)

TUKEY_K = 1.5
"""Whisker reach in IQRs (Tukey 1977, Exploratory Data Analysis, §2C)."""


def _bins(edges: list[float], counts: list[int]) -> tuple[list[float], list[float]] | None:
    """Centres and widths of histogram bins, or None when the edges do not fit the counts."""
    if not counts or len(edges) != len(counts) + 1:
        return None
    clean = finite_list(edges)
    if any(edge is None for edge in clean):
        return None
    numbers = [float(edge) for edge in clean if edge is not None]
    widths = [hi - lo for lo, hi in itertools.pairwise(numbers)]
    # A column with one repeated value has a single zero-width bin; give it a visible width.
    fallback = max(abs(numbers[0]) * 0.05, 0.5)
    widths = [w if w > 0 else fallback for w in widths]
    centres = [lo + w / 2 for lo, w in zip(numbers, widths, strict=False)]
    return centres, widths


def whiskers(numeric: dict[str, Any]) -> tuple[float, float] | None:
    """The ends of the box plot's whiskers, from the summary alone.

    Tukey's whisker ends at the most extreme value inside the fence
    ``q1 - 1.5·IQR`` (``q3 + 1.5·IQR``). Without the raw values, the end is the
    smallest (largest) of the minimum (maximum) and the stored percentiles that
    lies inside the fence: exact when no value lies outside, otherwise an
    approximation between the two stored percentiles around the true end.

    References: J. W. Tukey, Exploratory Data Analysis, Addison-Wesley, 1977.
    """
    q1, q3 = finite(numeric.get("q1")), finite(numeric.get("q3"))
    low, high = finite(numeric.get("min")), finite(numeric.get("max"))
    if q1 is None or q3 is None or low is None or high is None:
        return None
    iqr = q3 - q1
    low_fence, high_fence = q1 - TUKEY_K * iqr, q3 + TUKEY_K * iqr
    points = [p for p in finite_list(numeric.get("percentiles") or []) if p is not None]
    candidates = [low, *points, q1]
    lower = min(p for p in candidates if p >= low_fence)
    candidates = [high, *points, q3]
    upper = max(p for p in candidates if p <= high_fence)
    return lower, upper


def numeric_figure(column: dict[str, Any]) -> Figure | None:
    """Histogram with its density curve above, violin and box plot below.

    The bars are the stored histogram; the curve is the stored density, scaled
    to rows per bin so it lies on the bars; the violin is the same density
    mirrored; the box is drawn from the stored quartiles and whiskers, with the
    mean and one standard deviation marked.
    """
    numeric = column.get("numeric") or {}
    histogram = numeric.get("histogram") or {}
    bins = _bins(histogram.get("edges") or [], histogram.get("counts") or [])
    if bins is None:
        return None
    centres, widths = bins
    counts = [int(c) for c in histogram["counts"]]
    edges = [float(e) for e in histogram["edges"]]
    data: list[dict[str, Any]] = [
        {
            "type": "bar",
            "name": "rows per bin",
            "x": centres,
            "y": counts,
            "width": widths,
            "marker": {"color": palette.OKABE_ITO["blue"], "opacity": 0.78},
            "customdata": [[f"{lo:.5g}", f"{hi:.5g}"] for lo, hi in itertools.pairwise(edges)],
            "hovertemplate": "%{customdata[0]} to %{customdata[1]}<br>%{y} rows<extra></extra>",
            "xaxis": "x",
            "yaxis": "y",
        }
    ]
    density = numeric.get("density") or {}
    dx, dy = finite_list(density.get("x") or []), finite_list(density.get("y") or [])
    has_density = len(dx) == len(dy) > 1 and all(v is not None for v in dx + dy)
    if has_density:
        scale = sum(counts) * (sum(widths) / len(widths))
        data.append(
            {
                "type": "scatter",
                "mode": "lines",
                "name": "density",
                "x": rounded(dx),
                "y": rounded([y * scale for y in dy]),  # type: ignore[operator]
                "line": {"color": palette.OKABE_ITO["vermillion"], "width": 2},
                "hoverinfo": "skip",
                "xaxis": "x",
                "yaxis": "y",
            }
        )
        peak = max(dy) or 1.0  # type: ignore[type-var]
        half = [0.9 * y / peak for y in dy]  # type: ignore[operator]
        data.append(
            {
                "type": "scatter",
                "mode": "lines",
                "name": "violin",
                "x": rounded(dx + dx[::-1]),
                "y": rounded(half + [-y for y in half[::-1]], 3),
                "fill": "toself",
                "fillcolor": "rgba(86,180,233,0.35)",
                "line": {"color": palette.OKABE_ITO["sky_blue"], "width": 1},
                "hoverinfo": "skip",
                "xaxis": "x",
                "yaxis": "y2",
            }
        )
    reach = whiskers(numeric)
    quartiles = [finite(numeric.get(k)) for k in ("q1", "median", "q3")]
    if reach is not None and None not in quartiles:
        box: dict[str, Any] = {
            "type": "box",
            "name": "quartiles",
            "orientation": "h",
            "y": [0],
            "q1": [quartiles[0]],
            "median": [quartiles[1]],
            "q3": [quartiles[2]],
            "lowerfence": [reach[0]],
            "upperfence": [reach[1]],
            "width": 0.5,
            "boxpoints": False,
            "fillcolor": "rgba(255,255,255,0.85)",
            "line": {"color": palette.INK, "width": 1.5},
            "xaxis": "x",
            "yaxis": "y2",
        }
        mean, std = finite(numeric.get("mean")), finite(numeric.get("std"))
        if mean is not None:
            box["mean"] = [mean]
            box["boxmean"] = True
            if std is not None:
                box["sd"] = [std]
                box["boxmean"] = "sd"
        data.append(box)
    layout = base_layout(height=300)
    pad = (edges[-1] - edges[0]) * 0.02 or 0.5
    layout["xaxis"] = axis(
        str(column.get("name", "")), anchor="y2", range=[edges[0] - pad, edges[-1] + pad]
    )
    layout["yaxis"] = axis("rows", domain=[0.34, 1.0], anchor="x", rangemode="tozero")
    layout["yaxis2"] = axis(
        domain=[0.0, 0.26], anchor="x", range=[-1, 1], showticklabels=False, showgrid=False
    )
    layout["yaxis2"]["zeroline"] = False
    layout["bargap"] = 0.02
    return {"data": data, "layout": layout}


def labels_figure(column: dict[str, Any]) -> Figure | None:
    """Bars of the most frequent labels, then one bar for all the other labels.

    Labels are placed by position with escaped tick texts, so labels that look
    like numbers or share a long prefix stay separate bars.
    """
    labels = column.get("labels") or {}
    top = labels.get("top") or []
    if not top:
        return None
    rows = [
        (str(item.get("value")), int(item.get("count") or 0), finite(item.get("share")))
        for item in top
    ]
    others = int(labels.get("other_count") or 0)
    total = column.get("count") or sum(n for _, n, _ in rows) + others
    distinct = column.get("distinct")
    colours = [palette.OKABE_ITO["blue"]] * len(rows)
    ticks = [safe_text(value, LABEL_LIMIT) for value, _, _ in rows]
    hovers = [safe_text(value) for value, _, _ in rows]
    if others:
        rest = "all other labels"
        if isinstance(distinct, int) and distinct > len(rows):
            rest = f"the other {distinct - len(rows)} labels"
        rows.append((rest, others, others / total if total else None))
        colours.append(palette.REST)
        ticks.append(rest)
        hovers.append(rest)
    shares = [share if share is not None else (n / total if total else 0.0) for _, n, share in rows]
    positions = list(range(len(rows)))
    data = [
        {
            "type": "bar",
            "orientation": "h",
            "x": [n for _, n, _ in rows],
            "y": positions,
            "marker": {"color": colours},
            "text": [f"{100 * s:.1f} %" for s in shares],
            "textposition": "auto",
            "customdata": [[h, f"{100 * s:.2f} %"] for h, s in zip(hovers, shares, strict=True)],
            "hovertemplate": "%{customdata[0]}<br>%{x} rows (%{customdata[1]})<extra></extra>",
        }
    ]
    layout = base_layout(height=max(160, 48 + 24 * len(rows)))
    layout["xaxis"] = axis("rows", rangemode="tozero")
    layout["yaxis"] = axis(
        tickmode="array", tickvals=positions, ticktext=ticks, autorange="reversed", showgrid=False
    )
    layout["margin"]["l"] = 8
    return {"data": data, "layout": layout}


def _parse_instant(value: object) -> datetime | None:
    """An ISO 8601 text (or a datetime) as a datetime, else None."""
    if isinstance(value, datetime):
        return value
    if not isinstance(value, str):
        return None
    try:
        return datetime.fromisoformat(value)
    except ValueError:
        return None


def datetime_figure(column: dict[str, Any]) -> Figure | None:
    """Rows per period: bars between the stored histogram's edges (ISO 8601 instants)."""
    section = column.get("datetime") or {}
    histogram = section.get("histogram") or {}
    counts = histogram.get("counts") or []
    edges = [_parse_instant(e) for e in histogram.get("edges") or []]
    if not counts or len(edges) != len(counts) + 1 or any(e is None for e in edges):
        return None
    instants: list[datetime] = [e for e in edges if e is not None]
    widths = [hi - lo for lo, hi in itertools.pairwise(instants)]
    widths = [w if w > timedelta(0) else timedelta(days=1) for w in widths]
    data = [
        {
            "type": "bar",
            "x": [(lo + w / 2).isoformat() for lo, w in zip(instants, widths, strict=False)],
            "y": [int(c) for c in counts],
            "width": [w.total_seconds() * 1000 for w in widths],
            "marker": {"color": palette.OKABE_ITO["bluish_green"], "opacity": 0.85},
            "customdata": [
                [lo.isoformat(sep=" "), hi.isoformat(sep=" ")]
                for lo, hi in itertools.pairwise(instants)
            ],
            "hovertemplate": "%{customdata[0]} to %{customdata[1]}<br>%{y} rows<extra></extra>",
        }
    ]
    layout = base_layout(height=240)
    layout["xaxis"] = axis(str(column.get("name", "")), type="date")
    layout["yaxis"] = axis("rows", rangemode="tozero")
    layout["bargap"] = 0.02
    return {"data": data, "layout": layout}


def column_figure(column: dict[str, Any]) -> Figure | None:
    """The figure that suits the column's kind, or None."""
    kind = column.get("kind")
    if kind == "numeric":
        return numeric_figure(column)
    if kind in ("categorical", "boolean"):
        return labels_figure(column)
    if kind == "datetime":
        return datetime_figure(column)
    return None
