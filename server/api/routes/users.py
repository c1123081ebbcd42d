"""/api/v1/users: accounts and their roles (admins only)."""

from __future__ import annotations

from datetime import datetime

from fastapi import APIRouter
from pydantic import BaseModel, Field

from server.api.deps import AdminUser, RequireAdmin, SessionDep
from server.api.errors import ApiError
from server.security.passwords import WeakPassword, check_strength, hash_password
from server.store import accounts
from server.store.accounts import Role

router = APIRouter(prefix="/users", tags=["accounts"], dependencies=[RequireAdmin])


class UserIn(BaseModel):
    """A new account."""

    name: str = Field(min_length=1, max_length=100)
    role: Role = Role.viewer
    password: str = Field(min_length=1, max_length=1000)


class UserChange(BaseModel):
    """Changes to an account; fields left out stay as they are."""

    role: Role | None = None
    is_active: bool | None = None
    password: str | None = Field(None, min_length=1, max_length=1000)


class UserOut(BaseModel):
    """An account as admins see it (never its password hash)."""

    id: int
    name: str
    role: str
    is_demo: bool
    is_active: bool
    created_at: datetime
    last_sign_in_at: datetime | None

    @classmethod
    def of(cls, user: accounts.User) -> UserOut:
        return cls(
            id=user.id,
            name=user.name,
            role=user.role,
            is_demo=user.is_demo,
            is_active=user.is_active,
            created_at=user.created_at,
            last_sign_in_at=user.last_sign_in_at,
        )


def _strong(password: str) -> str:
    try:
        check_strength(password)
    except WeakPassword as exc:
        raise ApiError(422, str(exc), code="weak_password") from exc
    return hash_password(password)


@router.get("", response_model=list[UserOut])
def list_users(session: SessionDep) -> list[UserOut]:
    """Every account, by name."""
    return [UserOut.of(u) for u in accounts.list_users(session)]


@router.post("", response_model=UserOut, status_code=201)
def create_user(body: UserIn, session: SessionDep) -> UserOut:
    """Add an account with a role and a first password."""
    try:
        user = accounts.create_user(
            session, body.name, body.role, password_hash=_strong(body.password)
        )
    except accounts.AccountError as exc:
        raise ApiError(409, str(exc), code="conflict") from exc
    session.commit()
    return UserOut.of(user)


@router.patch("/{user_id}", response_model=UserOut)
def change_user(user_id: int, body: UserChange, session: SessionDep, admin: AdminUser) -> UserOut:
    """Change an account's role, password or whether it may sign in; ends its sessions."""
    user = session.get(accounts.User, user_id)
    if user is None:
        raise ApiError(404, f"there is no user {user_id}", code="not_found")
    losing_admin = user.role == Role.admin and (
        (body.role is not None and body.role != Role.admin) or body.is_active is False
    )
    if losing_admin and accounts.count_admins(session) <= 1:
        raise ApiError(409, "the last admin cannot be demoted or disabled", code="conflict")
    if body.role is not None:
        user.role = body.role.value
    if body.is_active is not None:
        user.is_active = body.is_active
    if body.password is not None:
        user.password_hash = _strong(body.password)
    accounts.close_user_sessions(session, user)
    session.commit()
    return UserOut.of(user)
