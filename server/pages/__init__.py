"""Server-rendered pages: intakes, upload, suppliers, downloads; static files.

Templates live in ``web/templates`` and are autoescaped. plotly.min.js is
served from the installed plotly package, so pages work with no internet.
"""

from __future__ import annotations

from pathlib import Path

import plotly
from fastapi import Depends, FastAPI
from fastapi.responses import FileResponse
from fastapi.staticfiles import StaticFiles

from server.api.deps import current_user
from server.pages.account import router as account_router
from server.pages.admin import router as admin_router
from server.pages.api_docs import mount_swagger_files
from server.pages.api_docs import router as api_docs_router
from server.pages.downloads import router as downloads_router
from server.pages.intakes import router as intakes_router
from server.pages.rules import router as rules_router
from server.pages.suppliers import router as suppliers_router

WEB_DIR = Path(__file__).resolve().parents[2] / "web"
PLOTLY_JS = Path(plotly.__file__).parent / "package_data" / "plotly.min.js"


def plotly_js() -> FileResponse:
    """The plotly bundle shipped inside the installed plotly package."""
    return FileResponse(
        PLOTLY_JS,
        media_type="text/javascript",
        headers={"Cache-Control": "public, max-age=86400"},
    )


def favicon() -> FileResponse:
    """The tab icon, for browsers that ask for /favicon.ico whatever the page says."""
    return FileResponse(
        WEB_DIR / "static" / "favicon.svg",
        media_type="image/svg+xml",
        headers={"Cache-Control": "public, max-age=86400"},
    )


def install_pages(app: FastAPI) -> None:
    """Add the page routes and the static files to ``app``."""
    app.add_api_route("/static/vendor/plotly.min.js", plotly_js, include_in_schema=False)
    app.add_api_route("/favicon.ico", favicon, include_in_schema=False)
    # Page routers sit behind sign-in (an anonymous browser is sent to /sign-in); the
    # account pages (sign-in itself, sign-out, own tokens) check their callers themselves.
    app.include_router(account_router)
    app.include_router(intakes_router, dependencies=[Depends(current_user)])
    app.include_router(admin_router, dependencies=[Depends(current_user)])
    app.include_router(api_docs_router, dependencies=[Depends(current_user)])
    mount_swagger_files(app)
    app.include_router(downloads_router, dependencies=[Depends(current_user)])
    app.include_router(suppliers_router, dependencies=[Depends(current_user)])
    app.include_router(rules_router, dependencies=[Depends(current_user)])
    app.mount("/static", StaticFiles(directory=WEB_DIR / "static", check_dir=False), name="static")
