"""The interactive API description at /docs, served entirely from this host.

FastAPI's own /docs and /redoc pages load Swagger UI from a CDN and start it
with an inline script; the Content-Security-Policy allows neither. This page
loads the Swagger UI files installed with the ``swagger-ui-bundle`` package
and starts it from ``web/static/api-docs.js``; "try it out" requests carry the
session's CSRF token like every other script of the pages.
"""

from __future__ import annotations

from fastapi import APIRouter, FastAPI, Request
from fastapi.responses import HTMLResponse
from fastapi.staticfiles import StaticFiles
from swagger_ui_bundle import swagger_ui_path

from server.api.deps import CurrentUser
from server.pages.templating import templates

router = APIRouter(include_in_schema=False)


@router.get("/docs", response_class=HTMLResponse)
def api_docs(request: Request, user: CurrentUser) -> HTMLResponse:
    """Swagger UI over ``/openapi.json``."""
    return templates.TemplateResponse(request, "api_docs.html", {"user": user})


def mount_swagger_files(app: FastAPI) -> None:
    """Serve the installed Swagger UI files under ``/static/swagger``."""
    app.mount("/static/swagger", StaticFiles(directory=swagger_ui_path), name="swagger")
