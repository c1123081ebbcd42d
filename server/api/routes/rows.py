"""/api/v1/intakes/{id}/rows: a preview of the delivered rows, as the supplier wrote them.

Read from the columnar copy; at most ``security.preview_rows_limit`` rows a
request, with a plain error beyond. Cells of columns holding personal data are
masked unless an admin unmasked the intake. Each preview is a download of
delivered content, so it lands in the audit log.
"""

from __future__ import annotations

from typing import Any

from fastapi import APIRouter, Query
from pydantic import BaseModel

from server.api.deps import (
    CurrentUser,
    FileStoreDep,
    IntakeDep,
    SessionDep,
    SettingsDep,
    columnar_copy,
)
from server.api.errors import ApiError
from server.store import accounts
from worker.profiling import queries
from worker.profiling.personal import mask_value, personal_columns

router = APIRouter(prefix="/intakes", tags=["rows"])


class RowsOut(BaseModel):
    """Some delivered rows: each with its 0-based row number and its cells by column."""

    rows: list[dict[str, Any]]
    masked: list[str]
    """Columns whose cells are masked in this answer."""


@router.get("/{intake_id}/rows", response_model=RowsOut)
def preview_rows(
    intake: IntakeDep,
    session: SessionDep,
    store: FileStoreDep,
    settings: SettingsDep,
    user: CurrentUser,
    n: int = Query(20, ge=1, description="How many rows (at most the preview limit)."),
    where_column: str | None = Query(None, description="Only rows where this column…"),
    where_value: str | None = Query(None, description="…has this value (empty: is missing)."),
) -> RowsOut:
    """Up to ``n`` rows drawn evenly among those matching the filter, in row order."""
    limit = settings.security.preview_rows_limit
    if n > limit:
        raise ApiError(
            422,
            f"a preview shows at most {limit} rows; ask for fewer "
            "(setting TIDEWAITER_SECURITY__PREVIEW_ROWS_LIMIT)",
            code="too_many_rows",
        )
    path = columnar_copy(intake, store)
    kinds = personal_columns(intake.profile.document)
    if accounts.is_unmasked(session, intake.id):
        kinds = {}
    if where_column in kinds:
        raise ApiError(
            403,
            f"column {where_column!r} holds personal data; an admin must unmask this intake first",
            code="masked",
        )
    where = {where_column: where_value or None} if where_column else None
    try:
        rows = queries.sample_rows(path, n, where, options=settings.profiling)
    except queries.QueryError as exc:
        raise ApiError(422, str(exc), code="bad_query") from exc
    for row in rows:
        values = row["values"]
        for name, kind in kinds.items():
            if name in values:
                values[name] = mask_value(values[name], kind)
    return RowsOut(rows=rows, masked=sorted(kinds))
