"""The Jinja2 environment of the pages: templates from ``web/templates``, autoescaped.

The same filters as the standalone report (numbers, shares, score bands), so a
column card looks the same in both. Pages carry no inline script (the
Content-Security-Policy forbids it): data for scripts travels in
``<script type="application/json">`` elements and ``data-`` attributes.
"""

from __future__ import annotations

from datetime import datetime

from fastapi.templating import Jinja2Templates
from jinja2 import Environment, FileSystemLoader, select_autoescape

from server.pages.profile_view import file_size
from server.pages.rendering import TEMPLATE_DIR, add_profile_filters


def _when(value: datetime | None) -> str:
    return "–" if value is None else value.strftime("%Y-%m-%d %H:%M")


def _filesize(value: int | None) -> str:
    return "–" if value is None else file_size(int(value))


environment = add_profile_filters(
    Environment(
        loader=FileSystemLoader(TEMPLATE_DIR),
        autoescape=select_autoescape(default=True, default_for_string=True),
        trim_blocks=True,
        lstrip_blocks=True,
    )
)
environment.filters["filesize"] = _filesize
environment.filters["when"] = _when
templates = Jinja2Templates(env=environment)
