"""Admin pages: accounts and their roles, the audit log, and data-protection actions on an
intake (show its personal values, delete it entirely). Every route needs an admin."""

from __future__ import annotations

from typing import Annotated

from fastapi import APIRouter, Form, Query, Request
from fastapi.responses import HTMLResponse, RedirectResponse, Response

from server.api.deps import AdminUser, FileStoreDep, RequireAdmin, SessionDep
from server.api.errors import ApiError
from server.pages.templating import templates
from server.security.passwords import WeakPassword, check_strength, hash_password
from server.security.retention import delete_intake
from server.store import Intake, IntakeStatus, accounts
from server.store.accounts import Role

router = APIRouter(include_in_schema=False, dependencies=[RequireAdmin])


def _users_page(
    request: Request, session: SessionDep, admin: AdminUser, message: str | None, status: int
) -> HTMLResponse:
    return templates.TemplateResponse(
        request,
        "account/admin_users.html",
        {
            "user": admin,
            "users": accounts.list_users(session),
            "roles": [r.value for r in Role],
            "message": message,
        },
        status_code=status,
    )


@router.get("/admin/users", response_class=HTMLResponse)
def users_page(request: Request, session: SessionDep, admin: AdminUser) -> HTMLResponse:
    """Every account, with forms to add one, change a role or stop one signing in."""
    return _users_page(request, session, admin, None, 200)


@router.post("/admin/users", response_class=HTMLResponse)
def add_user_submit(
    request: Request,
    session: SessionDep,
    admin: AdminUser,
    name: str = Form(..., max_length=100),
    role: Annotated[Role, Form()] = Role.viewer,
    password: str = Form(..., max_length=1000),
) -> Response:
    """Add an account; the form comes back with the reason when it is refused."""
    try:
        check_strength(password)
        accounts.create_user(session, name, role, password_hash=hash_password(password))
    except (WeakPassword, accounts.AccountError) as exc:
        session.rollback()
        return _users_page(request, session, admin, f"Not added: {exc}.", 200)
    session.commit()
    return RedirectResponse("/admin/users", status_code=303)


@router.post("/admin/users/{user_id}")
def change_user_submit(
    user_id: int,
    request: Request,
    session: SessionDep,
    admin: AdminUser,
    role: Annotated[Role | None, Form()] = None,
    active: str | None = Form(None),
) -> Response:
    """Change a role or whether the account may sign in; its sessions end."""
    user = session.get(accounts.User, user_id)
    if user is None:
        raise ApiError(404, f"there is no user {user_id}", code="not_found")
    disabling = active == "no"
    losing_admin = user.role == Role.admin and (
        (role is not None and role != Role.admin) or disabling
    )
    if losing_admin and accounts.count_admins(session) <= 1:
        return _users_page(request, session, admin, "The last admin stays an admin.", 200)
    if role is not None:
        user.role = role.value
    if active in ("yes", "no"):
        user.is_active = active == "yes"
    accounts.close_user_sessions(session, user)
    session.commit()
    return RedirectResponse("/admin/users", status_code=303)


@router.get("/admin/audit", response_class=HTMLResponse)
def audit_page(
    request: Request,
    session: SessionDep,
    admin: AdminUser,
    action: str | None = Query(None, max_length=40),
    before: int | None = Query(None),
) -> HTMLResponse:
    """The audit log, newest first, 100 events a page."""
    events = accounts.audit_events(session, action=action or None, limit=100, before_id=before)
    return templates.TemplateResponse(
        request,
        "account/admin_audit.html",
        {"user": admin, "events": events, "action": action or "", "page_size": 100},
    )


@router.post("/intakes/{intake_id}/unmasking")
def unmasking_submit(
    intake_id: int,
    request: Request,
    session: SessionDep,
    admin: AdminUser,
    unmasked: str = Form(...),
) -> Response:
    """Show this intake's personal values (or mask them again); recorded in the audit log."""
    if session.get(Intake, intake_id) is None:
        raise ApiError(404, f"there is no intake {intake_id}", code="not_found")
    show = unmasked == "yes"
    actor = session.get(accounts.User, admin.id)
    accounts.set_unmasked(session, intake_id, actor, show)
    accounts.audit(
        session,
        "unmask" if show else "mask",
        actor=actor,
        target=f"intake:{intake_id}",
        address=request.client.host if request.client else None,
    )
    session.commit()
    return RedirectResponse(f"/intakes/{intake_id}", status_code=303)


@router.post("/intakes/{intake_id}/delete")
def delete_submit(
    intake_id: int,
    session: SessionDep,
    store: FileStoreDep,
    admin: AdminUser,
    confirm: str | None = Form(None),
) -> Response:
    """Delete the intake with its profile, reviews and stored file, once confirmed."""
    intake = session.get(Intake, intake_id)
    if intake is None:
        raise ApiError(404, f"there is no intake {intake_id}", code="not_found")
    if confirm != "yes":
        raise ApiError(422, "tick the box to confirm the deletion", code="not_confirmed")
    if intake.status == IntakeStatus.profiling:
        raise ApiError(409, f"intake {intake_id} is being profiled; delete it when that ends")
    delete_intake(session, store, intake)
    session.commit()
    return RedirectResponse("/", status_code=303)
