"""Signing in: password check, throttling per account and address, rehash, audit.

One function, ``sign_in``, used by the sign-in page and the sign-in API alike,
so both refuse, hold back and record in exactly the same way.
"""

from __future__ import annotations

from dataclasses import dataclass
from datetime import timedelta

from sqlalchemy.orm import Session
from starlette.responses import Response

from server.security.passwords import (
    WeakPassword,
    burn_time,
    check_strength,
    hash_password,
    verify_password,
)
from server.security.sessions import clear_session_cookie
from server.security.throttle import retry_after
from server.settings import SecuritySettings
from server.store import accounts
from server.store.models import utcnow

WRONG = "The name or the password is not right."


@dataclass(frozen=True)
class SignInOutcome:
    """What a sign-in attempt gave: a user, or a refusal with its reason."""

    user: accounts.User | None
    message: str = ""
    retry_after: float | None = None

    @property
    def ok(self) -> bool:
        return self.user is not None


def held_for(session: Session, name: str, address: str, security: SecuritySettings) -> float | None:
    """Seconds until ``name`` may try again from ``address``, or None when it may now."""
    window = timedelta(minutes=security.failed_sign_in_window_minutes)
    now = utcnow()
    since = now - window
    waits = [
        retry_after(
            accounts.failed_sign_ins(session, since=since, account=name),
            now=now,
            limit=security.max_failed_sign_ins,
            window=window,
        ),
        retry_after(
            accounts.failed_sign_ins(session, since=since, address=address),
            now=now,
            limit=security.max_failed_sign_ins_per_address,
            window=window,
        ),
    ]
    present = [wait for wait in waits if wait is not None]
    return max(present) if present else None


def sign_in(
    session: Session, name: str, password: str, *, address: str, security: SecuritySettings
) -> SignInOutcome:
    """Check a name and password; on success the caller opens a session or answers a token.

    Refusals never say whether the name exists. While an account or address is
    held back the password is not even checked, so guessing gains nothing.
    """
    name = name.strip()[:100]
    wait = held_for(session, name, address, security)
    if wait is not None:
        accounts.audit(session, "sign-in-held", target=f"user:{name}", address=address)
        minutes = max(1, round(wait / 60))
        return SignInOutcome(
            None,
            f"Too many failed sign-ins; try again in {minutes} minute{'s' * (minutes != 1)}.",
            wait,
        )
    user = accounts.find_user(session, name)
    if user is None or not user.is_active or not user.password_hash:
        burn_time(password)
        ok, new_hash = False, None
    else:
        ok, new_hash = verify_password(user.password_hash, password)
    if not ok:
        accounts.record_failed_sign_in(session, name, address)
        accounts.audit(session, "sign-in-failed", target=f"user:{name}", address=address)
        return SignInOutcome(None, WRONG)
    assert user is not None
    if new_hash:
        user.password_hash = new_hash
    accounts.clear_failed_sign_ins(session, name)
    accounts.audit(session, "sign-in", actor=user, address=address)
    return SignInOutcome(user)


def change_own_password(
    session: Session, user_id: int | None, current: str, new: str, *, address: str
) -> str | None:
    """Set a new password for the user who knows the current one; None when done, else why not.

    Every session of the user ends (the caller opens a fresh one for the
    browser that asked), so a stolen session does not outlive the change.
    """
    user = session.get(accounts.User, user_id) if user_id is not None else None
    if user is None or not user.password_hash:
        return "This account has no password to change."
    ok, _ = verify_password(user.password_hash, current)
    if not ok:
        accounts.record_failed_sign_in(session, user.name, address)
        return "The current password is not right."
    try:
        check_strength(new)
    except WeakPassword as exc:
        return f"The new password is refused: {exc}."
    user.password_hash = hash_password(new)
    accounts.close_user_sessions(session, user)
    accounts.audit(session, "password-change", actor=user, address=address)
    return None


def sign_out(
    session: Session,
    secret: str | None,
    user_id: int,
    *,
    address: str,
    response: Response,
    security: SecuritySettings,
) -> Response:
    """End the session ``secret`` names (audited) and clear its cookie on ``response``.

    The API answers 204 and the pages redirect; both end the session the same way.
    """
    if secret:
        accounts.close_session(session, secret)
        actor = session.get(accounts.User, user_id)
        accounts.audit(session, "sign-out", actor=actor, address=address)
        session.commit()
    clear_session_cookie(response, security)
    return response
