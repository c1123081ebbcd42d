"""The web application: API, pages and static files, with the job runner's lifetime."""

from __future__ import annotations

from collections.abc import AsyncIterator
from contextlib import asynccontextmanager

from fastapi import FastAPI

from server.api import account_router, api_router, health_router
from server.api.errors import install_error_handlers
from server.pages import install_pages
from server.security.setup import install_security
from server.settings import Settings, get_settings
from worker.jobs.lifecycle import start_background, stop_background


def create_app(settings: Settings | None = None) -> FastAPI:
    """A Tidewaiter app for ``settings`` (the environment's by default)."""
    settings = settings or get_settings()

    @asynccontextmanager
    async def lifespan(app: FastAPI) -> AsyncIterator[None]:
        background = start_background(settings)
        try:
            yield
        finally:
            stop_background(settings, background)

    app = FastAPI(
        # /docs is served from this host by server.pages.api_docs (no CDN, no inline script).
        docs_url=None,
        redoc_url=None,
        title="Tidewaiter",
        summary="Intake desk for partner data files: upload, profile, score, discuss, decide.",
        version="0.1.0",
        lifespan=lifespan,
    )
    app.state.settings = settings
    install_error_handlers(app)
    install_security(app, settings)
    app.include_router(health_router)
    app.include_router(api_router)
    app.include_router(account_router)
    install_pages(app)
    return app
