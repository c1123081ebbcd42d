"""Pages for intakes: the list, the upload form and one intake."""

from __future__ import annotations

from fastapi import APIRouter, Query, Request
from fastapi.responses import HTMLResponse
from sqlalchemy import func, select
from sqlalchemy.orm import selectinload

from server.api.deps import CurrentUser, SessionDep, SettingsDep
from server.api.errors import ApiError
from server.pages.templating import templates
from server.store import Intake, Profile, Supplier

router = APIRouter(include_in_schema=False)

PAGE_SIZE = 50


@router.get("/", response_class=HTMLResponse)
def intake_list(
    request: Request,
    session: SessionDep,
    user: CurrentUser,
    supplier: int | None = Query(None),
    page: int = Query(1, ge=1),
) -> HTMLResponse:
    """Every intake, newest first, with status and headline figures."""
    where = [] if supplier is None else [Intake.supplier_id == supplier]
    total = session.scalar(select(func.count()).select_from(Intake).where(*where)) or 0
    intakes = session.scalars(
        select(Intake)
        .where(*where)
        .options(
            selectinload(Intake.supplier),
            selectinload(Intake.profile).load_only(
                Profile.rows, Profile.columns, Profile.overall_score
            ),
        )
        .order_by(Intake.created_at.desc(), Intake.id.desc())
        .limit(PAGE_SIZE)
        .offset((page - 1) * PAGE_SIZE)
    ).all()
    suppliers = session.scalars(select(Supplier).order_by(Supplier.name)).all()
    return templates.TemplateResponse(
        request,
        "intakes.html",
        {
            "intakes": intakes,
            "suppliers": suppliers,
            "supplier": supplier,
            "page": page,
            "pages": max(1, -(-total // PAGE_SIZE)),
            "total": total,
            "user": user,
        },
    )


@router.get("/upload", response_class=HTMLResponse)
def upload_form(
    request: Request, session: SessionDep, settings: SettingsDep, user: CurrentUser
) -> HTMLResponse:
    """The form that sends a file to ``POST /api/v1/intakes``, with upload progress."""
    suppliers = session.scalars(select(Supplier).order_by(Supplier.name)).all()
    return templates.TemplateResponse(
        request,
        "upload.html",
        {"suppliers": suppliers, "limit_bytes": settings.upload_limit_bytes, "user": user},
    )


@router.get("/intakes/{intake_id}", response_class=HTMLResponse)
def intake_page(
    intake_id: int, request: Request, session: SessionDep, user: CurrentUser
) -> HTMLResponse:
    """One intake: status and progress while it is profiled, headline figures once ready."""
    intake = session.get(Intake, intake_id)
    if intake is None:
        raise ApiError(404, f"there is no intake {intake_id}", code="not_found")
    return templates.TemplateResponse(
        request,
        "intake.html",
        {"intake": intake, "profile": intake.profile, "user": user},
    )
