"""/api/v1/intakes/{id}/decisions: a person's verdict on an intake, with its history."""

from __future__ import annotations

from datetime import datetime

from fastapi import APIRouter, status
from pydantic import BaseModel, Field
from sqlalchemy import select

from server.api.deps import CurrentUser, IntakeDep, SessionDep, SettingsDep
from server.api.errors import ApiError
from server.store import IntakeStatus
from server.store.reviews import Decision, Judgement, Verdict
from worker.jobs.judging import rejudge_followers

router = APIRouter(prefix="/intakes/{intake_id}/decisions", tags=["decisions"])


class DecisionIn(BaseModel):
    """A verdict on an intake; rejecting or accepting with caveats needs a reason."""

    verdict: Verdict = Field(description="accepted, accepted_with_caveats or rejected.")
    reason: str = Field("", max_length=5000, description="Why; shown in the intake's history.")


class DecisionOut(BaseModel):
    """One decision: who decided what, when and why."""

    id: int
    intake_id: int
    verdict: Verdict
    reason: str
    decided_by: str
    rules_version: int | None
    score: int | None
    created_at: datetime


class DecisionsOut(BaseModel):
    """The intake's current decision (the newest), every decision, and the suggestion."""

    current: DecisionOut | None
    history: list[DecisionOut]
    suggested_verdict: str | None = Field(
        None, description="accept, review or reject, from the rules and critical flags."
    )


def _out(decision: Decision) -> DecisionOut:
    return DecisionOut.model_validate(decision, from_attributes=True)


@router.get("", response_model=DecisionsOut)
def list_decisions(intake: IntakeDep, session: SessionDep, user: CurrentUser) -> DecisionsOut:
    """Every decision on the intake, newest first; the first is its current state."""
    decisions = session.scalars(
        select(Decision)
        .where(Decision.intake_id == intake.id)
        .order_by(Decision.created_at.desc(), Decision.id.desc())
    ).all()
    judgement = session.scalar(select(Judgement).where(Judgement.intake_id == intake.id))
    history = [_out(d) for d in decisions]
    return DecisionsOut(
        current=history[0] if history else None,
        history=history,
        suggested_verdict=judgement.suggested_verdict if judgement else None,
    )


@router.post("", response_model=DecisionOut, status_code=status.HTTP_201_CREATED)
def decide(
    body: DecisionIn,
    intake: IntakeDep,
    session: SessionDep,
    settings: SettingsDep,
    user: CurrentUser,
) -> DecisionOut:
    """Record a decision; earlier ones stay as the intake's history.

    Later undecided deliveries of the supplier that compare with the default
    baseline are judged again, since this decision may change that baseline.
    """
    if intake.status != IntakeStatus.ready:
        raise ApiError(
            409,
            f"intake {intake.id} is {intake.status}; decide once it is profiled",
            code="not_ready",
        )
    reason = body.reason.strip()
    if body.verdict != Verdict.accepted and not reason:
        raise ApiError(
            422,
            f"say why: a decision '{body.verdict}' needs a reason",
            code="reason_required",
        )
    judgement = session.scalar(select(Judgement).where(Judgement.intake_id == intake.id))
    decision = Decision(
        intake_id=intake.id,
        verdict=body.verdict,
        reason=reason,
        decided_by=user.name,
        decided_by_id=user.id,
        rules_version=judgement.rules_version if judgement else None,
        score=judgement.overall_score if judgement else None,
    )
    session.add(decision)
    session.flush()
    # The decision may change the default baseline of the supplier's later deliveries.
    rejudge_followers(session, intake, settings)
    session.commit()
    return _out(decision)
