"""Pages for one's own account: sign-in, sign-out, and API tokens.

Every form here carries the session's CSRF token (``csrf_token``), except the
sign-in form, which has no session yet; it is protected by SameSite cookies,
the origin check and the throttle instead.
"""

from __future__ import annotations

from urllib.parse import urlsplit

from fastapi import APIRouter, Form, Request
from fastapi.responses import HTMLResponse, RedirectResponse, Response

from server.api.deps import SessionDep, SettingsDep, SignedInUser
from server.api.routes.auth import client_address
from server.pages.templating import templates
from server.security.access import SESSION_COOKIE
from server.security.csrf import same_origin
from server.security.sessions import start_session
from server.security.signin import change_own_password, sign_in, sign_out
from server.store import accounts

router = APIRouter(include_in_schema=False)


def local_target(target: str | None) -> str:
    """Where to go after signing in: a path on this site only, never another site."""
    if not target or not target.startswith("/") or target.startswith("//"):
        return "/"
    parts = urlsplit(target)
    if parts.scheme or parts.netloc or "\\" in target:
        return "/"
    return target


@router.get("/sign-in", response_class=HTMLResponse)
def sign_in_page(request: Request, next: str | None = None) -> HTMLResponse:
    """The sign-in form."""
    return templates.TemplateResponse(
        request,
        "account/sign_in.html",
        {"next": local_target(next), "message": None, "name": "", "user": None},
    )


@router.post("/sign-in", response_class=HTMLResponse)
def sign_in_submit(
    request: Request,
    session: SessionDep,
    settings: SettingsDep,
    name: str = Form("", max_length=100),
    password: str = Form("", max_length=1000),
    next: str = Form("/", max_length=2000),
) -> Response:
    """Check the name and password; on success start a session and go on."""
    headers = request.headers
    if not same_origin(headers.get("origin"), headers.get("referer"), headers.get("host")):
        return HTMLResponse("This sign-in came from another site and was refused.", 403)
    outcome = sign_in(
        session, name, password, address=client_address(request), security=settings.security
    )
    if not outcome.ok:
        session.commit()
        return templates.TemplateResponse(
            request,
            "account/sign_in.html",
            {"next": local_target(next), "message": outcome.message, "name": name, "user": None},
            # The form again with the reason; a refused password is no error of the page.
            status_code=429 if outcome.retry_after is not None else 200,
        )
    response = RedirectResponse(local_target(next), status_code=303)
    start_session(
        session,
        outcome.user,
        response,
        settings.security,
        address=client_address(request),
        previous=request.cookies.get(SESSION_COOKIE),
    )
    session.commit()
    return response


@router.post("/sign-out")
def sign_out_submit(
    request: Request, session: SessionDep, settings: SettingsDep, user: SignedInUser
) -> Response:
    """End the session and go back to the sign-in page."""
    return sign_out(
        session,
        request.cookies.get(SESSION_COOKIE),
        user.id,
        address=client_address(request),
        response=RedirectResponse("/sign-in", status_code=303),
        security=settings.security,
    )


@router.get("/account", response_class=HTMLResponse)
def account_page(request: Request, session: SessionDep, user: SignedInUser) -> HTMLResponse:
    """One's role and API tokens, with the forms to create and revoke them."""
    owner = session.get(accounts.User, user.id)
    return templates.TemplateResponse(
        request,
        "account/account.html",
        {"user": user, "tokens": accounts.tokens_of(session, owner), "new_token": None},
    )


@router.post("/account/password", response_class=HTMLResponse)
def change_password_submit(
    request: Request,
    session: SessionDep,
    settings: SettingsDep,
    user: SignedInUser,
    current: str = Form("", max_length=1000),
    new: str = Form("", max_length=1000),
) -> Response:
    """Change one's own password; other sessions end, this browser stays signed in."""
    refused = change_own_password(session, user.id, current, new, address=client_address(request))
    owner = session.get(accounts.User, user.id)
    if refused is not None:
        session.commit()
        return templates.TemplateResponse(
            request,
            "account/account.html",
            {
                "user": user,
                "tokens": accounts.tokens_of(session, owner),
                "new_token": None,
                "password_message": refused,
            },
        )
    response = RedirectResponse("/account?password=changed", status_code=303)
    start_session(session, owner, response, settings.security, address=client_address(request))
    session.commit()
    return response


@router.post("/account/tokens", response_class=HTMLResponse)
def create_token_submit(
    request: Request,
    session: SessionDep,
    user: SignedInUser,
    name: str = Form("token", max_length=100),
) -> HTMLResponse:
    """Create a token and show its text, this once."""
    owner = session.get(accounts.User, user.id)
    token, plaintext = accounts.create_token(session, owner, name)
    session.commit()
    return templates.TemplateResponse(
        request,
        "account/account.html",
        {
            "user": user,
            "tokens": accounts.tokens_of(session, owner),
            "new_token": {"name": token.name, "text": plaintext},
        },
        status_code=201,
    )


@router.post("/account/tokens/{token_id}/revoke")
def revoke_token_submit(token_id: int, session: SessionDep, user: SignedInUser) -> Response:
    """Revoke one of one's own tokens."""
    owner = session.get(accounts.User, user.id)
    accounts.revoke_token(session, owner, token_id)
    session.commit()
    return RedirectResponse("/account", status_code=303)
