"""/api/v1/intakes/{id}/judgement and /baseline: flags, scorecard, rule results, baseline.

The judgement is computed by the job after profiling; ``POST`` computes it
again (after new rules were saved), ``PUT /baseline`` chooses the intake it is
compared against and judges again.
"""

from __future__ import annotations

from datetime import datetime
from typing import Any

from fastapi import APIRouter
from pydantic import BaseModel, Field
from sqlalchemy import select
from sqlalchemy.orm import Session

from server.api.deps import CurrentUser, IntakeDep, SessionDep, SettingsDep
from server.api.errors import ApiError
from server.security.masking import visible_profile
from server.store import Intake, IntakeStatus
from server.store.reviews import Judgement
from worker.jobs.judging import judge, judged_by_newest_rules

router = APIRouter(prefix="/intakes/{intake_id}", tags=["judgement"])


class JudgementOut(BaseModel):
    """An intake's judgement: what was checked against what, and what was found."""

    intake_id: int
    rules_version: int | None = Field(description="The supplier's rules version checked.")
    baseline_intake_id: int | None = Field(description="The intake compared against.")
    baseline_chosen: bool = Field(description="True when a person chose the baseline.")
    overall_score: int | None
    suggested_verdict: str = Field(description="accept, review or reject; a person decides.")
    verdict_reasons: list[str]
    flags: list[dict[str, Any]]
    score: dict[str, Any]
    rule_results: list[dict[str, Any]]
    counts: dict[str, int] = Field(description="Flags by severity.")
    judged_at: datetime


class BaselineIn(BaseModel):
    """The intake to compare against; null goes back to the default."""

    intake_id: int | None = Field(
        description="An intake of any supplier, or null for the supplier's last accepted one."
    )


def _out(session: Session, judgement: Judgement, intake: Intake) -> JudgementOut:
    assessment = judgement.assessment
    columns = intake.profile.document.get("columns") if intake.profile else []
    shown = visible_profile(session, intake.id, {"columns": columns, "flags": assessment["flags"]})
    return JudgementOut(
        intake_id=intake.id,
        rules_version=judgement.rules_version,
        baseline_intake_id=judgement.baseline_intake_id,
        baseline_chosen=judgement.baseline_chosen,
        overall_score=judgement.overall_score,
        suggested_verdict=judgement.suggested_verdict,
        verdict_reasons=assessment.get("verdict_reasons") or [],
        flags=shown["flags"],
        score=assessment["score"],
        rule_results=assessment["rule_results"],
        counts={
            "critical": judgement.critical,
            "warning": judgement.warnings,
            "info": judgement.infos,
        },
        judged_at=judgement.judged_at,
    )


def _ready(intake: Intake) -> None:
    if intake.status != IntakeStatus.ready or intake.profile is None:
        raise ApiError(
            409, f"intake {intake.id} is {intake.status}, not profiled", code="not_ready"
        )


@router.get("/judgement", response_model=JudgementOut)
def get_judgement(
    intake: IntakeDep, session: SessionDep, settings: SettingsDep, user: CurrentUser
) -> JudgementOut:
    """The intake's judgement as last computed (first judged again when it waits for a
    decision and newer rules were saved since)."""
    judged_by_newest_rules(session, intake, settings)
    session.commit()
    judgement = session.scalar(select(Judgement).where(Judgement.intake_id == intake.id))
    if judgement is None:
        raise ApiError(404, f"intake {intake.id} has not been judged yet", code="not_judged")
    return _out(session, judgement, intake)


@router.post("/judgement", response_model=JudgementOut)
def rejudge(
    intake: IntakeDep, session: SessionDep, settings: SettingsDep, user: CurrentUser
) -> JudgementOut:
    """Judge the intake again with the supplier's current rules and its baseline."""
    _ready(intake)
    judgement = judge(session, intake, settings)
    session.commit()
    return _out(session, judgement, intake)


@router.put("/baseline", response_model=JudgementOut)
def choose_baseline(
    body: BaselineIn,
    intake: IntakeDep,
    session: SessionDep,
    settings: SettingsDep,
    user: CurrentUser,
) -> JudgementOut:
    """Compare the intake with another one from now on, and judge it again."""
    _ready(intake)
    if body.intake_id is not None:
        if body.intake_id == intake.id:
            raise ApiError(422, "an intake cannot be its own baseline", code="invalid_baseline")
        baseline = session.get(Intake, body.intake_id)
        if baseline is None:
            raise ApiError(404, f"there is no intake {body.intake_id}", code="not_found")
        if baseline.profile is None:
            raise ApiError(
                409, f"intake {baseline.id} has no profile to compare with", code="not_ready"
            )
    judgement = judge(session, intake, settings, baseline_id=body.intake_id)
    session.commit()
    return _out(session, judgement, intake)
