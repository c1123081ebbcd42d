"""Refusing path traversal in any parameter that names a file or a sheet.

Stored files are named by their content's digest, never by the upload, so no
request parameter should ever need to reach outside a folder. These checks
refuse what would: separators, parent references, absolute and drive paths,
control characters and NUL bytes, and names that resolve outside their base.

References: OWASP "Path Traversal" (attack examples: ``../``, encoded and
absolute forms); CWE-22.
"""

from __future__ import annotations

import unicodedata
from pathlib import Path
from typing import Any
from urllib.parse import parse_qsl


class UnsafeName(ValueError):
    """A file or sheet name that could reach outside where it belongs."""


MAX_NAME_LENGTH = 255
"""Longest name accepted: the common file-system limit for one path component."""


def _has_control(text: str) -> bool:
    return any(unicodedata.category(ch) in ("Cc", "Cf") for ch in text)


def safe_name(name: str) -> str:
    """Return ``name`` when it is one plain path component; raise ``UnsafeName`` otherwise."""
    if not name or name.strip() != name or len(name) > MAX_NAME_LENGTH:
        raise UnsafeName("a name must be 1 to 255 characters with no leading or trailing space")
    if _has_control(name):
        raise UnsafeName("a name cannot hold control characters")
    if "/" in name or "\\" in name:
        raise UnsafeName("a name cannot hold a path separator")
    if name in (".", "..") or ":" in name:
        raise UnsafeName("a name cannot be a parent reference or a drive")
    if "%2e" in name.lower() or "%2f" in name.lower() or "%5c" in name.lower():
        raise UnsafeName("a name cannot hold encoded separators or dots")
    return name


def safe_sheet_name(name: str) -> str:
    """Return a spreadsheet sheet name when it is safe to look up; raise ``UnsafeName``.

    Sheet names may hold spaces and most punctuation, but never the characters
    spreadsheets forbid (``: \\ / ? * [ ]``) nor control characters; at most 31
    characters (the limit of the xlsx format).
    """
    if not name or len(name) > 31:
        raise UnsafeName("a sheet name must be 1 to 31 characters")
    if _has_control(name) or any(ch in name for ch in ":\\/?*[]"):
        raise UnsafeName("a sheet name cannot hold control characters or : \\ / ? * [ ]")
    if name in (".", ".."):
        raise UnsafeName("a sheet name cannot be a parent reference")
    return name


def within(base: Path, name: str) -> Path:
    """The path of ``name`` inside ``base``, refusing anything that resolves outside it."""
    candidate = (base / safe_name(name)).resolve()
    root = base.resolve()
    if candidate.parent != root:
        raise UnsafeName("the name leads outside its folder")
    return candidate


_TRAVERSAL = ("../", "..\\", "\x00")


def looks_like_traversal(text: str) -> bool:
    """True for text that climbs out of a folder (``../``, ``..\\``), is ``..`` or holds NUL."""
    return text.strip() == ".." or any(mark in text for mark in _TRAVERSAL)


class TraversalGuardMiddleware:
    """Refuses, with 400, a request whose path or query parameters try path traversal.

    No Tidewaiter route takes a file-system path from a request (stored files
    are named by digest), so such a request is an attack or a mistake either
    way; refusing it before any route runs covers parameters added later too.
    """

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
