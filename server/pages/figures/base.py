"""What every figure shares: the layout, safe text, and small number helpers.

Figures are plain dicts in plotly's JSON figure format ({"data": [...],
"layout": {...}}), so pages embed them as JSON and plotly.js draws them; no
figure ever sees raw rows, only the sections of a profile document.
"""

from __future__ import annotations

import html
import math
from collections.abc import Iterable
from typing import Any

import numpy as np

from server.pages import palette

Figure = dict[str, Any]

LABEL_LIMIT = 40
"""Longest label shown on an axis; the full text stays in the hover box."""


def safe_text(value: object, limit: int | None = None) -> str:
    """A value from a partner file, made safe for plotly's text rendering.

    plotly.js reads a small HTML-like markup in every text it draws (tick
    labels, hover boxes, annotations: ``<b>``, ``<br>``, ``<a href>``), so a
    label from a file is escaped to show literally, never as markup.
    ``limit`` shortens long texts with an ellipsis (before escaping, so an
    entity is never cut in half).
    """
    text = "(missing)" if value is None else str(value)
    if limit is not None and len(text) > limit:
        text = text[: limit - 1] + "…"
    return html.escape(show_edges(text), quote=False)


def show_edges(text: str) -> str:
    """Leading and trailing spaces made visible as ␣, so "ok" and "ok " read as two labels."""
    core = text.strip(" ")
    if core == text or not core:
        return text
    start = text.index(core[0])
    return "␣" * start + core + "␣" * (len(text) - start - len(core))


def finite(value: object) -> float | None:
    """``value`` as a float when it is a finite number, else None."""
    if value.__class__ is float:
        return value if math.isfinite(value) else None  # type: ignore[arg-type]
    if isinstance(value, bool) or not isinstance(value, int | float):
        return None
    number = float(value)
    return number if math.isfinite(number) else None


def finite_list(values: Iterable[object]) -> list[float | None]:
    """Numbers for plotly: non-finite entries become None (a gap, not an error)."""
    return [finite(v) for v in values]


def rounded(values: list[float | None], digits: int = 4) -> list[float | None]:
    """Numbers cut to ``digits`` significant digits: plenty for a picture, and it keeps
    the JSON of a page with hundreds of figures small."""
    array = np.array([np.nan if v is None else v for v in values], dtype=np.float64)
    with np.errstate(divide="ignore", invalid="ignore"):
        magnitude = np.floor(np.log10(np.abs(array)))
        scale = np.where(np.isfinite(magnitude), 10.0 ** (digits - 1 - magnitude), 1.0)
        cut = np.round(array * scale) / scale
    return [None if math.isnan(v) else v for v in cut.tolist()]


def base_layout(title: str | None = None, *, height: int = 320, **extra: Any) -> dict[str, Any]:
    """The common layout: our font and colours, tight margins, no plotly logo."""
    layout: dict[str, Any] = {
        "height": height,
        "margin": {"l": 56, "r": 16, "t": 40 if title else 16, "b": 44},
        "paper_bgcolor": palette.PAPER,
        "plot_bgcolor": palette.PAPER,
        "font": {"family": "system-ui, 'Segoe UI', Roboto, sans-serif", "color": palette.INK},
        "colorway": list(palette.SERIES),
        "showlegend": False,
        "hoverlabel": {"align": "left"},
    }
    if title:
        layout["title"] = {
            "text": safe_text(title),
            "x": 0,
            "xanchor": "left",
            "font": {"size": 15},
        }
    layout.update(extra)
    return layout


def top_legend(layout: dict[str, Any]) -> None:
    """Show the legend in a band above the plot area, clear of the data."""
    layout["showlegend"] = True
    layout["legend"] = {"orientation": "h", "x": 0, "y": 1.0, "yanchor": "bottom"}
    layout["margin"]["t"] = max(layout["margin"]["t"], 40)


def axis(title: str | None = None, **extra: Any) -> dict[str, Any]:
    """An axis in our style; ``title`` is raw text (it is escaped and shortened here)."""
    result: dict[str, Any] = {
        "gridcolor": palette.GRID,
        "zerolinecolor": palette.GRID,
        "linecolor": palette.MUTED,
        "tickfont": {"color": palette.MUTED},
        "automargin": True,
    }
    if title:
        result["title"] = {"text": safe_text(title, LABEL_LIMIT), "font": {"color": palette.MUTED}}
    result.update(extra)
    return result


def format_number(value: float | None, digits: int = 4) -> str:
    """A compact human form of a number: ``12 346``, ``0.0123``, ``1.235e+09``."""
    if value is None:
        return "–"
    if value == 0:
        return "0"
    if abs(value) >= 1e7 or abs(value) < 1e-3:
        return f"{value:.{digits - 1}e}"
    if float(value).is_integer() or abs(value) >= 1000:
        return f"{round(value):,}".replace(",", " ")
    return f"{value:.{digits}g}"
