"""The intake list's query: filters, sort orders and one page of rows.

Only what a row shows is read: the intake, its supplier's name, the profile's
headline numbers, and the ``flags`` and ``verdict`` members of the profile
document (extracted by the database, so a page never loads whole documents).
A page is one indexed ``ORDER BY … LIMIT … OFFSET`` and one ``COUNT``, which
stays fast with tens of thousands of intakes.
"""

from __future__ import annotations

from collections import Counter
from dataclasses import dataclass, field
from datetime import UTC, date, datetime, time, timedelta
from typing import Any

from sqlalchemy import ColumnElement, func, select
from sqlalchemy.orm import Session

from server.store import Intake, Profile, Supplier

PAGE_SIZE = 50
SORTS: dict[str, str] = {
    "newest": "newest first",
    "oldest": "oldest first",
    "score": "lowest score first",
    "-score": "highest score first",
    "name": "file name",
}
STATUSES = ("queued", "profiling", "ready", "failed")


@dataclass
class ListFilters:
    """What the user asked the list for (all optional)."""

    supplier: int | None = None
    status: str | None = None
    since: date | None = None
    until: date | None = None
    name: str = ""
    sort: str = "newest"
    page: int = 1

    def query(self, **changes: Any) -> dict[str, str]:
        """These filters (with ``changes``) as query parameters for a link."""
        values = {
            "supplier": self.supplier,
            "status": self.status,
            "since": self.since,
            "until": self.until,
            "name": self.name,
            "sort": self.sort if self.sort != "newest" else None,
            "page": self.page if self.page != 1 else None,
        }
        values.update(changes)
        return {k: str(v) for k, v in values.items() if v not in (None, "")}


@dataclass
class ListRow:
    """One intake of the list with what its badges need."""

    intake: Intake
    supplier_name: str
    rows: int | None
    columns: int | None
    score: float | None
    verdict: str | None
    severities: Counter[str] = field(default_factory=Counter)

    @property
    def worst(self) -> str | None:
        for severity in ("critical", "warning", "info"):
            if self.severities[severity]:
                return severity
        return None


@dataclass
class ListPage:
    rows: list[ListRow]
    total: int
    page: int
    pages: int


def _conditions(filters: ListFilters) -> list[ColumnElement[bool]]:
    where: list[ColumnElement[bool]] = []
    if filters.supplier is not None:
        where.append(Intake.supplier_id == filters.supplier)
    if filters.status in STATUSES:
        where.append(Intake.status == filters.status)
    if filters.since is not None:
        where.append(Intake.created_at >= datetime.combine(filters.since, time(), tzinfo=UTC))
    if filters.until is not None:
        end = datetime.combine(filters.until + timedelta(days=1), time(), tzinfo=UTC)
        where.append(Intake.created_at < end)
    if filters.name.strip():
        pattern = "%" + filters.name.strip().replace("%", r"\%").replace("_", r"\_") + "%"
        where.append(Intake.original_name.ilike(pattern, escape="\\"))
    return where


def _order(sort: str) -> list[Any]:
    if sort == "oldest":
        return [Intake.created_at.asc(), Intake.id.asc()]
    if sort == "score":
        return [Profile.overall_score.asc().nulls_last(), Intake.id.desc()]
    if sort == "-score":
        return [Profile.overall_score.desc().nulls_last(), Intake.id.desc()]
    if sort == "name":
        return [Intake.original_name.asc(), Intake.id.desc()]
    return [Intake.created_at.desc(), Intake.id.desc()]


def intake_page(session: Session, filters: ListFilters, page_size: int = PAGE_SIZE) -> ListPage:
    """One page of the intake list for ``filters``."""
    where = _conditions(filters)
    total = session.scalar(select(func.count()).select_from(Intake).where(*where)) or 0
    pages = max(1, -(-total // page_size))
    page = min(max(1, filters.page), pages)
    statement = (
        select(
            Intake,
            Supplier.name,
            Profile.rows,
            Profile.columns,
            Profile.overall_score,
            Profile.document["verdict"].as_string(),
            Profile.document["flags"],
        )
        .join(Supplier, Supplier.id == Intake.supplier_id)
        .outerjoin(Profile, Profile.intake_id == Intake.id)
        .where(*where)
        .order_by(*_order(filters.sort))
        .limit(page_size)
        .offset((page - 1) * page_size)
    )
    rows = []
    for intake, supplier_name, n_rows, n_columns, score, verdict, flags in session.execute(
        statement
    ):
        severities = Counter(str(f.get("severity")) for f in flags or [] if isinstance(f, dict))
        rows.append(ListRow(intake, supplier_name, n_rows, n_columns, score, verdict, severities))
    return ListPage(rows=rows, total=total, page=page, pages=pages)
