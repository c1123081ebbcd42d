"""/api/v1/auth: signing in and out from a script or the pages' own code, and who am I.

Scripts usually send an API token instead (``Authorization: Bearer``); this
sign-in answers a session cookie and the CSRF token that must come with every
change made under that cookie.
"""

from __future__ import annotations

from fastapi import APIRouter, Request, Response
from pydantic import BaseModel, Field

from server.api.deps import CurrentUser, SessionDep, SettingsDep, SignedInUser
from server.api.errors import ApiError
from server.security.access import SESSION_COOKIE
from server.security.csrf import csrf_token
from server.security.sessions import start_session
from server.security.signin import change_own_password, sign_in, sign_out
from server.store import accounts

router = APIRouter(prefix="/auth", tags=["accounts"])


class SignInIn(BaseModel):
    """A name and password."""

    name: str = Field(min_length=1, max_length=100)
    password: str = Field(min_length=1, max_length=1000)


class Me(BaseModel):
    """The signed-in user."""

    id: int | None
    name: str
    role: str
    is_demo: bool
    via: str
    csrf_token: str | None = Field(
        None, description="Send as X-CSRF-Token with every change made under the session cookie."
    )


def client_address(request: Request) -> str:
    """The client's address: the connecting peer, or the one a trusted proxy forwarded.

    Proxy headers are believed only from TIDEWAITER_SECURITY__TRUSTED_PROXIES.
    """
    return request.client.host if request.client else "unknown"


@router.post("/sign-in", response_model=Me)
def api_sign_in(
    body: SignInIn, request: Request, response: Response, session: SessionDep, settings: SettingsDep
) -> Me:
    """Check the name and password; answer the session cookie and its CSRF token."""
    outcome = sign_in(
        session,
        body.name,
        body.password,
        address=client_address(request),
        security=settings.security,
    )
    if not outcome.ok:
        session.commit()  # keep the failure: it counts towards the throttle
        if outcome.retry_after is not None:
            raise ApiError(
                429,
                outcome.message,
                code="held",
                retry_after_seconds=round(outcome.retry_after),
            )
        raise ApiError(401, outcome.message, code="not_signed_in")
    user = outcome.user
    secret = start_session(
        session,
        user,
        response,
        settings.security,
        address=client_address(request),
        previous=request.cookies.get(SESSION_COOKIE),
    )
    session.commit()
    return Me(
        id=user.id,
        name=user.name,
        role=user.role,
        is_demo=user.is_demo,
        via="session",
        csrf_token=csrf_token(secret),
    )


@router.post("/sign-out", status_code=204)
def api_sign_out(
    request: Request, session: SessionDep, settings: SettingsDep, user: SignedInUser
) -> Response:
    """End the current session."""
    return sign_out(
        session,
        request.cookies.get(SESSION_COOKIE),
        user.id,
        address=client_address(request),
        response=Response(status_code=204),
        security=settings.security,
    )


class PasswordChange(BaseModel):
    """The current password, to prove it is the owner, and the new one."""

    current: str = Field(min_length=1, max_length=1000)
    new: str = Field(min_length=1, max_length=1000)


@router.put("/password", status_code=204)
def change_password(
    body: PasswordChange,
    request: Request,
    session: SessionDep,
    settings: SettingsDep,
    user: SignedInUser,
) -> Response:
    """Change one's own password; every session ends, this one starts again."""
    outcome = change_own_password(
        session, user.id, body.current, body.new, address=client_address(request)
    )
    if outcome is not None:
        session.commit()
        raise ApiError(422, outcome, code="password_refused")
    response = Response(status_code=204)
    if user.via == "session":
        owner = session.get(accounts.User, user.id)
        start_session(session, owner, response, settings.security, address=client_address(request))
    session.commit()
    return response


@router.get("/me", response_model=Me)
def me(user: CurrentUser) -> Me:
    """Who the credentials of this request belong to."""
    return Me(
        id=user.id,
        name=user.name,
        role=user.role,
        is_demo=user.is_demo,
        via=user.via,
        csrf_token=user.csrf_token,
    )
