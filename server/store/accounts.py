"""Accounts: users and their roles, sign-in sessions, API tokens, failed sign-ins, the audit log.

Secrets never reach the database in the clear: passwords are Argon2 hashes
(``server.security.passwords``), session cookies and API tokens are stored as
the SHA-256 digest of a 256-bit random secret (``server.security.tokens``).
The functions here are the only ones that read or write these tables.
"""

from __future__ import annotations

import enum
from datetime import datetime, timedelta
from typing import Any

from sqlalchemy import Boolean, ForeignKey, Integer, String, Text, delete, func, select
from sqlalchemy.orm import Mapped, Session, mapped_column, relationship

from server.security.tokens import digest, new_api_token, new_secret
from server.store.models import Base, JSONDocument, UTCDateTime, utcnow


class Role(enum.StrEnum):
    """What a user may do: viewers read, reviewers also upload, comment and decide,
    admins also manage users, suppliers, rules, settings and deletions."""

    viewer = "viewer"
    reviewer = "reviewer"
    admin = "admin"

    @property
    def rank(self) -> int:
        """Viewer < reviewer < admin: a role may do everything a lower one may."""
        return ("viewer", "reviewer", "admin").index(self.value)

    def allows(self, needed: Role) -> bool:
        """True when this role is at least ``needed``."""
        return self.rank >= needed.rank


class User(Base):
    """A person (or a script's owner) who may sign in."""

    __tablename__ = "app_user"

    id: Mapped[int] = mapped_column(Integer, primary_key=True)
    name: Mapped[str] = mapped_column(String(100), unique=True)
    role: Mapped[str] = mapped_column(String(20), default=Role.viewer)
    password_hash: Mapped[str | None] = mapped_column(Text)
    is_demo: Mapped[bool] = mapped_column(Boolean, default=False)
    is_active: Mapped[bool] = mapped_column(Boolean, default=True)
    created_at: Mapped[datetime] = mapped_column(UTCDateTime, default=utcnow)
    last_sign_in_at: Mapped[datetime | None] = mapped_column(UTCDateTime)

    tokens: Mapped[list[ApiToken]] = relationship(
        back_populates="user", cascade="all, delete-orphan"
    )

    @property
    def role_enum(self) -> Role:
        """The role as a ``Role``."""
        return Role(self.role)


class UserSession(Base):
    """A signed-in browser: the cookie holds the secret, this row its digest."""

    __tablename__ = "user_session"

    id: Mapped[int] = mapped_column(Integer, primary_key=True)
    user_id: Mapped[int] = mapped_column(ForeignKey("app_user.id", ondelete="CASCADE"), index=True)
    digest: Mapped[str] = mapped_column(String(64), unique=True)
    created_at: Mapped[datetime] = mapped_column(UTCDateTime, default=utcnow)
    expires_at: Mapped[datetime] = mapped_column(UTCDateTime, index=True)
    address: Mapped[str | None] = mapped_column(String(64))

    user: Mapped[User] = relationship()


class ApiToken(Base):
    """A token for scripts (``Authorization: Bearer``), carrying its owner's role."""

    __tablename__ = "api_token"

    id: Mapped[int] = mapped_column(Integer, primary_key=True)
    user_id: Mapped[int] = mapped_column(ForeignKey("app_user.id", ondelete="CASCADE"), index=True)
    name: Mapped[str] = mapped_column(String(100))
    digest: Mapped[str] = mapped_column(String(64), unique=True)
    hint: Mapped[str] = mapped_column(String(12))
    created_at: Mapped[datetime] = mapped_column(UTCDateTime, default=utcnow)
    last_used_at: Mapped[datetime | None] = mapped_column(UTCDateTime)
    revoked_at: Mapped[datetime | None] = mapped_column(UTCDateTime)

    user: Mapped[User] = relationship(back_populates="tokens")


class FailedSignIn(Base):
    """One refused sign-in, counted per account name and per client address."""

    __tablename__ = "failed_sign_in"

    id: Mapped[int] = mapped_column(Integer, primary_key=True)
    account: Mapped[str] = mapped_column(String(100), index=True)
    address: Mapped[str] = mapped_column(String(64), index=True)
    at: Mapped[datetime] = mapped_column(UTCDateTime, default=utcnow, index=True)


