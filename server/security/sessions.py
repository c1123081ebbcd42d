"""The session cookie: HttpOnly, SameSite=Lax, Secure over HTTPS, expiring with the session.

The cookie holds a 256-bit random secret; the server keeps only its digest
(``server.store.accounts.UserSession``), so signing out or an admin disabling
an account ends the session at once, and a copy of the database opens nothing.

References: RFC 6265bis (SameSite), OWASP Session Management Cheat Sheet.
"""

from __future__ import annotations

from datetime import timedelta

from sqlalchemy.orm import Session
from starlette.responses import Response

from server.security.access import SESSION_COOKIE
from server.settings import SecuritySettings
from server.store import accounts


def session_lifetime(security: SecuritySettings) -> timedelta:
    """How long a new session lasts."""
    return timedelta(hours=security.session_hours)


def set_session_cookie(response: Response, secret: str, security: SecuritySettings) -> None:
    """Put the session's secret in the browser, with the safe cookie attributes."""
    response.set_cookie(
        SESSION_COOKIE,
        secret,
        max_age=int(session_lifetime(security).total_seconds()),
        path="/",
        httponly=True,
        samesite="lax",
        secure=security.https,
    )


def start_session(
    db: Session,
    user: accounts.User,
    response: Response,
    security: SecuritySettings,
    *,
    address: str,
    previous: str | None = None,
) -> str:
    """Open a server-side session for ``user``, put its cookie on ``response`` and
    return its secret (the CSRF token is derived from it).

    ``previous`` is the secret of the browser's earlier session, given at sign-in:
    it is closed first, so a sign-in never carries on an earlier session (no
    session fixation). The caller commits.
    """
    if previous:
        accounts.close_session(db, previous)
    secret = accounts.open_session(db, user, lifetime=session_lifetime(security), address=address)
    set_session_cookie(response, secret, security)
    return secret


def clear_session_cookie(response: Response, security: SecuritySettings) -> None:
    """Remove the session cookie from the browser."""
    response.delete_cookie(
        SESSION_COOKIE, path="/", httponly=True, samesite="lax", secure=security.https
    )
