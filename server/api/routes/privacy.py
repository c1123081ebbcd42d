"""/api/v1/intakes/{id}/unmasking and deleting an intake entirely: data-protection actions (admins).

Sample values of columns that look like personal data are masked everywhere
by default. An admin may show them for one intake (audited) and hide them
again, and may delete an intake with everything stored about it.
"""

from __future__ import annotations

from fastapi import APIRouter, Request, Response
from pydantic import BaseModel

from server.api.deps import AdminUser, FileStoreDep, IntakeDep, RequireAdmin, SessionDep
from server.api.errors import ApiError
from server.security.retention import delete_intake
from server.store import IntakeStatus, accounts

router = APIRouter(prefix="/intakes", tags=["privacy"], dependencies=[RequireAdmin])


class UnmaskingIn(BaseModel):
    """Show (true) or hide again (false) the intake's personal values."""

    unmasked: bool


class UnmaskingOut(BaseModel):
    intake_id: int
    unmasked: bool


@router.put("/{intake_id}/unmasking", response_model=UnmaskingOut)
def set_unmasking(
    body: UnmaskingIn, intake: IntakeDep, request: Request, session: SessionDep, admin: AdminUser
) -> UnmaskingOut:
    """Show or hide this intake's personal values to everyone who may see the intake."""
    actor = session.get(accounts.User, admin.id)
    accounts.set_unmasked(session, intake.id, actor, body.unmasked)
    accounts.audit(
        session,
        "unmask" if body.unmasked else "mask",
        actor=actor,
        target=f"intake:{intake.id}",
        address=request.client.host if request.client else None,
    )
    session.commit()
    return UnmaskingOut(intake_id=intake.id, unmasked=body.unmasked)


@router.delete("/{intake_id}", status_code=204)
def delete_entirely(
    intake: IntakeDep, session: SessionDep, store: FileStoreDep, admin: AdminUser
) -> Response:
    """Delete the intake, its profile, reviews and stored file. Cannot be undone."""
    if intake.status == IntakeStatus.profiling:
        raise ApiError(
            409, f"intake {intake.id} is being profiled; delete it when that ends", code="conflict"
        )
    delete_intake(session, store, intake)
    session.commit()
    return Response(status_code=204)
