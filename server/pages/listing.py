"""The intake list's query: filters, sort orders and one page of rows.

Only what a row shows is read: the intake, its supplier's name, the profile's
headline numbers, the judgement's score, suggested verdict and flag counts, and
the newest decision; a page never loads whole profile documents.
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
from server.store.reviews import Decision, Judgement, Verdict

PAGE_SIZE = 50
SORTS: dict[str, str] = {
    "newest": "newest first",
    "oldest": "oldest first",
    "score": "lowest score first",
    "-score": "highest score first",
    "name": "file name",
}
STATUSES = ("queued", "profiling", "ready", "failed")
DECISIONS = {
    "undecided": "not decided",
    Verdict.accepted.value: "accepted",
    Verdict.accepted_with_caveats.value: "accepted with caveats",
    Verdict.rejected.value: "rejected",
}


@dataclass
class ListFilters:
    """What the user asked the list for (all optional)."""

    supplier: int | None = None
    status: str | None = None
    decision: str | None = None
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
            "decision": self.decision,
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
    decision: str | None
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


def _latest_decision() -> Any:
    """The verdict of an intake's newest decision, as a correlated scalar subquery."""
    return (
        select(Decision.verdict)
        .where(Decision.intake_id == Intake.id)
        .order_by(Decision.created_at.desc(), Decision.id.desc())
        .limit(1)
        .correlate(Intake)
        .scalar_subquery()
    )


def _conditions(filters: ListFilters) -> list[ColumnElement[bool]]:
    where: list[ColumnElement[bool]] = []
    if filters.decision == "undecided":
        where.append(_latest_decision().is_(None))
    elif filters.decision in DECISIONS:
        where.append(_latest_decision() == filters.decision)
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


SCORE = func.coalesce(Judgement.overall_score, Profile.overall_score)
"""The judged score (rules and drift included) when there is one, else the profile's."""


def _order(sort: str) -> list[Any]:
    if sort == "oldest":
        return [Intake.created_at.asc(), Intake.id.asc()]
    if sort == "score":
        return [SCORE.asc().nulls_last(), Intake.id.desc()]
    if sort == "-score":
        return [SCORE.desc().nulls_last(), Intake.id.desc()]
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
            SCORE,
            func.coalesce(Judgement.suggested_verdict, Profile.document["verdict"].as_string()),
            Judgement.critical,
            Judgement.warnings,
            Judgement.infos,
            _latest_decision(),
        )
        .join(Supplier, Supplier.id == Intake.supplier_id)
        .outerjoin(Profile, Profile.intake_id == Intake.id)
        .outerjoin(Judgement, Judgement.intake_id == Intake.id)
        .where(*where)
        .order_by(*_order(filters.sort))
        .limit(page_size)
        .offset((page - 1) * page_size)
    )
    rows = []
    for record in session.execute(statement):
        intake, name, n_rows, n_columns, score, verdict, critical, warning, info, decision = record
        severities = Counter(
            {"critical": critical or 0, "warning": warning or 0, "info": info or 0}
        )
        rows.append(ListRow(intake, name, n_rows, n_columns, score, verdict, decision, severities))
    return ListPage(rows=rows, total=total, page=page, pages=pages)
