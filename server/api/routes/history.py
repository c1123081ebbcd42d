"""/api/v1/history: suppliers' deliveries over time, and intakes side by side.

- ``/history/suppliers/{id}/timeline``: per intake its date, rows, score,
  flags by severity and current decision;
- ``/history/suppliers/{id}/columns/{name}``: one column's figures over the
  supplier's deliveries, from the column summary table;
- ``/history/suppliers``: the suppliers compared: deliveries, last and median
  score, share accepted, recurring flag codes;
- ``/history/compare?a=&b=``: two intakes side by side (also of two suppliers),
  with the drift of ``b`` against ``a``.
"""

from __future__ import annotations

import statistics
from collections import Counter
from datetime import datetime
from typing import Any

from fastapi import APIRouter, Query
from pydantic import BaseModel, Field
from sqlalchemy import select
from sqlalchemy.orm import Session

from server.api.deps import CurrentUser, SessionDep, SettingsDep, find_supplier
from server.api.drift_schema import DriftOut
from server.api.errors import ApiError
from server.api.routes.drift import drift_between
from server.store import ColumnSummary, Intake, IntakeStatus, Supplier
from server.store.reviews import ACCEPTING, Judgement, latest_decisions
from worker.jobs.judging import supplier_thresholds

router = APIRouter(prefix="/history", tags=["history"])

RECURRING_MIN = 2
"""A flag code recurs when it is raised on at least this many of a supplier's intakes."""


class TimelineEntry(BaseModel):
    """One delivery of a supplier."""

    intake_id: int
    name: str
    delivered_at: datetime
    status: str
    rows: int | None
    score: int | None
    flags: dict[str, int] = Field(description="Flags by severity: critical, warning, info.")
    suggested_verdict: str | None
    decision: str | None
    rules_version: int | None


class ColumnPoint(BaseModel):
    """One column's figures in one delivery."""

    intake_id: int
    delivered_at: datetime
    kind: str | None
    missing_share: float | None
    mean: float | None
    median: float | None
    std: float | None
    min: float | None
    max: float | None
    distinct: int | None
    top_label: str | None
    top_label_share: float | None


class FlagCount(BaseModel):
    """A flag code and on how many intakes it was raised."""

    code: str
    intakes: int


class SupplierRow(BaseModel):
    """One supplier in the comparison."""

    supplier_id: int
    name: str
    deliveries: int
    last_score: int | None
    median_score: float | None
    accepted_share: float | None = Field(
        description="Accepted (with or without caveats) / decided."
    )
    decided: int
    recurring_flags: list[FlagCount]


class IntakeSide(BaseModel):
    """One side of a side-by-side comparison."""

    intake_id: int
    supplier_id: int
    supplier: str
    name: str
    delivered_at: datetime
    rows: int | None
    columns: int | None
    score: dict[str, Any] | None
    flags: dict[str, int]
    decision: str | None


class SideBySide(BaseModel):
    """Two intakes and the drift of ``b`` against ``a``."""

    a: IntakeSide
    b: IntakeSide
    drift: DriftOut


def _judgements(session: Session, intake_ids: list[int]) -> dict[int, Judgement]:
    if not intake_ids:
        return {}
    rows = session.scalars(select(Judgement).where(Judgement.intake_id.in_(intake_ids)))
    return {j.intake_id: j for j in rows}


def _counts(judgement: Judgement | None) -> dict[str, int]:
    if judgement is None:
        return {"critical": 0, "warning": 0, "info": 0}
    return {"critical": judgement.critical, "warning": judgement.warnings, "info": judgement.infos}


def _intakes(session: Session, supplier_id: int) -> list[Intake]:
    return list(
        session.scalars(
            select(Intake)
            .where(Intake.supplier_id == supplier_id)
            .order_by(Intake.created_at, Intake.id)
        )
    )


@router.get("/suppliers/{supplier_id}/timeline", response_model=list[TimelineEntry])
def timeline(supplier_id: int, session: SessionDep, user: CurrentUser) -> list[TimelineEntry]:
    """The supplier's deliveries, oldest first."""
    find_supplier(session, supplier_id)
    intakes = _intakes(session, supplier_id)
    ids = [i.id for i in intakes]
    judgements, decisions = _judgements(session, ids), latest_decisions(session, ids)
    entries = []
    for intake in intakes:
        judgement, decision = judgements.get(intake.id), decisions.get(intake.id)
        entries.append(
            TimelineEntry(
                intake_id=intake.id,
                name=intake.original_name,
                delivered_at=intake.created_at,
                status=intake.status,
                rows=intake.profile.rows if intake.profile else None,
                score=judgement.overall_score if judgement else None,
                flags=_counts(judgement),
                suggested_verdict=judgement.suggested_verdict if judgement else None,
                decision=decision.verdict if decision else None,
                rules_version=judgement.rules_version if judgement else None,
            )
        )
    return entries


