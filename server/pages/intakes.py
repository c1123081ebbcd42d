"""Pages for intakes: the list, the upload form and the intake page."""

from __future__ import annotations

from datetime import date

from fastapi import APIRouter, Query, Request
from fastapi.responses import HTMLResponse, JSONResponse
from sqlalchemy import select

from server.api.deps import CurrentUser, SessionDep, SettingsDep
from server.api.errors import ApiError
from server.pages.intake_view import intake_context
from server.pages.listing import DECISIONS, SORTS, STATUSES, ListFilters, intake_page
from server.pages.profile_cache import cached_profile
from server.pages.profile_view import column_figures
from server.pages.templating import templates
from server.store import Intake, IntakeStatus, Profile, Supplier
from worker.jobs.judging import judged_by_newest_rules

router = APIRouter(include_in_schema=False)


def _date(value: str | None) -> date | None:
    try:
        return date.fromisoformat(value) if value else None
    except ValueError:
        return None


def _int(value: str | None) -> int | None:
    return int(value) if value and value.isdigit() else None


@router.get("/", response_class=HTMLResponse)
def intake_list(
    request: Request,
    session: SessionDep,
    user: CurrentUser,
    supplier: str | None = Query(None),
    status: str | None = Query(None),
    decision: str | None = Query(None),
    since: str | None = Query(None),
    until: str | None = Query(None),
    name: str = Query("", max_length=200),
    sort: str = Query("newest"),
    page: int = Query(1, ge=1),
) -> HTMLResponse:
    """Every intake, filtered by supplier, status, decision, date and name, sorted, paged.

    Unusable filter values (a malformed date, an unknown sort) are ignored rather
    than refused, so a hand-edited address still shows a list.
    """
    filters = ListFilters(
        supplier=_int(supplier),
        status=status if status in STATUSES else None,
        decision=decision if decision in DECISIONS else None,
        since=_date(since),
        until=_date(until),
        name=name,
        sort=sort if sort in SORTS else "newest",
        page=page,
    )
    listing = intake_page(session, filters)
    suppliers = session.scalars(select(Supplier).order_by(Supplier.name)).all()
    return templates.TemplateResponse(
        request,
        "intakes.html",
        {
            "listing": listing,
            "filters": filters,
            "suppliers": suppliers,
            "sorts": SORTS,
            "statuses": STATUSES,
            "decisions": DECISIONS,
            "user": user,
        },
    )


@router.get("/upload", response_class=HTMLResponse)
def upload_form(
    request: Request,
    session: SessionDep,
    settings: SettingsDep,
    user: CurrentUser,
    supplier: str | None = Query(None),
) -> HTMLResponse:
    """The upload form: pick or create the supplier, drop a file, follow its progress."""
    suppliers = session.scalars(select(Supplier).order_by(Supplier.name)).all()
    return templates.TemplateResponse(
        request,
        "upload.html",
        {
            "suppliers": suppliers,
            "chosen": _int(supplier),
            "limit_bytes": settings.upload_limit_bytes,
            "user": user,
        },
    )


FIGURE_BATCH_LIMIT = 100


@router.get("/intakes/{intake_id}/figures.json")
def column_figure_batch(
    intake_id: int,
    session: SessionDep,
    user: CurrentUser,
    start: int = Query(0, ge=0),
    count: int = Query(25, ge=1, le=FIGURE_BATCH_LIMIT),
) -> JSONResponse:
    """Figures of a run of columns, for the cards the intake page draws as they come near."""
    intake = session.get(Intake, intake_id)
    profile = cached_profile(session, intake) if intake is not None else None
    if profile is None:
        raise ApiError(404, f"intake {intake_id} has no profile", code="not_found")
    return JSONResponse(column_figures(profile, start, count))


@router.get("/intakes/{intake_id}", response_class=HTMLResponse)
def intake_page_view(
    intake_id: int,
    request: Request,
    session: SessionDep,
    settings: SettingsDep,
    user: CurrentUser,
) -> HTMLResponse:
    """One intake, organised around the decision; its progress while it is profiled."""
    intake = session.get(Intake, intake_id)
    if intake is None:
        raise ApiError(404, f"there is no intake {intake_id}", code="not_found")
    has_profile = session.scalar(select(Profile.id).where(Profile.intake_id == intake.id))
    ready = intake.status == IntakeStatus.ready and has_profile is not None
    context = {"intake": intake, "user": user, "ready": ready}
    if ready:
        judged_by_newest_rules(session, intake, settings)
        session.commit()
        context.update(intake_context(session, intake, settings))
    return templates.TemplateResponse(request, "intake.html", context)
