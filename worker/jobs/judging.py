"""Judging an intake after profiling: its supplier's rules, the drift against its baseline.

``judge`` re-reads everything from the database, so it runs the same inside
the profiling job (``judge_quietly``, before the intake is marked ready),
after new rules are saved, or when a person picks another baseline. The
baseline is the one a person chose for this intake, or else the supplier's
newest earlier intake whose current decision accepts it.
The result replaces the intake's ``Judgement`` row; the profile document's
``flags``, ``score`` and ``verdict`` are updated to match, so every reader of
the profile sees the same judgement.
"""

from __future__ import annotations

import logging
from typing import Any

from sqlalchemy import select
from sqlalchemy.orm import Session

from server.settings import Settings
from server.store import Intake, IntakeStatus, Profile
from server.store.reviews import (
    Judgement,
    SupplierRules,
    last_accepted_intake,
    latest_decisions,
    latest_rules,
)
from worker.profiling.judgement import FlagThresholds, assess, compare_profiles, parse_rules
from worker.profiling.judgement import SupplierRules as ParsedRules
from worker.profiling.judgement.rules import RulesError, thresholds_for

log = logging.getLogger(__name__)

_UNSET: Any = object()


def supplier_rules(
    session: Session, supplier_id: int
) -> tuple[SupplierRules | None, ParsedRules | None]:
    """The supplier's current rules version and its parsed document (None, None without)."""
    row = latest_rules(session, supplier_id)
    if row is None:
        return None, None
    try:
        return row, parse_rules(row.document)
    except RulesError:  # saved rules were valid; a later schema may no longer accept them
        log.warning("rules version %s of supplier %s no longer validate", row.version, supplier_id)
        return None, None


def supplier_thresholds(session: Session, supplier_id: int, settings: Settings) -> FlagThresholds:
    """The flag thresholds for this supplier: the settings' with its rules' overrides."""
    return thresholds_for(supplier_rules(session, supplier_id)[1], settings.profiling.thresholds)


def judge(
    session: Session,
    intake: Intake,
    settings: Settings,
    *,
    baseline_id: int | None = _UNSET,
) -> Judgement | None:
    """Judge ``intake`` in ``session`` and return its (new or replaced) judgement.

    ``baseline_id`` chooses the baseline (None: no baseline is chosen, use the
    default). Without it, an earlier choice stays. Returns None when the
    intake has no profile yet.
    """
    profile = session.scalar(select(Profile).where(Profile.intake_id == intake.id))
    if profile is None:
        return None
    document = profile.document
    judgement = session.query(Judgement).filter_by(intake_id=intake.id).one_or_none()
    if baseline_id is _UNSET:
        chosen = judgement.baseline_intake_id if judgement and judgement.baseline_chosen else None
    else:
        chosen = baseline_id
    baseline = session.get(Intake, chosen) if chosen is not None else None
    if baseline is None or baseline.profile is None:
        chosen = None
        baseline = last_accepted_intake(session, intake.supplier_id, intake)
    rules_row, rules = supplier_rules(session, intake.supplier_id)
    thresholds = thresholds_for(rules, settings.profiling.thresholds)
    drift = None
    if baseline is not None:
        drift = compare_profiles(
            {**baseline.profile.document, "intake_id": baseline.id},
            {**document, "intake_id": intake.id},
            thresholds=thresholds,
        )
    result = assess(document, thresholds=settings.profiling.thresholds, rules=rules, drift=drift)
    severities = [flag["severity"] for flag in result["flags"]]
    if judgement is None:
        judgement = Judgement(intake_id=intake.id)
        session.add(judgement)
    judgement.rules_id = rules_row.id if rules_row else None
    judgement.rules_version = rules_row.version if rules_row else None
    judgement.baseline_intake_id = baseline.id if baseline is not None else None
    judgement.baseline_chosen = chosen is not None
    judgement.assessment = result
    judgement.drift = drift
    judgement.overall_score = result["score"]["overall"]
    judgement.suggested_verdict = result["verdict"]
    judgement.critical = severities.count("critical")
    judgement.warnings = severities.count("warning")
    judgement.infos = severities.count("info")
    profile.document = {
        **document,
        "flags": result["flags"],
        "score": result["score"],
        "verdict": result["verdict"],
    }
    profile.overall_score = result["score"]["overall"]
    session.flush()
    return judgement


