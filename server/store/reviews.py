"""Reviews: supplier rules (versioned), judgements, decisions and comment threads.

- ``SupplierRules``: every saved version of a supplier's rules document; the
  newest version is the one new intakes are checked against.
- ``Judgement``: one per intake, the result of checking it: the assessment
  (flags, scorecard, rule results, suggested verdict), the drift against its
  baseline, which rules version and which baseline were used, and whether the
  baseline was chosen by a person. Kept in its own table rather than inside
  the profile document, so the engine's document stays as computed and a
  re-judgement (new rules, another baseline) replaces one row.
- ``Decision``: a person's verdict on an intake. Never updated: the newest is
  the intake's state, earlier ones stay as its history.
- ``CommentThread`` / ``Comment``: discussion about an intake as a whole, or
  about a flagged column of it. A thread on the same supplier's column and
  flag code in an earlier intake is linked as "discussed before".
"""

from __future__ import annotations

import enum
from datetime import datetime
from typing import Any

from sqlalchemy import (
    Boolean,
    ForeignKey,
    Integer,
    String,
    Text,
    UniqueConstraint,
    func,
    select,
    true,
)
from sqlalchemy.orm import Mapped, Session, mapped_column, relationship

from server.store.models import Base, Intake, JSONDocument, UTCDateTime, utcnow


class Verdict(enum.StrEnum):
    """What a person decided about an intake."""

    accepted = "accepted"
    accepted_with_caveats = "accepted_with_caveats"
    rejected = "rejected"


ACCEPTING = (Verdict.accepted, Verdict.accepted_with_caveats)


class ThreadStatus(enum.StrEnum):
    """A thread is open until someone resolves it; it may be reopened."""

    open = "open"
    resolved = "resolved"


class SupplierRules(Base):
    """One saved version of a supplier's rules document.

    ``rejudge_waiting``: the version applies to the deliveries still waiting for a
    decision (they are judged again with it, at once or when next opened); False
    when it was saved asking to leave their judgements as they were.
    """

    __tablename__ = "supplier_rules"
    __table_args__ = (UniqueConstraint("supplier_id", "version"),)

    id: Mapped[int] = mapped_column(Integer, primary_key=True)
    supplier_id: Mapped[int] = mapped_column(
        ForeignKey("supplier.id", ondelete="CASCADE"), index=True
    )
    version: Mapped[int] = mapped_column(Integer)
    document: Mapped[dict[str, Any]] = mapped_column(JSONDocument)
    note: Mapped[str] = mapped_column(Text, default="")
    created_by: Mapped[str] = mapped_column(String(100))
    created_at: Mapped[datetime] = mapped_column(UTCDateTime, default=utcnow)
    rejudge_waiting: Mapped[bool] = mapped_column(Boolean, default=True, server_default=true())


class Judgement(Base):
    """The judgement of one intake: assessment, drift, rules version and baseline used."""

    __tablename__ = "judgement"

    id: Mapped[int] = mapped_column(Integer, primary_key=True)
    intake_id: Mapped[int] = mapped_column(ForeignKey("intake.id", ondelete="CASCADE"), unique=True)
    rules_id: Mapped[int | None] = mapped_column(
        ForeignKey("supplier_rules.id", ondelete="SET NULL")
    )
    rules_version: Mapped[int | None] = mapped_column(Integer)
    baseline_intake_id: Mapped[int | None] = mapped_column(
        ForeignKey("intake.id", ondelete="SET NULL")
    )
    baseline_chosen: Mapped[bool] = mapped_column(default=False)
    assessment: Mapped[dict[str, Any]] = mapped_column(JSONDocument)
    drift: Mapped[dict[str, Any] | None] = mapped_column(JSONDocument)
    overall_score: Mapped[int | None] = mapped_column(Integer)
    suggested_verdict: Mapped[str] = mapped_column(String(20))
    critical: Mapped[int] = mapped_column(Integer, default=0)
    warnings: Mapped[int] = mapped_column(Integer, default=0)
    infos: Mapped[int] = mapped_column(Integer, default=0)
    judged_at: Mapped[datetime] = mapped_column(UTCDateTime, default=utcnow)


class Decision(Base):
    """A person's verdict on an intake, with the reason; the newest one counts."""

    __tablename__ = "decision"

    id: Mapped[int] = mapped_column(Integer, primary_key=True)
    intake_id: Mapped[int] = mapped_column(ForeignKey("intake.id", ondelete="CASCADE"), index=True)
    verdict: Mapped[str] = mapped_column(String(30))
    reason: Mapped[str] = mapped_column(Text, default="")
    decided_by: Mapped[str] = mapped_column(String(100))
    decided_by_id: Mapped[int | None] = mapped_column(Integer)
    rules_version: Mapped[int | None] = mapped_column(Integer)
    score: Mapped[int | None] = mapped_column(Integer)
    created_at: Mapped[datetime] = mapped_column(UTCDateTime, default=utcnow)


