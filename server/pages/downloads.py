"""Downloads of an intake: the column summary as CSV and the standalone HTML report.

Both are built from the profile as the viewer may see it (personal values
masked). CSV cells that a spreadsheet would read as a formula are neutralised.
"""

from __future__ import annotations

import csv
import io
from typing import Any
from urllib.parse import quote

from fastapi import APIRouter
from fastapi.responses import Response

from server.api.deps import CurrentUser, IntakeDep, SessionDep
from server.api.errors import ApiError
from server.pages.profile_cache import cached_profile
from server.pages.profile_view import flags_by_column
from server.pages.report import render_report
from server.security.exports import neutralise_row
from server.store import Intake

router = APIRouter(include_in_schema=False)

SUMMARY_FIELDS = (
    "position",
    "name",
    "kind",
    "count",
    "missing",
    "missing_share",
    "distinct",
    "min",
    "q1",
    "median",
    "q3",
    "max",
    "mean",
    "std",
    "top_label",
    "top_label_share",
    "flags",
)


def summary_rows(profile: dict[str, Any]) -> list[list[Any]]:
    """One row per column of the profile, in ``SUMMARY_FIELDS`` order (not yet neutralised)."""
    rows_total = int((profile.get("dataset") or {}).get("rows") or 0)
    flagged = flags_by_column(profile.get("flags") or [])
    out = []
    for index, column in enumerate(profile.get("columns") or []):
        numeric = column.get("numeric") or {}
        top = ((column.get("labels") or {}).get("top") or [{}])[0]
        missing = column.get("missing")
        out.append(
            [
                int(column.get("position", index)) + 1,
                column.get("name"),
                column.get("kind"),
                column.get("count"),
                missing,
                round(missing / rows_total, 6) if rows_total and missing is not None else None,
                column.get("distinct"),
                *(numeric.get(k) for k in ("min", "q1", "median", "q3", "max", "mean", "std")),
                top.get("value"),
                top.get("share"),
                " ".join(f["code"] for f in flagged.get(str(column.get("name")), [])),
            ]
        )
    return out


def summary_csv(profile: dict[str, Any]) -> str:
    """The column summary as CSV text, formula-like cells neutralised."""
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\r\n")
    writer.writerow(SUMMARY_FIELDS)
    for row in summary_rows(profile):
        writer.writerow(neutralise_row("" if v is None else v for v in row))
    return buffer.getvalue()


def _profile(session: SessionDep, intake: Intake) -> dict[str, Any]:
    profile = cached_profile(session, intake)
    if profile is None:
        raise ApiError(409, f"intake {intake.id} has no profile yet", code="not_ready")
    return profile


def _attachment(name: str) -> dict[str, str]:
    """A download header with an ASCII fallback name and the exact name (RFC 6266)."""
    fallback = "".join(c if (c.isascii() and c.isalnum()) or c in "._-" else "_" for c in name)
    disposition = f"attachment; filename=\"{fallback}\"; filename*=UTF-8''{quote(name)}"
    return {"Content-Disposition": disposition}


@router.get("/intakes/{intake_id}/columns.csv")
def column_summary(intake: IntakeDep, session: SessionDep, user: CurrentUser) -> Response:
    """The column summary of an intake as a CSV download."""
    text = summary_csv(_profile(session, intake))
    return Response(
        text.encode("utf-8-sig"),  # the byte-order mark makes spreadsheets read UTF-8
        media_type="text/csv; charset=utf-8",
        headers=_attachment(f"{intake.original_name}.columns.csv"),
    )


@router.get("/intakes/{intake_id}/report.html")
def report(intake: IntakeDep, session: SessionDep, user: CurrentUser) -> Response:
    """The standalone HTML report, as a download (it runs its own inline scripts offline)."""
    html = render_report(_profile(session, intake))
    return Response(
        html,
        media_type="text/html; charset=utf-8",
        headers=_attachment(f"{intake.original_name}.report.html"),
    )
