"""Figures of where values are missing: per column, and which columns miss together."""

from __future__ import annotations

from typing import Any

from server.pages import palette
from server.pages.figures.base import LABEL_LIMIT, Figure, axis, base_layout, finite, safe_text

SHOWN_COLUMNS = 30
"""Columns drawn in the missing-values picture, the most affected first."""

PARTS = (
    ("null", "empty cell", palette.OKABE_ITO["blue"]),
    ("blank", "only spaces", palette.OKABE_ITO["sky_blue"]),
    ("tokens", "missing word (NA, null…)", palette.OKABE_ITO["reddish_purple"]),
    ("sentinels", "suspected stand-in value (-999…)", palette.OKABE_ITO["orange"]),
)


def missing_parts(column: dict[str, Any]) -> dict[str, int]:
    """Missing cells of one column split by how they were written, plus suspected sentinels.

    A column whose profile has no ``missing_detail`` counts all its missing
    cells as empty cells.
    """
    detail = column.get("missing_detail") or {}
    tokens = detail.get("tokens") or {}
    parts = {
        "null": int(detail.get("null") or 0),
        "blank": int(detail.get("blank") or 0),
        "tokens": sum(int(n) for n in tokens.values()) if isinstance(tokens, dict) else 0,
        "sentinels": sum(int(s.get("count") or 0) for s in column.get("suspected_sentinels") or []),
    }
    if not detail:
        parts["null"] = int(column.get("missing") or 0)
    return parts


def missing_figure(profile: dict[str, Any]) -> Figure | None:
    """Stacked bars: the share of rows missing in each column, by how it is missing.

    Suspected sentinels (a -999 standing in for "unknown") are stacked on top,
    because they are missing values in disguise. None when nothing is missing.
    """
    rows = int((profile.get("dataset") or {}).get("rows") or 0)
    if rows == 0:
        return None
    affected = []
    for column in profile.get("columns") or []:
        parts = missing_parts(column)
        if sum(parts.values()):
            affected.append((str(column.get("name")), parts))
    if not affected:
        return None
    affected.sort(key=lambda item: -sum(item[1].values()))
    shown = affected[:SHOWN_COLUMNS]
    positions = list(range(len(shown)))
    names = [safe_text(name) for name, _ in shown]
    data = []
    for key, label, colour in PARTS:
        counts = [parts[key] for _, parts in shown]
        if not any(counts):
            continue
        data.append(
            {
                "type": "bar",
                "orientation": "h",
                "name": label,
                "x": [n / rows for n in counts],
                "y": positions,
                "marker": {"color": colour},
                "customdata": [[name, n] for name, n in zip(names, counts, strict=True)],
                "hovertemplate": "%{customdata[0]}<br>" + label + ": %{customdata[1]} rows "
                "(%{x:.1%})<extra></extra>",
            }
        )
    title = None
    if len(affected) > len(shown):
        title = f"the {len(shown)} most affected of {len(affected)} columns with gaps"
    layout = base_layout(title, height=max(180, 90 + 24 * len(shown)), barmode="stack")
    layout["showlegend"] = True
    layout["legend"] = {"orientation": "h", "y": -0.18, "x": 0}
    layout["xaxis"] = axis("share of rows", tickformat=".0%", rangemode="tozero")
    layout["yaxis"] = axis(
        tickmode="array",
        tickvals=positions,
        ticktext=[safe_text(name, LABEL_LIMIT) for name, _ in shown],
        autorange="reversed",
        showgrid=False,
    )
    layout["margin"]["b"] = 80
    return {"data": data, "layout": layout}


MISSING_TOGETHER_KEYS = ("jaccard", "phi", "correlation", "share")


def missing_together_figure(pairs: list[dict[str, Any]]) -> Figure | None:
    """Heatmap of how strongly columns tend to miss in the same rows.

    Each pair carries ``a``, ``b`` and a strength between 0 and 1 (the first of
    ``jaccard``, ``phi``, ``correlation``, ``share`` that it has) and optionally
    ``both``, the rows where both are missing.
    """
    cells = []
    for pair in pairs:
        key = next((k for k in MISSING_TOGETHER_KEYS if finite(pair.get(k)) is not None), None)
        if key is not None and pair.get("a") is not None and pair.get("b") is not None:
            cells.append((str(pair["a"]), str(pair["b"]), float(pair[key]), key, pair.get("both")))
    if not cells:
        return None
    order = list(dict.fromkeys(name for a, b, *_ in cells for name in (a, b)))
    index = {name: i for i, name in enumerate(order)}
    size = len(order)
    z: list[list[float | None]] = [[None] * size for _ in range(size)]
    custom: list[list[list[Any]]] = [
        [[safe_text(order[i]), safe_text(order[j]), "", "–"] for j in range(size)]
        for i in range(size)
    ]
    for a, b, value, key, both in cells:
        i, j = index[a], index[b]
        z[i][j] = z[j][i] = value
        for x, y in ((i, j), (j, i)):
            custom[x][y][2] = key
            custom[x][y][3] = "–" if both is None else str(both)
    trace = {
        "type": "heatmap",
        "z": z,
        "x": list(range(size)),
        "y": list(range(size)),
        "zmin": 0.0,
        "zmax": 1.0,
        "colorscale": palette.SEQUENTIAL,
        "colorbar": {"title": {"text": "together"}, "thickness": 12},
        "customdata": custom,
        "hovertemplate": "%{customdata[0]} and %{customdata[1]}<br>%{customdata[2]} %{z:.2f}"
        "<br>missing in both: %{customdata[3]} rows<extra></extra>",
        "xgap": 1,
        "ygap": 1,
    }
    ticks = [safe_text(n, LABEL_LIMIT) for n in order]
    layout = base_layout(height=max(240, 120 + 28 * size))
    layout["xaxis"] = axis(
        tickmode="array", tickvals=list(range(size)), ticktext=ticks, tickangle=-40, showgrid=False
    )
    layout["yaxis"] = axis(
        tickmode="array",
        tickvals=list(range(size)),
        ticktext=ticks,
        autorange="reversed",
        showgrid=False,
    )
    return {"data": [trace], "layout": layout}
