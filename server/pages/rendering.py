"""The Jinja2 environment that renders profile views (the standalone report).

Autoescaping is on for every template, so a column name or label from a
partner file is always text, never markup. Figures travel as JSON inside
``<script type="application/json">`` elements through Jinja's ``tojson``
filter, which escapes ``<``, ``>``, ``&`` and ``'`` so no value can close the
element.
"""

from __future__ import annotations

from functools import lru_cache
from pathlib import Path

from jinja2 import Environment, FileSystemLoader, select_autoescape

from server.pages import palette
from server.pages.figures.base import format_number
from server.pages.profile_view import SEVERITY_MARK, percent, score_band, shorten

WEB_DIR = Path(__file__).resolve().parents[2] / "web"
TEMPLATE_DIR = WEB_DIR / "templates"
STATIC_DIR = WEB_DIR / "static"


def add_profile_filters(env: Environment) -> Environment:
    """Give ``env`` the filters and globals the profile templates use."""
    env.filters["number"] = lambda v, digits=4: format_number(v, digits)
    env.filters["percent"] = percent
    env.filters["shorten"] = shorten
    env.filters["band"] = score_band
    env.globals["severity_mark"] = SEVERITY_MARK
    env.globals["palette"] = palette
    return env


@lru_cache
def environment() -> Environment:
    """The report's environment: templates from ``web/templates``, autoescaped."""
    env = Environment(
        loader=FileSystemLoader(TEMPLATE_DIR),
        autoescape=select_autoescape(default=True, default_for_string=True),
        trim_blocks=True,
        lstrip_blocks=True,
    )
    return add_profile_filters(env)
