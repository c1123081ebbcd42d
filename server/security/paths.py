"""Refusing path traversal in any part of a request: its path and every query parameter.

Stored files are named by their content's digest, never by the upload, and no
route takes a file-system path, so no request ever needs to climb out of a
folder. One middleware refuses any that tries (``../``, ``..\\``, their
percent-encoded forms, NUL bytes) before a route runs, which covers the
parameters that name a file, a sheet or a column, and those added later.

References: OWASP "Path Traversal" (attack examples: ``../``, encoded and
absolute forms); CWE-22.
"""

from __future__ import annotations

from typing import Any
from urllib.parse import parse_qsl

_TRAVERSAL = ("../", "..\\", "\x00")


def looks_like_traversal(text: str) -> bool:
    """True for text that climbs out of a folder (``../``, ``..\\``), is ``..`` or holds NUL."""
    return text.strip() == ".." or any(mark in text for mark in _TRAVERSAL)


class TraversalGuardMiddleware:
    """Refuses, with 400, a request whose path or query parameters try path traversal."""

    def __init__(self, app: Any) -> None:
        self.app = app

    async def __call__(self, scope: Any, receive: Any, send: Any) -> None:
        if scope["type"] == "http" and self._hostile(scope):
            body = b'{"detail":"path traversal is not allowed in a request","code":"bad_request"}'
            await send(
                {
                    "type": "http.response.start",
                    "status": 400,
                    "headers": [
                        (b"content-type", b"application/json"),
                        (b"content-length", str(len(body)).encode()),
                    ],
                }
            )
            await send({"type": "http.response.body", "body": body})
            return
        await self.app(scope, receive, send)

    @staticmethod
    def _hostile(scope: Any) -> bool:
        path = scope.get("path", "")
        raw = scope.get("raw_path") or b""
        if any(segment == ".." for segment in path.split("/")) or "\x00" in path:
            return True
        if b"%2e%2e" in raw.lower() or b"%00" in raw:
            return True
        query = scope.get("query_string", b"").decode("latin-1")
        return any(looks_like_traversal(k) or looks_like_traversal(v) for k, v in parse_qsl(query))