class AuditEvent(Base):
    """Who did what, when, from where. The actor's name is copied so it outlives the account."""

    __tablename__ = "audit_event"

    id: Mapped[int] = mapped_column(Integer, primary_key=True)
    at: Mapped[datetime] = mapped_column(UTCDateTime, default=utcnow, index=True)
    actor_id: Mapped[int | None] = mapped_column(
        ForeignKey("app_user.id", ondelete="SET NULL"), index=True
    )
    actor_name: Mapped[str | None] = mapped_column(String(100))
    action: Mapped[str] = mapped_column(String(40), index=True)
    target: Mapped[str | None] = mapped_column(String(300))
    address: Mapped[str | None] = mapped_column(String(64))
    detail: Mapped[dict[str, Any]] = mapped_column(JSONDocument, default=dict)


class IntakeUnmasking(Base):
    """An admin's choice to show one intake's personal values unmasked."""

    __tablename__ = "intake_unmasking"

    id: Mapped[int] = mapped_column(Integer, primary_key=True)
    intake_id: Mapped[int] = mapped_column(ForeignKey("intake.id", ondelete="CASCADE"), unique=True)
    user_id: Mapped[int | None] = mapped_column(ForeignKey("app_user.id", ondelete="SET NULL"))
    at: Mapped[datetime] = mapped_column(UTCDateTime, default=utcnow)


# ---------------------------------------------------------------------------
# Users


class AccountError(ValueError):
    """An account operation refused, with the reason in plain words."""


def find_user(session: Session, name: str) -> User | None:
    """The user called ``name`` (exact match), or None."""
    return session.scalars(select(User).where(User.name == name)).one_or_none()


def create_user(
    session: Session,
    name: str,
    role: Role | str,
    *,
    password_hash: str | None = None,
    is_demo: bool = False,
) -> User:
    """Add a user; refuses a blank or taken name."""
    name = name.strip()
    if not name or len(name) > 100:
        raise AccountError("a user name must be 1 to 100 characters")
    if find_user(session, name) is not None:
        raise AccountError(f"a user called {name!r} already exists")
    user = User(name=name, role=Role(role).value, password_hash=password_hash, is_demo=is_demo)
    session.add(user)
    session.flush()
    return user


def list_users(session: Session) -> list[User]:
    """Every user, by name."""
    return list(session.scalars(select(User).order_by(User.name)))


def count_admins(session: Session) -> int:
    """How many active admins there are (the last one may not be demoted or disabled)."""
    return session.scalar(
        select(func.count()).select_from(User).where(User.role == Role.admin, User.is_active)
    )


# ---------------------------------------------------------------------------
# Sessions


def open_session(
    session: Session, user: User, *, lifetime: timedelta, address: str | None = None
) -> str:
    """Start a sign-in session for ``user``; returns the secret for the cookie."""
    secret = new_secret()
    now = utcnow()
    session.add(
        UserSession(
            user_id=user.id,
            digest=digest(secret),
            created_at=now,
            expires_at=now + lifetime,
            address=address,
        )
    )
    user.last_sign_in_at = now
    session.flush()
    return secret


def user_for_session(session: Session, secret: str) -> User | None:
    """The active user whose unexpired session the cookie ``secret`` names, or None."""
    row = session.scalars(select(UserSession).where(UserSession.digest == digest(secret))).first()
    if row is None or row.expires_at <= utcnow() or not row.user.is_active:
        return None
    return row.user


def close_session(session: Session, secret: str) -> None:
    """End the session the cookie ``secret`` names (sign-out)."""
    session.execute(delete(UserSession).where(UserSession.digest == digest(secret)))


def close_user_sessions(session: Session, user: User) -> None:
    """End every session of ``user`` (after a password or role change, or disabling)."""
    session.execute(delete(UserSession).where(UserSession.user_id == user.id))


def purge_expired_sessions(session: Session) -> int:
    """Delete expired sessions; returns how many."""
    result = session.execute(delete(UserSession).where(UserSession.expires_at <= utcnow()))
    return result.rowcount or 0


# ---------------------------------------------------------------------------
# API tokens

LAST_USE_PRECISION = timedelta(minutes=1)


def create_token(session: Session, user: User, name: str) -> tuple[ApiToken, str]:
    """A new API token for ``user``; returns the row and the plaintext (shown once)."""
    name = name.strip() or "token"
    plaintext = new_api_token()
    token = ApiToken(
        user_id=user.id, name=name[:100], digest=digest(plaintext), hint=plaintext[-4:]
    )
    session.add(token)
    session.flush()
    return token, plaintext


