"""The page of one supplier's rules: read them, draft from an intake, check, save.

Everyone signed in reads the rules; only admins see the save control (the API's
``PUT`` route checks the role again). The page's script talks to the rules
routes of the API, so the page and the API never disagree on what is valid.
"""

from __future__ import annotations

import yaml
from fastapi import APIRouter, Query, Request
from fastapi.responses import HTMLResponse
from sqlalchemy import select

from server.api.deps import CurrentUser, SessionDep
from server.api.errors import ApiError
from server.api.routes import history
from server.pages.templating import templates
from server.store import Supplier
from server.store.reviews import SupplierRules

router = APIRouter(include_in_schema=False)


def rejudged_ids(text: str | None) -> list[int]:
    """The intake ids of a ``rejudged`` query value ("3,5"); anything else is dropped."""
    if not text:
        return []
    return [int(part) for part in text.split(",") if part.strip().isdigit()][:200]


def draft_order(entries: list[history.TimelineEntry]) -> list[history.TimelineEntry]:
    """Profiled intakes to draft from: accepted ones first, then newest first."""
    ready = [e for e in entries if e.status == "ready"]
    newest = sorted(ready, key=lambda e: (e.delivered_at, e.intake_id), reverse=True)
    return sorted(newest, key=lambda e: e.decision != "accepted")


@router.get("/suppliers/{supplier_id}/rules", response_class=HTMLResponse)
def rules_page(
    supplier_id: int,
    request: Request,
    session: SessionDep,
    user: CurrentUser,
    saved: int | None = Query(None),
    rejudged: str | None = Query(None, max_length=2000),
    version: int | None = Query(None, description="An earlier version to show instead."),
) -> HTMLResponse:
    """The current rules as YAML, the earlier versions, and (admins) the editor's save.

    With ``version`` the editor holds that earlier version; saving it makes it current again.
    """
    supplier = session.get(Supplier, supplier_id)
    if supplier is None:
        raise ApiError(404, f"there is no supplier {supplier_id}", code="not_found")
    versions = list(
        session.scalars(
            select(SupplierRules)
            .where(SupplierRules.supplier_id == supplier_id)
            .order_by(SupplierRules.version.desc())
        )
    )
    current = versions[0] if versions else None
    shown = next((v for v in versions if v.version == version), current)
    text = yaml.safe_dump(shown.document, sort_keys=False, allow_unicode=True) if shown else ""
    return templates.TemplateResponse(
        request,
        "rules.html",
        {
            "supplier": supplier,
            "current": current,
            "shown": shown,
            "versions": versions,
            "rules_yaml": text,
            "intakes": draft_order(history.timeline(supplier_id, session, user)),
            "can_save": user.role == "admin",
            "saved": saved if current is not None and saved == current.version else None,
            "rejudged": rejudged_ids(rejudged),
            "user": user,
        },
    )
