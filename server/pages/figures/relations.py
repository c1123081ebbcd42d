"""Figures of column pairs: the correlation heatmap and the crosstab heatmap."""

from __future__ import annotations

from typing import Any

from server.pages import palette
from server.pages.figures.base import (
    LABEL_LIMIT,
    Figure,
    axis,
    base_layout,
    finite,
    safe_text,
)

SIGNED_METHODS = frozenset({"pearson", "spearman"})
"""Coefficients from -1 to 1; the others (Cramér's V, eta) run from 0 to 1."""

METHOD_NAMES = {
    "pearson": "Pearson r",
    "spearman": "Spearman ρ",
    "cramers_v": "Cramér's V",
    "eta": "correlation ratio η",
}

RESIDUAL_CAP = 4.0
"""Adjusted residuals beyond ±4 take the end colour, so one extreme cell does not
wash out the rest; |r| > 2 is the usual mark of a notable cell (common practice)."""

COLUMN_LIMIT = 40
"""Most columns a correlation heatmap shows: those with the strongest ties (a larger
matrix is unreadable on a screen; the pairs stay in the profile)."""

TEXT_LIMIT = 24
"""Above this many rows or columns a heatmap drops its cell numbers (hover keeps them)."""


def _square_axes(names: list[str], layout: dict[str, Any]) -> None:
    """Index-placed axes with escaped, shortened names (names never become markup)."""
    positions = list(range(len(names)))
    ticks = [safe_text(n, LABEL_LIMIT) for n in names]
    layout["xaxis"] = axis(
        tickmode="array", tickvals=positions, ticktext=ticks, tickangle=-40, showgrid=False
    )
    layout["yaxis"] = axis(
        tickmode="array", tickvals=positions, ticktext=ticks, autorange="reversed", showgrid=False
    )


def correlation_methods(pairs: list[dict[str, Any]]) -> list[str]:
    """The methods present in ``pairs``, in a fixed order."""
    present = {p.get("method") for p in pairs}
    return [m for m in METHOD_NAMES if m in present]


def correlation_figure(
    pairs: list[dict[str, Any]], method: str, columns: list[str] | None = None
) -> Figure | None:
    """Heatmap of one method's coefficients between every pair of columns it covers.

    ``columns`` fixes the order (the profile's column order); columns without
    any pair of this method are left out, and beyond ``COLUMN_LIMIT`` columns only
    those with the strongest ties are kept. Missing pairs are blank cells.
    """
    chosen = [p for p in pairs if p.get("method") == method and finite(p.get("value")) is not None]
    if not chosen:
        return None
    involved = {p["a"] for p in chosen} | {p["b"] for p in chosen}
    if len(involved) > COLUMN_LIMIT:
        strongest: dict[str, float] = {}
        for pair in chosen:
            for name in (pair["a"], pair["b"]):
                strongest[name] = max(strongest.get(name, 0.0), abs(float(pair["value"])))
        ranked = sorted(involved, key=lambda n: (-strongest[n], n))
        involved = set(ranked[:COLUMN_LIMIT])
        chosen = [p for p in chosen if p["a"] in involved and p["b"] in involved]
    order = [c for c in (columns or []) if c in involved]
    order += sorted(involved - set(order))
    index = {name: i for i, name in enumerate(order)}
    size = len(order)
    z: list[list[float | None]] = [[None] * size for _ in range(size)]
    counts: list[list[int | None]] = [[None] * size for _ in range(size)]
    for pair in chosen:
        i, j = index[pair["a"]], index[pair["b"]]
        z[i][j] = z[j][i] = float(pair["value"])
        counts[i][j] = counts[j][i] = pair.get("n")
    if method != "eta":
        for i in range(size):
            z[i][i] = 1.0
    signed = method in SIGNED_METHODS
    names = [safe_text(n) for n in order]
    trace: dict[str, Any] = {
        "type": "heatmap",
        "z": z,
        "x": list(range(size)),
        "y": list(range(size)),
        "zmin": -1.0 if signed else 0.0,
        "zmax": 1.0,
        "colorscale": palette.DIVERGING if signed else palette.SEQUENTIAL,
        "colorbar": {"title": {"text": METHOD_NAMES.get(method, method)}, "thickness": 12},
        "customdata": [
            [[names[i], names[j], counts[i][j]] for j in range(size)] for i in range(size)
        ],
        "hovertemplate": "%{customdata[0]} × %{customdata[1]}<br>"
        + METHOD_NAMES.get(method, method)
        + " = %{z:.3f}<br>n = %{customdata[2]}<extra></extra>",
        "xgap": 1,
        "ygap": 1,
    }
    if size <= TEXT_LIMIT:
        trace["texttemplate"] = "%{z:.2f}"
    layout = base_layout(height=max(260, 120 + 28 * size))
    _square_axes(order, layout)
    return {"data": [trace], "layout": layout}


def _matrix(value: Any, rows: list[str], cols: list[str]) -> list[list[float | None]] | None:
    """A table as a list of rows, from either a nested list or a dict of dicts."""
    if isinstance(value, dict):
        return [[finite((value.get(r) or {}).get(c)) for c in cols] for r in rows]
    if isinstance(value, list) and len(value) == len(rows):
        return [[finite(v) for v in row] for row in value]
    return None


