"""Dependencies the route handlers take as typed parameters.

``CurrentUser`` is the one place authorisation hangs from (its rule lives in
``server.security.access``); routers add ``RequireAdmin`` or
``AdminForChanges`` where a route is for admins.
"""

from __future__ import annotations

from collections.abc import Iterator
from pathlib import Path
from typing import Annotated

from fastapi import Depends, Request
from sqlalchemy.orm import Session

from server.api.errors import ApiError
from server.security.access import User, principal_for, require
from server.security.csrf import SAFE_METHODS
from server.settings import Settings
from server.store import FileStore, Intake, Supplier, file_store, session_factory
from server.store.accounts import Role


def get_settings_dep(request: Request) -> Settings:
    """The settings the app was created with."""
    return request.app.state.settings


SettingsDep = Annotated[Settings, Depends(get_settings_dep)]


def get_session(settings: SettingsDep) -> Iterator[Session]:
    """A database session for one request; handlers commit what they change."""
    session = session_factory(settings)()
    try:
        yield session
    finally:
        session.close()


SessionDep = Annotated[Session, Depends(get_session)]


def get_file_store(settings: SettingsDep) -> FileStore:
    """The deployment's content-addressed file store."""
    return file_store(settings)


FileStoreDep = Annotated[FileStore, Depends(get_file_store)]


async def current_user(request: Request, session: SessionDep) -> User:
    """The signed-in user: API token or session cookie; changes need the reviewer role.

    Cookie-authenticated changes must carry the session's CSRF token. See
    ``server.security.access`` for the whole rule.
    """
    return await principal_for(request, session)


CurrentUser = Annotated[User, Depends(current_user)]


async def signed_in_user(request: Request, session: SessionDep) -> User:
    """Any signed-in user, viewers included, for changes to their own things (tokens, sign-out)."""
    return await principal_for(request, session, self_service=True)


SignedInUser = Annotated[User, Depends(signed_in_user)]


def require_reviewer(user: CurrentUser) -> User:
    """A reviewer or admin (a router dependency for routes that change intakes)."""
    require(user, Role.reviewer)
    return user


def require_admin(user: CurrentUser) -> User:
    """An admin (a router dependency for users, audit, settings)."""
    require(user, Role.admin)
    return user


def admin_for_changes(request: Request, user: CurrentUser) -> User:
    """Anyone may read; only an admin may change (suppliers, rules)."""
    if request.method not in SAFE_METHODS:
        require(user, Role.admin)
    return user


RequireReviewer = Depends(require_reviewer)
RequireAdmin = Depends(require_admin)
AdminForChanges = Depends(admin_for_changes)
AdminUser = Annotated[User, Depends(require_admin)]


def get_intake(intake_id: int, session: SessionDep) -> Intake:
    """The intake of the path, or a 404 naming it."""
    intake = session.get(Intake, intake_id)
    if intake is None:
        raise ApiError(404, f"there is no intake {intake_id}", code="not_found")
    return intake


IntakeDep = Annotated[Intake, Depends(get_intake)]


def find_supplier(session: Session, supplier_id: int) -> Supplier:
    """The supplier ``supplier_id``, or a 404 naming it."""
    supplier = session.get(Supplier, supplier_id)
    if supplier is None:
        raise ApiError(404, f"there is no supplier {supplier_id}", code="not_found")
    return supplier


def columnar_copy(intake: Intake, store: FileStore) -> Path:
    """The intake's columnar copy, which previews and queries read; a clear error without it."""
    if intake.profile is None:
        raise ApiError(409, f"intake {intake.id} has no profile yet", code="not_ready")
    if intake.file_key is None:
        raise ApiError(410, f"the file of intake {intake.id} has been purged", code="gone")
    path = store.columnar_path(intake.file_key)
    if not path.exists():
        raise ApiError(
            409,
            f"intake {intake.id} has no columnar copy; profile it again to answer questions",
            code="no_columnar_copy",
        )
    return path
