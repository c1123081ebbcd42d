"""/api/v1/intakes/{id}/crosstab and /labels: questions answered from the columnar copy.

The profile holds the crosstabs the engine chose; these routes answer the
ones a reviewer asks afterwards, such as "occupation against region among the
rows whose status is 'active'", from the Parquet copy the worker wrote beside
the stored file. Columns holding personal data answer only once an admin has
unmasked the intake, as elsewhere.
"""

from __future__ import annotations

from typing import Any

from fastapi import APIRouter, Query

from server.api.deps import (
    CurrentUser,
    FileStoreDep,
    IntakeDep,
    SessionDep,
    SettingsDep,
    columnar_copy,
)
from server.api.document_schema import Crosstab, LabelCount
from server.api.errors import ApiError
from server.store import Intake, accounts
from worker.profiling import queries
from worker.profiling.personal import personal_columns

router = APIRouter(prefix="/intakes", tags=["queries"])


def _check_visible(session: SessionDep, intake: Intake, names: list[str]) -> None:
    assert intake.profile is not None
    personal = set(personal_columns(intake.profile.document))
    hidden = [n for n in names if n in personal]
    if hidden and not accounts.is_unmasked(session, intake.id):
        raise ApiError(
            403,
            f"column {hidden[0]!r} holds personal data; an admin must unmask this intake first",
            code="masked",
        )


def _where(column: str | None, value: str | None) -> dict[str, str | None] | None:
    if not column:
        return None
    return {column: value if value != "" else None}


@router.get("/{intake_id}/crosstab", response_model=Crosstab)
def crosstab(
    intake: IntakeDep,
    session: SessionDep,
    store: FileStoreDep,
    settings: SettingsDep,
    user: CurrentUser,
    a: str = Query(..., description="Label column of the rows."),
    b: str = Query(..., description="Label column of the columns."),
    where_column: str | None = Query(None, description="Keep only rows where this column…"),
    where_value: str | None = Query(None, description="…has this label (empty: is missing)."),
    max_labels: int = Query(30, ge=2, le=200),
) -> dict[str, Any]:
    """Counts, row shares, chi-square and adjusted residuals of ``a`` × ``b`` within the filter."""
    path = columnar_copy(intake, store)
    _check_visible(session, intake, [a, b, *([where_column] if where_column else [])])
    try:
        return queries.crosstab(
            path,
            a,
            b,
            _where(where_column, where_value),
            max_labels=max_labels,
            options=settings.profiling,
        )
    except queries.QueryError as exc:
        raise ApiError(422, str(exc), code="bad_query") from exc


@router.get("/{intake_id}/labels", response_model=list[LabelCount])
def labels(
    intake: IntakeDep,
    session: SessionDep,
    store: FileStoreDep,
    settings: SettingsDep,
    user: CurrentUser,
    column: str = Query(..., description="A label column."),
    limit: int = Query(50, ge=1, le=500),
) -> list[dict[str, Any]]:
    """The column's labels with their counts, most frequent first (for filter choices)."""
    path = columnar_copy(intake, store)
    _check_visible(session, intake, [column])
    try:
        return queries.label_counts(path, column, None, limit=limit, options=settings.profiling)
    except queries.QueryError as exc:
        raise ApiError(422, str(exc), code="bad_query") from exc