def crosstab_table(
    crosstab: dict[str, Any],
) -> tuple[list[str], list[str], list[list[float | None]], list[list[float | None]] | None]:
    """Row labels, column labels, counts and adjusted residuals of a crosstab.

    Counts come as the engine stores them (``{"a_labels", "b_labels", "matrix"}``),
    as a dict of dicts (``{row label: {column label: n}}``) or as a nested list
    beside ``rows``/``columns`` label lists.
    """
    counts = crosstab.get("counts")
    rows = crosstab.get("rows") or crosstab.get("row_labels")
    cols = crosstab.get("columns") or crosstab.get("column_labels")
    if isinstance(counts, dict) and "matrix" in counts:
        rows, cols, counts = counts.get("a_labels"), counts.get("b_labels"), counts["matrix"]
    if isinstance(counts, dict) and not rows:
        rows = list(counts)
        cols = list(dict.fromkeys(c for inner in counts.values() for c in inner))
    rows = [str(r) for r in rows or []]
    cols = [str(c) for c in cols or []]
    if isinstance(counts, dict):
        counts = {str(r): {str(c): n for c, n in inner.items()} for r, inner in counts.items()}
    residuals = crosstab.get("residuals")
    if isinstance(residuals, dict):
        residuals = {
            str(r): {str(c): v for c, v in inner.items()} for r, inner in residuals.items()
        }
    table = _matrix(counts, rows, cols)
    if table is None:
        raise ValueError("crosstab counts do not match their row and column labels")
    return rows, cols, table, _matrix(residuals, rows, cols)


def crosstab_figure(crosstab: dict[str, Any]) -> Figure | None:
    """Heatmap of a crosstab: each cell shows its count, shaded by its adjusted residual.

    Blue cells hold fewer rows than independence of the two columns predicts,
    vermillion cells more; white cells are as expected.

    References: S. J. Haberman, "The analysis of residuals in cross-classified
    tables", Biometrics 29(1), 1973, pp. 205–220.
    """
    rows, cols, counts, residuals = crosstab_table(crosstab)
    if not rows or not cols:
        return None
    shading = residuals or [[0.0] * len(cols) for _ in rows]
    capped = [
        [None if r is None else max(-RESIDUAL_CAP, min(RESIDUAL_CAP, r)) for r in row]
        for row in shading
    ]
    row_totals = [sum(v or 0 for v in row) for row in counts]
    row_names = [safe_text(r) for r in rows]
    # Column names go into customdata, not the template, so no name is read as a template.
    a, b = safe_text(crosstab.get("a")), safe_text(crosstab.get("b"))
    col_names = [safe_text(c) for c in cols]
    customdata = [
        [
            [
                row_names[i],
                col_names[j],
                counts[i][j],
                f"{100 * (counts[i][j] or 0) / row_totals[i]:.1f} %" if row_totals[i] else "–",
                "–" if shading[i][j] is None else f"{shading[i][j]:+.2f}",
                a,
                b,
            ]
            for j in range(len(cols))
        ]
        for i in range(len(rows))
    ]
    trace: dict[str, Any] = {
        "type": "heatmap",
        "z": capped,
        "x": list(range(len(cols))),
        "y": list(range(len(rows))),
        "zmin": -RESIDUAL_CAP,
        "zmax": RESIDUAL_CAP,
        "zmid": 0,
        "colorscale": palette.DIVERGING,
        "colorbar": {"title": {"text": "adjusted<br>residual"}, "thickness": 12},
        "text": [[_count_text(v) for v in row] for row in counts],
        "customdata": customdata,
        "hovertemplate": "%{customdata[5]} = %{customdata[0]}<br>"
        "%{customdata[6]} = %{customdata[1]}<br>"
        "%{customdata[2]} rows (%{customdata[3]} of the row)<br>"
        "adjusted residual %{customdata[4]}<extra></extra>",
        "xgap": 1,
        "ygap": 1,
    }
    if len(rows) <= TEXT_LIMIT and len(cols) <= TEXT_LIMIT:
        trace["texttemplate"] = "%{text}"
    layout = base_layout(height=max(220, 110 + 30 * len(rows)))
    layout["xaxis"] = axis(
        str(crosstab.get("b", "")),
        tickmode="array",
        tickvals=list(range(len(cols))),
        ticktext=[safe_text(c, LABEL_LIMIT) for c in cols],
        side="top",
        showgrid=False,
    )
    layout["yaxis"] = axis(
        str(crosstab.get("a", "")),
        tickmode="array",
        tickvals=list(range(len(rows))),
        ticktext=[safe_text(r, LABEL_LIMIT) for r in rows],
        autorange="reversed",
        showgrid=False,
    )
    layout["margin"]["t"] = 56
    return {"data": [trace], "layout": layout}


def _count_text(value: float | None) -> str:
    if value is None:
        return ""
    return str(int(value)) if float(value).is_integer() else f"{value:.3g}"
