"""/api/v1/intakes/{id}/drift: what changed against the baseline, or against a chosen intake.

Computed from the two stored profiles only, so it works after the files were
purged, with the target supplier's thresholds (its rules may override them).
Label values of personal-data columns are masked like the profile's.
"""

from __future__ import annotations

from typing import Any

from fastapi import APIRouter, Query
from sqlalchemy import select
from sqlalchemy.orm import Session

from server.api.deps import CurrentUser, IntakeDep, SessionDep, SettingsDep
from server.api.drift_schema import DriftOut
from server.api.errors import ApiError
from server.security.masking import visible_profile
from server.store import Intake
from server.store.reviews import Judgement, last_accepted_intake
from worker.jobs.judging import supplier_thresholds
from worker.profiling.judgement import FlagThresholds, compare_profiles
from worker.profiling.personal import mask_value, personal_columns

router = APIRouter(prefix="/intakes/{intake_id}", tags=["drift"])


def drift_between(
    session: Session, baseline: Intake, target: Intake, thresholds: FlagThresholds
) -> dict[str, Any]:
    """The drift document of ``target`` against ``baseline``, masked where the profiles are."""
    if baseline.profile is None or target.profile is None:
        missing = baseline if baseline.profile is None else target
        raise ApiError(409, f"intake {missing.id} has no profile yet", code="not_ready")
    drift = compare_profiles(
        {**baseline.profile.document, "intake_id": baseline.id},
        {**target.profile.document, "intake_id": target.id},
        thresholds=thresholds,
    )
    return masked_drift(session, drift, baseline, target)


def masked_drift(
    session: Session, drift: dict[str, Any], baseline: Intake, target: Intake
) -> dict[str, Any]:
    """Hide the label values of personal-data columns unless both intakes were unmasked."""
    kinds: dict[str, str] = {}
    for intake in (baseline, target):
        document = intake.profile.document
        if visible_profile(session, intake.id, document) is not document:
            kinds.update(personal_columns(document))
    if not kinds:
        return drift
    columns = []
    for column in drift["columns"]:
        kind = kinds.get(column["name"])
        if kind is not None:
            column = {
                **column,
                "new_labels": [mask_value(v, kind) for v in column.get("new_labels") or []],
                "vanished_labels": [
                    mask_value(v, kind) for v in column.get("vanished_labels") or []
                ],
            }
        columns.append(column)
    flags = [
        {**f, "evidence": {k: v for k, v in f["evidence"].items() if not k.endswith("labels")}}
        if set(f["columns"]) & set(kinds)
        else f
        for f in drift["flags"]
    ]
    return {**drift, "columns": columns, "flags": flags}


@router.get("/drift", response_model=DriftOut)
def get_drift(
    intake: IntakeDep,
    session: SessionDep,
    settings: SettingsDep,
    user: CurrentUser,
    baseline: int | None = Query(
        None, description="Compare with this intake instead of the intake's baseline."
    ),
) -> dict[str, Any]:
    """The drift document (design notes' shape) of this intake against its baseline."""
    if baseline is not None:
        chosen = session.get(Intake, baseline)
        if chosen is None:
            raise ApiError(404, f"there is no intake {baseline}", code="not_found")
    else:
        judgement = session.scalar(select(Judgement).where(Judgement.intake_id == intake.id))
        chosen = None
        if judgement is not None and judgement.baseline_intake_id is not None:
            chosen = session.get(Intake, judgement.baseline_intake_id)
        chosen = chosen or last_accepted_intake(session, intake.supplier_id, intake)
        if chosen is None:
            raise ApiError(
                404,
                f"intake {intake.id} has no baseline: its supplier has no earlier accepted "
                "intake; choose one with ?baseline=<intake id>",
                code="no_baseline",
            )
    thresholds = supplier_thresholds(session, intake.supplier_id, settings)
    return drift_between(session, chosen, intake, thresholds)