class CommentThread(Base):
    """A discussion about an intake, or about one flagged column of it."""

    __tablename__ = "comment_thread"

    id: Mapped[int] = mapped_column(Integer, primary_key=True)
    intake_id: Mapped[int] = mapped_column(ForeignKey("intake.id", ondelete="CASCADE"), index=True)
    supplier_id: Mapped[int] = mapped_column(ForeignKey("supplier.id"), index=True)
    column: Mapped[str | None] = mapped_column("column_name", String(500))
    flag_code: Mapped[str | None] = mapped_column(String(60))
    status: Mapped[str] = mapped_column(String(20), default=ThreadStatus.open)
    earlier_thread_id: Mapped[int | None] = mapped_column(
        ForeignKey("comment_thread.id", ondelete="SET NULL")
    )
    created_by: Mapped[str] = mapped_column(String(100))
    created_at: Mapped[datetime] = mapped_column(UTCDateTime, default=utcnow)
    resolved_by: Mapped[str | None] = mapped_column(String(100))
    resolved_at: Mapped[datetime | None] = mapped_column(UTCDateTime)

    comments: Mapped[list[Comment]] = relationship(
        back_populates="thread", cascade="all, delete-orphan", order_by="Comment.id"
    )


class Comment(Base):
    """One message of a thread; only its author may edit it."""

    __tablename__ = "comment"

    id: Mapped[int] = mapped_column(Integer, primary_key=True)
    thread_id: Mapped[int] = mapped_column(
        ForeignKey("comment_thread.id", ondelete="CASCADE"), index=True
    )
    author: Mapped[str] = mapped_column(String(100))
    author_id: Mapped[int | None] = mapped_column(Integer)
    body: Mapped[str] = mapped_column(Text)
    created_at: Mapped[datetime] = mapped_column(UTCDateTime, default=utcnow)
    edited_at: Mapped[datetime | None] = mapped_column(UTCDateTime)

    thread: Mapped[CommentThread] = relationship(back_populates="comments")


# ---------------------------------------------------------------------------
# queries


def latest_rules(session: Session, supplier_id: int) -> SupplierRules | None:
    """The supplier's newest rules version, or None when it has none."""
    return session.scalar(
        select(SupplierRules)
        .where(SupplierRules.supplier_id == supplier_id)
        .order_by(SupplierRules.version.desc())
        .limit(1)
    )


def save_rules(
    session: Session,
    supplier_id: int,
    document: dict[str, Any],
    *,
    author: str,
    note: str = "",
    rejudge_waiting: bool = True,
) -> SupplierRules:
    """Store ``document`` as the supplier's next rules version (already validated)."""
    current = session.scalar(
        select(func.max(SupplierRules.version)).where(SupplierRules.supplier_id == supplier_id)
    )
    rules = SupplierRules(
        supplier_id=supplier_id,
        version=(current or 0) + 1,
        document=document,
        note=note,
        created_by=author,
        rejudge_waiting=rejudge_waiting,
    )
    session.add(rules)
    session.flush()
    return rules


def latest_decision(session: Session, intake_id: int) -> Decision | None:
    """The intake's current decision (the newest), or None when undecided."""
    return session.scalar(
        select(Decision)
        .where(Decision.intake_id == intake_id)
        .order_by(Decision.created_at.desc(), Decision.id.desc())
        .limit(1)
    )


def latest_decisions(session: Session, intake_ids: list[int]) -> dict[int, Decision]:
    """The current decision of each of ``intake_ids`` that has one."""
    if not intake_ids:
        return {}
    decisions = session.scalars(
        select(Decision)
        .where(Decision.intake_id.in_(intake_ids))
        .order_by(Decision.created_at, Decision.id)
    )
    return {d.intake_id: d for d in decisions}


def last_accepted_intake(session: Session, supplier_id: int, before: Intake) -> Intake | None:
    """The supplier's newest intake before ``before`` whose current decision accepts it."""
    earlier = list(
        session.scalars(
            select(Intake)
            .where(
                Intake.supplier_id == supplier_id,
                Intake.id != before.id,
                Intake.created_at <= before.created_at,
            )
            .order_by(Intake.created_at.desc(), Intake.id.desc())
        )
    )
    decisions = latest_decisions(session, [i.id for i in earlier])
    for intake in earlier:
        decision = decisions.get(intake.id)
        if decision is not None and decision.verdict in ACCEPTING and intake.profile is not None:
            return intake
    return None


def earlier_thread(
    session: Session, supplier_id: int, intake_id: int, column: str | None, flag_code: str | None
) -> CommentThread | None:
    """The newest thread on the same supplier's column and flag code in an earlier intake."""
    if flag_code is None:
        return None
    return session.scalar(
        select(CommentThread)
        .where(
            CommentThread.supplier_id == supplier_id,
            CommentThread.intake_id != intake_id,
            CommentThread.intake_id < intake_id,
            CommentThread.flag_code == flag_code,
            CommentThread.column.is_(None) if column is None else CommentThread.column == column,
        )
        .order_by(CommentThread.intake_id.desc(), CommentThread.id.desc())
        .limit(1)
    )
