"""/api/v1/audit: who signed in, uploaded, downloaded, decided, commented, changed or deleted."""

from __future__ import annotations

from datetime import datetime
from typing import Any

from fastapi import APIRouter, Query
from pydantic import BaseModel

from server.api.deps import RequireAdmin, SessionDep
from server.store import accounts

router = APIRouter(prefix="/audit", tags=["accounts"], dependencies=[RequireAdmin])


class AuditEventOut(BaseModel):
    """One event of the audit log."""

    id: int
    at: datetime
    actor: str | None
    action: str
    target: str | None
    address: str | None
    detail: dict[str, Any]


@router.get("", response_model=list[AuditEventOut])
def list_events(
    session: SessionDep,
    action: str | None = Query(None, max_length=40, description="Only events of this action."),
    before: int | None = Query(None, description="Only events older than this event id (paging)."),
    limit: int = Query(100, ge=1, le=1000),
) -> list[AuditEventOut]:
    """The newest events first."""
    return [
        AuditEventOut(
            id=e.id,
            at=e.at,
            actor=e.actor_name,
            action=e.action,
            target=e.target,
            address=e.address,
            detail=e.detail or {},
        )
        for e in accounts.audit_events(session, action=action, limit=limit, before_id=before)
    ]
