"""Cross-site request forgery: a token per session, required on every state-changing form post.

The token is an HMAC of a fixed label keyed by the session's own secret, so it
needs no storage, changes with every sign-in and cannot be computed without
the session cookie (which scripts cannot read: it is HttpOnly). Pages put it in
a hidden ``csrf_token`` field; scripts send it as the ``X-CSRF-Token`` header.
Requests authenticated with a Bearer token are exempt: a browser never adds
that header by itself.

As a second fence, a cookie-authenticated unsafe request whose ``Origin`` (or
``Referer``) names another site is refused whatever token it carries.

References: OWASP Cross-Site Request Forgery Prevention Cheat Sheet
(synchronizer token pattern, HMAC-based tokens, verifying origin with standard headers).
"""

from __future__ import annotations

import hashlib
import hmac
from urllib.parse import urlsplit

CSRF_FIELD = "csrf_token"
CSRF_HEADER = "x-csrf-token"
SAFE_METHODS = frozenset({"GET", "HEAD", "OPTIONS", "TRACE"})


def csrf_token(session_secret: str) -> str:
    """The CSRF token of the session whose cookie holds ``session_secret``."""
    return hmac.new(session_secret.encode("utf-8"), b"tidewaiter-csrf", hashlib.sha256).hexdigest()


def csrf_ok(session_secret: str, submitted: str | None) -> bool:
    """True when ``submitted`` is this session's CSRF token (constant-time compare)."""
    if not submitted:
        return False
    return hmac.compare_digest(csrf_token(session_secret), submitted)


def same_origin(origin: str | None, referer: str | None, host: str | None) -> bool:
    """False when the request says it comes from a site other than ``host``.

    A request with neither header passes (older clients, privacy settings);
    the token is then the only fence.
    """
    source = origin if origin and origin != "null" else referer
    if origin == "null":
        return False
    if not source:
        return True
    return bool(host) and urlsplit(source).netloc.lower() == host.lower()