def user_for_token(session: Session, plaintext: str) -> User | None:
    """The active owner of an unrevoked API token, or None; notes when it was last used."""
    token = session.scalars(select(ApiToken).where(ApiToken.digest == digest(plaintext))).first()
    if token is None or token.revoked_at is not None or not token.user.is_active:
        return None
    now = utcnow()
    # Noted at most once a minute: a script's every request need not be a database write.
    if token.last_used_at is None or now - token.last_used_at > LAST_USE_PRECISION:
        token.last_used_at = now
    return token.user


def tokens_of(session: Session, user: User) -> list[ApiToken]:
    """The tokens ``user`` owns, newest first (revoked ones included, marked)."""
    return list(
        session.scalars(
            select(ApiToken)
            .where(ApiToken.user_id == user.id)
            .order_by(ApiToken.created_at.desc(), ApiToken.id.desc())
        )
    )


def revoke_token(session: Session, user: User, token_id: int) -> ApiToken | None:
    """Revoke one of ``user``'s own tokens; None when it is not theirs or not found."""
    token = session.get(ApiToken, token_id)
    if token is None or token.user_id != user.id:
        return None
    if token.revoked_at is None:
        token.revoked_at = utcnow()
    return token


# ---------------------------------------------------------------------------
# Failed sign-ins


def record_failed_sign_in(session: Session, account: str, address: str) -> None:
    """Note one refused sign-in."""
    session.add(FailedSignIn(account=account[:100], address=address[:64]))
    session.flush()


def failed_sign_ins(
    session: Session, *, since: datetime, account: str | None = None, address: str | None = None
) -> list[datetime]:
    """Times of refused sign-ins since ``since``, for one account name or one address."""
    query = select(FailedSignIn.at).where(FailedSignIn.at >= since)
    if account is not None:
        query = query.where(FailedSignIn.account == account[:100])
    if address is not None:
        query = query.where(FailedSignIn.address == address[:64])
    return list(session.scalars(query))


def forget_failed_sign_ins(session: Session, *, before: datetime) -> int:
    """Delete refused sign-ins older than ``before`` (they no longer count); returns how many."""
    result = session.execute(delete(FailedSignIn).where(FailedSignIn.at < before))
    return result.rowcount or 0


def clear_failed_sign_ins(session: Session, account: str) -> None:
    """Forget an account's refused sign-ins (after a successful one)."""
    session.execute(delete(FailedSignIn).where(FailedSignIn.account == account[:100]))


# ---------------------------------------------------------------------------
# Audit log and unmasking


def audit(
    session: Session,
    action: str,
    *,
    actor: User | None = None,
    target: str | None = None,
    address: str | None = None,
    detail: dict[str, Any] | None = None,
) -> AuditEvent:
    """Append one event to the audit log."""
    event = AuditEvent(
        action=action,
        actor_id=actor.id if actor is not None else None,
        actor_name=actor.name if actor is not None else None,
        target=(target or None) and target[:300],
        address=address and address[:64],
        detail=detail or {},
    )
    session.add(event)
    session.flush()
    return event


def audit_events(
    session: Session, *, action: str | None = None, limit: int = 200, before_id: int | None = None
) -> list[AuditEvent]:
    """The newest audit events first, optionally of one action, paged by id."""
    query = select(AuditEvent).order_by(AuditEvent.id.desc()).limit(limit)
    if action:
        query = query.where(AuditEvent.action == action)
    if before_id is not None:
        query = query.where(AuditEvent.id < before_id)
    return list(session.scalars(query))


def is_unmasked(session: Session, intake_id: int) -> bool:
    """True when an admin has chosen to show this intake's personal values."""
    return (
        session.scalars(
            select(IntakeUnmasking.id).where(IntakeUnmasking.intake_id == intake_id)
        ).first()
        is not None
    )


def set_unmasked(session: Session, intake_id: int, user: User, unmasked: bool) -> None:
    """Show (``unmasked``) or hide again one intake's personal values."""
    session.execute(delete(IntakeUnmasking).where(IntakeUnmasking.intake_id == intake_id))
    if unmasked:
        session.add(IntakeUnmasking(intake_id=intake_id, user_id=user.id))
    session.flush()
