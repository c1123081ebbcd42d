"""Who is making a request, and may they do it: the one place authorisation is decided.

``principal_for`` reads the request's credentials: an ``Authorization: Bearer``
API token, or else the session cookie. Cookie-authenticated requests that
change state must carry the session's CSRF token and must not come from another
site. Any state-changing request also needs at least the reviewer role, so a
viewer can look at everything and change nothing; routes that change only the
caller's own things (sign-out, own tokens) use ``principal_for`` with
``self_service=True``. Admin-only routers add ``require_role(Role.admin)``.

The exceptions raised here become 401 (API), a redirect to the sign-in page
(pages) or 403 in ``server.security.setup``.
"""

from __future__ import annotations

from dataclasses import dataclass

from sqlalchemy.orm import Session
from starlette.requests import Request

from server.security.csrf import (
    CSRF_FIELD,
    CSRF_HEADER,
    SAFE_METHODS,
    csrf_ok,
    csrf_token,
    same_origin,
)
from server.store import accounts
from server.store.accounts import Role

SESSION_COOKIE = "tidewaiter_session"


class SignInRequired(Exception):
    """No valid credentials came with the request."""

    def __init__(self, message: str = "Sign in first: this needs an account.") -> None:
        super().__init__(message)
        self.message = message


class Forbidden(Exception):
    """The caller is known but may not do this."""

    def __init__(self, message: str, code: str = "forbidden") -> None:
        super().__init__(message)
        self.message = message
        self.code = code


@dataclass(frozen=True)
class User:
    """Who is making the request, as the route handlers see it."""

    id: int | None
    name: str
    role: str
    is_demo: bool = False
    via: str = "session"
    """How they proved it: "session" (browser cookie) or "token" (API token)."""
    session_secret: str | None = None

    @property
    def role_enum(self) -> Role:
        return Role(self.role)

    def allows(self, needed: Role) -> bool:
        """True when this user's role is at least ``needed``."""
        return self.role_enum.allows(needed)

    @property
    def csrf_token(self) -> str | None:
        """The token the pages put in their forms (None for API-token requests)."""
        return csrf_token(self.session_secret) if self.session_secret else None


def _bearer(request: Request) -> str | None:
    header = request.headers.get("authorization", "")
    scheme, _, value = header.partition(" ")
    if scheme.lower() != "bearer":
        return None
    return value.strip() or ""


async def _submitted_csrf(request: Request) -> str | None:
    """The CSRF token from the header, the query (multipart uploads) or an urlencoded form."""
    token = request.headers.get(CSRF_HEADER) or request.query_params.get(CSRF_FIELD)
    if token:
        return token
    if request.headers.get("content-type", "").startswith("application/x-www-form-urlencoded"):
        form = await request.form()  # cached on the request: the route can read it again
        value = form.get(CSRF_FIELD)
        return value if isinstance(value, str) else None
    return None


def _check_origin(request: Request) -> None:
    if not same_origin(
        request.headers.get("origin"), request.headers.get("referer"), request.headers.get("host")
    ):
        raise Forbidden("This request came from another site and was refused.", code="csrf")


async def principal_for(request: Request, session: Session, *, self_service: bool = False) -> User:
    """The signed-in user of ``request``; raises ``SignInRequired`` or ``Forbidden``."""
    token = _bearer(request)
    if token is not None:
        owner = accounts.user_for_token(session, token) if token else None
        if owner is None:
            raise SignInRequired("The API token is unknown or revoked.")
        if session.dirty:
            session.commit()  # keeps the token's last use
        user = User(owner.id, owner.name, owner.role, owner.is_demo, via="token")
    else:
        secret = request.cookies.get(SESSION_COOKIE)
        row = accounts.user_for_session(session, secret) if secret else None
        if row is None:
            raise SignInRequired()
        user = User(row.id, row.name, row.role, row.is_demo, "session", secret)
        if request.method not in SAFE_METHODS:
            _check_origin(request)
            if not csrf_ok(secret, await _submitted_csrf(request)):
                raise Forbidden(
                    "The form has expired or did not come from this site; "
                    "reload the page and try again.",
                    code="csrf",
                )
    if request.method not in SAFE_METHODS and not self_service and not user.allows(Role.reviewer):
        raise Forbidden("A viewer can look but not change anything; ask an admin for more.")
    request.state.user = user
    return user


def require(user: User, needed: Role) -> None:
    """Raise ``Forbidden`` unless ``user`` has at least the role ``needed``."""
    if not user.allows(needed):
        raise Forbidden(f"This needs the {needed.value} role.")