@router.get("/suppliers/{supplier_id}/columns/{column}", response_model=list[ColumnPoint])
def column_history(
    supplier_id: int, column: str, session: SessionDep, user: CurrentUser
) -> list[ColumnPoint]:
    """One column's figures over the supplier's deliveries that have it, oldest first."""
    find_supplier(session, supplier_id)
    rows = session.execute(
        select(ColumnSummary, Intake.created_at)
        .join(Intake, Intake.id == ColumnSummary.intake_id)
        .where(Intake.supplier_id == supplier_id, ColumnSummary.name == column)
        .order_by(Intake.created_at, Intake.id)
    ).all()
    if not rows:
        raise ApiError(
            404, f"no delivery of supplier {supplier_id} has a column {column!r}", code="not_found"
        )
    return [
        ColumnPoint(
            intake_id=summary.intake_id,
            delivered_at=delivered,
            kind=summary.kind,
            missing_share=summary.missing_share,
            mean=summary.mean,
            median=summary.median,
            std=summary.std,
            min=summary.min,
            max=summary.max,
            distinct=summary.distinct,
            top_label=summary.top_label,
            top_label_share=summary.top_label_share,
        )
        for summary, delivered in rows
    ]


def _supplier_row(session: Session, supplier: Supplier) -> SupplierRow:
    intakes = [i for i in _intakes(session, supplier.id) if i.status == IntakeStatus.ready]
    ids = [i.id for i in intakes]
    judgements, decisions = _judgements(session, ids), latest_decisions(session, ids)
    scores = [judgements[i].overall_score for i in ids if i in judgements]
    scores = [s for s in scores if s is not None]
    codes: Counter[str] = Counter()
    for judgement in judgements.values():
        codes.update({flag["code"] for flag in judgement.assessment.get("flags") or []})
    decided = list(decisions.values())
    accepted = sum(1 for d in decided if d.verdict in ACCEPTING)
    return SupplierRow(
        supplier_id=supplier.id,
        name=supplier.name,
        deliveries=len(intakes),
        last_score=scores[-1] if scores else None,
        median_score=float(statistics.median(scores)) if scores else None,
        accepted_share=accepted / len(decided) if decided else None,
        decided=len(decided),
        recurring_flags=[
            FlagCount(code=code, intakes=n)
            for code, n in sorted(codes.items(), key=lambda kv: (-kv[1], kv[0]))
            if n >= RECURRING_MIN
        ],
    )


@router.get("/suppliers", response_model=list[SupplierRow])
def compare_suppliers(
    session: SessionDep,
    user: CurrentUser,
    supplier: list[int] | None = Query(None, description="Supplier ids; all when absent."),
) -> list[SupplierRow]:
    """The suppliers side by side: deliveries, scores, share accepted, recurring flags."""
    if supplier:
        chosen = [find_supplier(session, s) for s in supplier]
    else:
        chosen = list(session.scalars(select(Supplier).order_by(Supplier.name)))
    return [_supplier_row(session, s) for s in chosen]


def _side(session: Session, intake: Intake) -> IntakeSide:
    judgement = _judgements(session, [intake.id]).get(intake.id)
    decision = latest_decisions(session, [intake.id]).get(intake.id)
    return IntakeSide(
        intake_id=intake.id,
        supplier_id=intake.supplier_id,
        supplier=intake.supplier.name,
        name=intake.original_name,
        delivered_at=intake.created_at,
        rows=intake.profile.rows if intake.profile else None,
        columns=intake.profile.columns if intake.profile else None,
        score=judgement.assessment["score"] if judgement else None,
        flags=_counts(judgement),
        decision=decision.verdict if decision else None,
    )


@router.get("/compare", response_model=SideBySide)
def side_by_side(
    session: SessionDep,
    settings: SettingsDep,
    user: CurrentUser,
    a: int = Query(description="The first intake (the one compared against)."),
    b: int = Query(description="The second intake."),
) -> SideBySide:
    """Two intakes side by side, of one supplier or two, with the drift of b against a."""
    first, second = session.get(Intake, a), session.get(Intake, b)
    for ref, intake in ((a, first), (b, second)):
        if intake is None:
            raise ApiError(404, f"there is no intake {ref}", code="not_found")
    thresholds = supplier_thresholds(session, second.supplier_id, settings)
    drift = drift_between(session, first, second, thresholds)
    return SideBySide(a=_side(session, first), b=_side(session, second), drift=drift)
