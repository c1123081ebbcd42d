"""Security headers on every response, through a real Starlette app."""

from __future__ import annotations

import warnings

from starlette.applications import Starlette
from starlette.responses import PlainTextResponse
from starlette.routing import Route

with warnings.catch_warnings():
    # Starlette's test client warns about its own httpx dependency, not about our code.
    warnings.simplefilter("ignore")
    from starlette.testclient import TestClient

from server.security.headers import SecurityHeadersMiddleware


def _app(https: bool) -> Starlette:
    async def page(request):
        return PlainTextResponse("hello")

    async def cached(request):
        return PlainTextResponse("x", headers={"cache-control": "max-age=60"})

    app = Starlette(
        routes=[Route("/", page), Route("/static/app.js", page), Route("/cached", cached)]
    )
    app.add_middleware(SecurityHeadersMiddleware, https=https)
    return app


def test_every_response_carries_the_headers() -> None:
    response = TestClient(_app(https=False)).get("/")
    csp = response.headers["content-security-policy"]
    directives = dict(part.strip().split(" ", 1) for part in csp.split(";"))
    assert directives["script-src"] == "'self'"  # no inline or foreign scripts
    assert directives["object-src"] == "'none'"
    assert directives["frame-ancestors"] == "'none'"
    assert "unsafe-eval" not in csp and "http" not in csp
    assert response.headers["x-content-type-options"] == "nosniff"
    assert response.headers["x-frame-options"] == "DENY"
    assert response.headers["referrer-policy"] == "same-origin"
    assert "camera=()" in response.headers["permissions-policy"]
    assert response.headers["cache-control"] == "no-store"
    assert "strict-transport-security" not in response.headers


def test_hsts_only_over_https() -> None:
    response = TestClient(_app(https=True)).get("/")
    assert response.headers["strict-transport-security"].startswith("max-age=")


def test_static_files_stay_cacheable_and_routes_keep_their_own_choice() -> None:
    client = TestClient(_app(https=False))
    assert "cache-control" not in client.get("/static/app.js").headers
    assert client.get("/cached").headers["cache-control"] == "max-age=60"
    assert client.get("/static/app.js").headers["x-content-type-options"] == "nosniff"


def test_missing_routes_get_the_headers_too() -> None:
    response = TestClient(_app(https=False)).get("/nowhere")
    assert response.status_code == 404
    assert "content-security-policy" in response.headers
