"""Putting the security pieces on the app: headers, audit log, and the answers to refusals.

An unknown caller gets 401 from the API (with ``WWW-Authenticate: Bearer``)
and a redirect to the sign-in page from the pages; a known caller without the
power gets 403. Both are the same JSON shape as every other API error.
"""

from __future__ import annotations

from urllib.parse import quote

from fastapi import FastAPI, Request
from fastapi.responses import RedirectResponse, Response
from uvicorn.middleware.proxy_headers import ProxyHeadersMiddleware

from server.api.errors import error_response
from server.pages.templating import templates
from server.security.access import Forbidden, SignInRequired
from server.security.audit import AuditMiddleware
from server.security.headers import SecurityHeadersMiddleware
from server.security.paths import TraversalGuardMiddleware
from server.settings import Settings
from server.store import session_scope

API_PATH = "/api/"
SIGN_IN_PATH = "/sign-in"


def wants_json(request: Request) -> bool:
    """API requests get JSON answers; pages get a redirect or a short page."""
    return request.url.path.startswith(API_PATH)


def sign_in_url(request: Request) -> str:
    """The sign-in page, with the page to come back to (a local path only)."""
    target = request.url.path + (f"?{request.url.query}" if request.url.query else "")
    if request.method != "GET" or target == "/":
        return SIGN_IN_PATH
    return f"{SIGN_IN_PATH}?next={quote(target, safe='')}"


def install_security(app: FastAPI, settings: Settings) -> None:
    """Add the security middleware and refusal handlers to ``app``."""
    app.add_middleware(AuditMiddleware, session_scope=lambda: session_scope(settings))
    app.add_middleware(TraversalGuardMiddleware)
    app.add_middleware(SecurityHeadersMiddleware, https=settings.security.https)
    if settings.security.trusted_proxies.strip():
        # Outermost, so every layer below sees the client the trusted proxy names.
        app.add_middleware(ProxyHeadersMiddleware, trusted_hosts=settings.security.trusted_proxies)

    @app.exception_handler(SignInRequired)
    async def _sign_in_required(request: Request, exc: SignInRequired) -> Response:
        if wants_json(request):
            return error_response(
                401, exc.message, "not_signed_in", headers={"WWW-Authenticate": "Bearer"}
            )
        return RedirectResponse(sign_in_url(request), status_code=303)

    @app.exception_handler(Forbidden)
    async def _forbidden(request: Request, exc: Forbidden) -> Response:
        if wants_json(request):
            return error_response(403, exc.message, exc.code)
        return templates.TemplateResponse(
            request, "account/refused.html", {"message": exc.message}, status_code=403
        )
