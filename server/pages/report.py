"""The standalone HTML report of one profile: a single file that works offline.

Everything it needs is inside the file: the stylesheet, our small script and
plotly.js from the installed plotly package. Values from the profiled file
are escaped by Jinja's autoescaping; figures travel as JSON in
``<script type="application/json">`` elements and are drawn as they scroll
into view, so a report with hundreds of columns opens quickly.
"""

from __future__ import annotations

import re
from datetime import UTC, datetime
from functools import lru_cache
from importlib import resources
from typing import Any

from markupsafe import Markup

from server.pages import figures
from server.pages.profile_view import (
    column_cards,
    correlation_figures,
    dataset_facts,
    flag_groups,
    score_rows,
)
from server.pages.rendering import STATIC_DIR, environment

_SCRIPT_END = re.compile(r"</(script)", re.IGNORECASE)


@lru_cache
def _asset(name: str) -> str:
    """A static file's text, safe to place inside a ``<script>`` or ``<style>`` element."""
    if name == "plotly.min.js":
        text = resources.files("plotly").joinpath("package_data", "plotly.min.js").read_text()
    else:
        text = (STATIC_DIR / name).read_text(encoding="utf-8")
    return _SCRIPT_END.sub(r"<\\/\1", text).replace("</style", "<\\/style")


def report_context(
    profile: dict[str, Any], *, drift: dict[str, Any] | None = None
) -> dict[str, Any]:
    """What the report template shows, computed from the profile (and a drift document)."""
    columns = list(profile.get("columns") or [])
    crosstabs = []
    for index, section in enumerate(profile.get("crosstabs") or []):
        figure = figures.crosstab_figure(section)
        if figure is not None:
            crosstabs.append({"key": f"xt-{index}", "section": section, "figure": figure})
    pairs = sorted(
        (p for p in profile.get("pairs") or [] if figures.base.finite(p.get("value")) is not None),
        key=lambda p: -abs(float(p["value"])),
    )
    return {
        "profile": profile,
        "source": profile.get("source") or {},
        "dataset_facts": dataset_facts(profile),
        "score": profile.get("score") or None,
        "score_rows": score_rows(profile.get("score")),
        "verdict": profile.get("verdict"),
        "flag_groups": flag_groups(profile),
        "flag_count": len(profile.get("flags") or []),
        "cards": column_cards(profile),
        "missing_figure": figures.missing_figure(profile),
        "missing_together_figure": figures.missing_together_figure(
            list(profile.get("missing_together") or [])
        ),
        "sentinel_columns": [c for c in columns if c.get("suspected_sentinels")],
        "correlations": correlation_figures(profile),
        "method_names": figures.relations.METHOD_NAMES,
        "strongest_pairs": pairs[:12],
        "twins": list(profile.get("twins") or []),
        "crosstabs": crosstabs,
        "drift": drift,
        "drift_figure": figures.drift_overview_figure(drift) if drift else None,
        "parse_errors": list((profile.get("dataset") or {}).get("parse_errors") or []),
        "has_personal_data": any(
            str(f.get("code", "")).startswith("privacy.") for f in profile.get("flags") or []
        ),
    }


def render_report(
    profile: dict[str, Any],
    *,
    drift: dict[str, Any] | None = None,
    generated_at: datetime | None = None,
) -> str:
    """The standalone HTML report of ``profile`` (format_version 1), as one string."""
    template = environment().get_template("report/report.html")
    context = report_context(profile, drift=drift)
    return template.render(
        **context,
        generated_at=(generated_at or datetime.now(UTC)).strftime("%Y-%m-%d %H:%M UTC"),
        inline_css=Markup(_asset("tidewaiter.css")),
        inline_js=Markup(_asset("tidewaiter.js")),
        plotly_js=Markup(_asset("plotly.min.js")),
    )
