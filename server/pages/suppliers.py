"""Pages for suppliers: the list, one supplier's history, and the comparison page.

The figures come from the history routes' answers (the same functions serve
``/api/v1/history``), so the pages and the API always agree.
"""

from __future__ import annotations

from fastapi import APIRouter, Query, Request
from fastapi.responses import HTMLResponse
from sqlalchemy import select

from server.api.deps import CurrentUser, SessionDep, SettingsDep
from server.api.errors import ApiError
from server.api.routes import history
from server.pages import figures
from server.pages.templating import templates
from server.store import ColumnSummary, Intake, IntakeStatus, Supplier

router = APIRouter(include_in_schema=False)


@router.get("/suppliers", response_class=HTMLResponse)
def supplier_list(request: Request, session: SessionDep, user: CurrentUser) -> HTMLResponse:
    """Every supplier with its deliveries, scores, share accepted and recurring flags."""
    rows = history.compare_suppliers(session, user, None)
    return templates.TemplateResponse(
        request, "suppliers.html", {"rows": rows, "user": user, "compare": False}
    )


@router.get("/suppliers/{supplier_id}", response_class=HTMLResponse)
def supplier_page(
    supplier_id: int,
    request: Request,
    session: SessionDep,
    user: CurrentUser,
    column: str | None = Query(None, max_length=500),
) -> HTMLResponse:
    """One supplier: the timeline of scores and rows, one column across deliveries, the list."""
    supplier = session.get(Supplier, supplier_id)
    if supplier is None:
        raise ApiError(404, f"there is no supplier {supplier_id}", code="not_found")
    entries = history.timeline(supplier_id, session, user)
    columns = list(
        session.scalars(
            select(ColumnSummary.name)
            .join(Intake, Intake.id == ColumnSummary.intake_id)
            .where(Intake.supplier_id == supplier_id)
            .group_by(ColumnSummary.name)
            .order_by(ColumnSummary.name)
        )
    )
    chosen = column if column in columns else (columns[0] if columns else None)
    points = history.column_history(supplier_id, chosen, session, user) if chosen else []
    return templates.TemplateResponse(
        request,
        "supplier.html",
        {
            "supplier": supplier,
            "entries": list(reversed(entries)),
            "timeline_figure": figures.timeline_figure([e.model_dump() for e in entries]),
            "columns": columns,
            "column": chosen,
            "column_figure": figures.column_history_figure(
                [p.model_dump() for p in points], chosen or ""
            ),
            "user": user,
        },
    )


@router.get("/compare", response_class=HTMLResponse)
def compare_page(
    request: Request,
    session: SessionDep,
    settings: SettingsDep,
    user: CurrentUser,
    a: str | None = Query(None),
    b: str | None = Query(None),
) -> HTMLResponse:
    """The suppliers side by side, and two intakes side by side with the drift between them."""
    rows = history.compare_suppliers(session, user, None)
    ready = list(
        session.scalars(
            select(Intake)
            .where(Intake.status == IntakeStatus.ready)
            .order_by(Intake.created_at.desc(), Intake.id.desc())
            .limit(500)
        )
    )
    pair, drift = None, None
    if a and b and a.isdigit() and b.isdigit():
        pair = history.side_by_side(session, settings, user, int(a), int(b))
        # The route answers a typed model; the figures and the template read plain dicts.
        drift = pair.model_dump(mode="json", by_alias=True)["drift"]
    context = {
        "rows": rows,
        "ready": ready,
        "a": int(a) if a and a.isdigit() else None,
        "b": int(b) if b and b.isdigit() else None,
        "pair": pair,
        "drift": drift,
        "drift_figure": figures.drift_overview_figure(drift) if drift else None,
        "user": user,
        "compare": True,
    }
    return templates.TemplateResponse(request, "compare.html", context)
