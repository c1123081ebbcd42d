"""The Jinja2 environment of the pages: templates from ``web/templates``, autoescaped."""

from __future__ import annotations

from pathlib import Path

from fastapi.templating import Jinja2Templates
from jinja2 import Environment, FileSystemLoader, select_autoescape

TEMPLATES_DIR = Path(__file__).resolve().parents[2] / "web" / "templates"


def _percent(value: float | None, digits: int = 0) -> str:
    return "–" if value is None else f"{value:.{digits}%}"


def _bytes(value: int | None) -> str:
    if value is None:
        return "–"
    size = float(value)
    for unit in ("bytes", "KB", "MB", "GB"):
        if size < 1024 or unit == "GB":
            return f"{size:,.0f} {unit}" if unit == "bytes" else f"{size:,.1f} {unit}"
        size /= 1024
    return f"{size:,.1f} GB"


environment = Environment(
    loader=FileSystemLoader(TEMPLATES_DIR),
    autoescape=select_autoescape(["html", "xml"], default_for_string=True, default=True),
)
environment.filters["percent"] = _percent
environment.filters["filesize"] = _bytes
templates = Jinja2Templates(env=environment)