def judge_quietly(session: Session, intake: Intake, settings: Settings) -> None:
    """Judge ``intake`` inside the job's transaction, before it is marked ready.

    Runs in a savepoint: should judging fail, the failure is logged and the
    profile is still stored (unjudged); it can be judged again later.
    """
    session.flush()
    try:
        with session.begin_nested():
            judge(session, intake, settings)
    except Exception:
        log.exception("judging intake %s failed; its profile is kept unjudged", intake.id)


REJUDGE_MAX = 20
"""Most intakes judged again at once after a decision or a new rules version."""


def _rejudge_undecided(
    session: Session, candidates: list[Intake], settings: Settings, *, keep_chosen: bool
) -> list[int]:
    """Judge again the profiled ``candidates`` that have no decision yet.

    A decided intake keeps the judgement its decision was made on. With
    ``keep_chosen``, intakes whose baseline a person chose are left alone too.
    Intakes without a profile are skipped (their job judges them). At most
    REJUDGE_MAX are judged, in the order given.
    """
    decisions = latest_decisions(session, [i.id for i in candidates])
    judged: list[int] = []
    for intake in candidates:
        if len(judged) >= REJUDGE_MAX:
            break
        if intake.id in decisions or intake.status != IntakeStatus.ready:
            continue
        judgement = session.scalar(select(Judgement).where(Judgement.intake_id == intake.id))
        if keep_chosen and judgement is not None and judgement.baseline_chosen:
            continue
        if judge(session, intake, settings) is not None:
            judged.append(intake.id)
    return judged


def rejudge_followers(session: Session, decided: Intake, settings: Settings) -> list[int]:
    """Judge again the supplier's later, undecided intakes whose baseline is the default.

    A decision on ``decided`` may make it (or stop it being) the last accepted
    intake, which is the default baseline of the deliveries after it. Returns
    the ids judged again (at most REJUDGE_MAX, the oldest first).
    """
    later = session.scalars(
        select(Intake)
        .where(
            Intake.supplier_id == decided.supplier_id,
            Intake.id != decided.id,
            Intake.created_at >= decided.created_at,
        )
        .order_by(Intake.created_at, Intake.id)
    ).all()
    return _rejudge_undecided(session, list(later), settings, keep_chosen=True)


def rejudge_after_rules(session: Session, supplier_id: int, settings: Settings) -> list[int]:
    """Check the supplier's undecided intakes against its newest rules version.

    Called when a rules version is saved, so that the deliveries still waiting
    for a decision are judged by the rules now in force; decided intakes keep
    the version their decision was made on. Returns the ids judged again (at
    most REJUDGE_MAX, the newest first); older ones catch up when they are next
    looked at (``judged_by_newest_rules``).
    """
    intakes = session.scalars(
        select(Intake)
        .where(Intake.supplier_id == supplier_id)
        .order_by(Intake.created_at.desc(), Intake.id.desc())
    ).all()
    return _rejudge_undecided(session, list(intakes), settings, keep_chosen=False)


def judged_by_newest_rules(session: Session, intake: Intake, settings: Settings) -> None:
    """Judge ``intake`` again when it waits for a decision and was judged by an older
    rules version than the supplier's newest.

    Saving rules judges at most REJUDGE_MAX waiting intakes at once; the others
    catch up here, when their page or judgement is next asked for, so nobody
    decides on flags from rules no longer in force. Decided intakes keep the
    version their decision was made on, and a version saved asking to leave the
    waiting intakes alone (``rejudge_waiting`` False) leaves them alone here too.
    """
    if intake.status != IntakeStatus.ready:
        return
    judgement = session.scalar(select(Judgement).where(Judgement.intake_id == intake.id))
    if judgement is None:
        return
    newest = latest_rules(session, intake.supplier_id)
    if newest is None or not newest.rejudge_waiting or judgement.rules_version == newest.version:
        return
    if latest_decisions(session, [intake.id]):
        return
    judge(session, intake, settings)
