"""Server-rendered pages: intake list, upload form, intake page; static files.

Templates live in ``web/templates`` and are autoescaped. plotly.min.js is
served from the installed plotly package, so pages work with no internet.
"""

from __future__ import annotations

from pathlib import Path

import plotly
from fastapi import FastAPI
from fastapi.responses import FileResponse
from fastapi.staticfiles import StaticFiles

from server.pages.intakes import router as intakes_router

WEB_DIR = Path(__file__).resolve().parents[2] / "web"
PLOTLY_JS = Path(plotly.__file__).parent / "package_data" / "plotly.min.js"


def plotly_js() -> FileResponse:
    """The plotly bundle shipped inside the installed plotly package."""
    return FileResponse(
        PLOTLY_JS,
        media_type="text/javascript",
        headers={"Cache-Control": "public, max-age=86400"},
    )


def install_pages(app: FastAPI) -> None:
    """Add the page routes and the static files to ``app``."""
    app.add_api_route("/static/vendor/plotly.min.js", plotly_js, include_in_schema=False)
    app.include_router(intakes_router)
    app.mount("/static", StaticFiles(directory=WEB_DIR / "static", check_dir=False), name="static")
