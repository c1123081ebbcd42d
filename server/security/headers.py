"""Security headers on every response: a strict Content-Security-Policy and friends.

Every script, style sheet, image and font Tidewaiter serves is its own
(plotly.min.js comes from the installed plotly package, served locally), so
the policy allows only this origin, forbids plugins, framing and foreign form
targets, and no inline script can run: escaped file contents that slipped
through as markup still could not execute.

References: W3C Content Security Policy Level 3; OWASP HTTP Headers Cheat
Sheet and Secure Headers Project (X-Content-Type-Options, Referrer-Policy,
frame-ancestors / X-Frame-Options, Permissions-Policy, HSTS); RFC 6797 (HSTS).
"""

from __future__ import annotations

from collections.abc import Mapping

from starlette.types import ASGIApp, Message, Receive, Scope, Send

CSP_DIRECTIVES: Mapping[str, str] = {
    "default-src": "'self'",
    "script-src": "'self'",
    # plotly.js sets element styles from script (allowed by CSP) and adds one style element
    # of its own; inline styles carry no script, so allowing them keeps the charts working.
    "style-src": "'self' 'unsafe-inline'",
    "img-src": "'self' data: blob:",
    "font-src": "'self'",
    "connect-src": "'self'",
    "object-src": "'none'",
    "base-uri": "'none'",
    "form-action": "'self'",
    "frame-ancestors": "'none'",
}

CONTENT_SECURITY_POLICY = "; ".join(f"{name} {value}" for name, value in CSP_DIRECTIVES.items())

BASE_HEADERS: Mapping[str, str] = {
    "content-security-policy": CONTENT_SECURITY_POLICY,
    "x-content-type-options": "nosniff",
    "referrer-policy": "same-origin",
    "x-frame-options": "DENY",
    "permissions-policy": "camera=(), microphone=(), geolocation=(), payment=(), usb=()",
    "cross-origin-opener-policy": "same-origin",
}

HSTS = "max-age=31536000"
"""One year, the value the HSTS preload list asks for (common practice)."""


def security_headers(*, https: bool) -> dict[str, str]:
    """The headers added to every response (HSTS only when served over HTTPS)."""
    headers = dict(BASE_HEADERS)
    if https:
        headers["strict-transport-security"] = HSTS
    return headers


class SecurityHeadersMiddleware:
    """ASGI middleware adding ``security_headers`` to every HTTP response.

    Headers a route set itself are kept. Responses other than static files
    also get ``Cache-Control: no-store`` unless they chose otherwise, since
    pages and API answers may show what a partner's file holds.
    """

    def __init__(self, app: ASGIApp, *, https: bool = False, static_prefix: str = "/static"):
        self.app = app
        self.static_prefix = static_prefix
        self.headers = [(k.encode(), v.encode()) for k, v in security_headers(https=https).items()]

    async def __call__(self, scope: Scope, receive: Receive, send: Send) -> None:
        if scope["type"] != "http":
            await self.app(scope, receive, send)
            return
        is_static = scope.get("path", "").startswith(self.static_prefix)

        async def send_with_headers(message: Message) -> None:
            if message["type"] == "http.response.start":
                present = {name.lower() for name, _ in message.get("headers", [])}
                extra = [(k, v) for k, v in self.headers if k not in present]
                if not is_static and b"cache-control" not in present:
                    extra.append((b"cache-control", b"no-store"))
                message["headers"] = [*message.get("headers", []), *extra]
            await send(message)

        await self.app(scope, receive, send_with_headers)
