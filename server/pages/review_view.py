"""The review side of the intake page: the judgement, decisions and comment threads.

Read straight from the store (the same rows the decisions, comments and
judgement routes serve); the page's script writes through those routes.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from sqlalchemy import select
from sqlalchemy.orm import Session, selectinload

from server.security.masking import visible_profile
from server.store import Intake
from server.store.reviews import CommentThread, Decision, Judgement, Verdict

VERDICT_WORDS = {
    Verdict.accepted.value: "accept",
    Verdict.accepted_with_caveats.value: "accept with caveats",
    Verdict.rejected.value: "reject",
}
"""The decision controls, in the order they are offered."""

FlagKey = tuple[str | None, str]
"""(column or None for the whole file, flag code): what a thread is about."""


@dataclass
class Review:
    """What the page shows of the review of one intake."""

    judgement: Judgement | None
    decisions: list[Decision]
    threads: dict[FlagKey, CommentThread]
    earlier: dict[FlagKey, CommentThread]
    earlier_intakes: dict[int, int]
    """Earlier thread id → the intake it belongs to, for the "discussed before" links."""


def judged_profile(session: Session, intake: Intake, profile: dict[str, Any]) -> dict[str, Any]:
    """The profile with the judgement's flags, score and verdict when the intake was judged.

    The judgement adds the supplier's rules and the drift against the baseline
    to what the engine found alone, so it is what the page shows.
    """
    judgement = session.scalar(select(Judgement).where(Judgement.intake_id == intake.id))
    if judgement is None:
        return profile
    assessment = judgement.assessment or {}
    shown = visible_profile(
        session, intake.id, {"columns": profile.get("columns"), "flags": assessment.get("flags")}
    )
    return {
        **profile,
        "flags": shown.get("flags") or [],
        "score": assessment.get("score") or profile.get("score"),
        "verdict": judgement.suggested_verdict,
        "verdict_reasons": assessment.get("verdict_reasons") or [],
    }


def flag_key(flag: dict[str, Any]) -> FlagKey:
    """The thread key of a flag: its first column and its code."""
    columns = flag.get("columns") or [None]
    return (columns[0], str(flag.get("code")))


def earlier_threads(
    session: Session, intake: Intake, keys: set[FlagKey]
) -> dict[FlagKey, CommentThread]:
    """For each flag key, the newest thread on it in an earlier intake of the same supplier.

    The same answer as ``earlier_thread`` per key, in one query for the whole page.
    """
    if not keys:
        return {}
    found: dict[FlagKey, CommentThread] = {}
    codes = sorted({code for _, code in keys})
    for thread in session.scalars(
        select(CommentThread)
        .where(
            CommentThread.supplier_id == intake.supplier_id,
            CommentThread.intake_id < intake.id,
            CommentThread.flag_code.in_(codes),
        )
        .order_by(CommentThread.intake_id.desc(), CommentThread.id.desc())
    ):
        key = (thread.column, str(thread.flag_code))
        if key in keys:
            found.setdefault(key, thread)
    return found


def review(session: Session, intake: Intake, flags: list[dict[str, Any]]) -> Review:
    """The judgement, decisions (newest first) and threads of ``intake``."""
    judgement = session.scalar(select(Judgement).where(Judgement.intake_id == intake.id))
    decisions = list(
        session.scalars(
            select(Decision)
            .where(Decision.intake_id == intake.id)
            .order_by(Decision.created_at.desc(), Decision.id.desc())
        )
    )
    threads: dict[FlagKey, CommentThread] = {}
    for thread in session.scalars(
        select(CommentThread)
        .where(CommentThread.intake_id == intake.id)
        .options(selectinload(CommentThread.comments))
        .order_by(CommentThread.id)
    ):
        if thread.flag_code is not None:
            threads.setdefault((thread.column, thread.flag_code), thread)
    earlier = earlier_threads(session, intake, {flag_key(f) for f in flags})
    earlier_intakes = {t.id: t.intake_id for t in earlier.values()}
    for thread in threads.values():
        if thread.earlier_thread_id is not None:
            previous = session.get(CommentThread, thread.earlier_thread_id)
            if previous is not None:
                earlier.setdefault((thread.column, str(thread.flag_code)), previous)
                earlier_intakes[previous.id] = previous.intake_id
    return Review(judgement, decisions, threads, earlier, earlier_intakes)
