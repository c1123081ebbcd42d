"""Retention of delivered files: purge stored files after N days, keep the profiles.

A delivered file may hold personal data, and keeping it longer than needed is
itself a risk; the profile (counts, statistics, masked labels) stays, so the
intake's history and comparisons keep working. ``purge_old_files`` is the
sweep; deleting an intake entirely is ``delete_intake``.

References: Regulation (EU) 2016/679, Article 5(1)(e) ("storage limitation"),
as one example of the rules the pages point users to.
"""

from __future__ import annotations

from datetime import datetime, timedelta

from sqlalchemy import func, select
from sqlalchemy.orm import Session

from server.settings import Settings
from server.store import FileStore, Intake, IntakeStatus, accounts, file_store, session_scope
from server.store.models import utcnow


def discard_if_unused(session: Session, store: FileStore, key: str) -> None:
    """Remove a stored file (and its columnar copy) once no intake refers to it."""
    session.flush()
    if session.scalar(select(func.count()).where(Intake.file_key == key)) == 0:
        store.delete(key)


def purge_old_files(
    session: Session, store: FileStore, *, days: int, now: datetime | None = None
) -> list[int]:
    """Purge the stored files of intakes older than ``days``; returns their ids.

    Intakes still being profiled are left for the next sweep. Each purge is audited.
    """
    cutoff = (now or utcnow()) - timedelta(days=days)
    intakes = session.scalars(
        select(Intake).where(
            Intake.created_at < cutoff,
            Intake.file_key.is_not(None),
            Intake.status.not_in([IntakeStatus.queued, IntakeStatus.profiling]),
        )
    ).all()
    purged = []
    for intake in intakes:
        key = intake.file_key
        intake.file_key = None
        intake.file_purged_at = utcnow()
        discard_if_unused(session, store, key)
        accounts.audit(
            session,
            "retention-purge",
            target=f"intake:{intake.id}",
            detail={"days": days, "name": intake.original_name},
        )
        purged.append(intake.id)
    return purged


def delete_intake(session: Session, store: FileStore, intake: Intake) -> None:
    """Delete an intake with its profile and reviews, and its stored file unless shared."""
    key = intake.file_key
    session.delete(intake)
    session.flush()
    if key is not None:
        discard_if_unused(session, store, key)


def purge_by_settings(settings: Settings) -> list[int]:
    """One housekeeping round: expired sessions, stale failed sign-ins, and the stored files
    older than ``retention_days`` when it is set; returns the ids of the purged intakes."""
    window = timedelta(minutes=settings.security.failed_sign_in_window_minutes)
    with session_scope(settings) as session:
        accounts.purge_expired_sessions(session)
        accounts.forget_failed_sign_ins(session, before=utcnow() - window)
    days = settings.security.retention_days
    if days is None:
        return []
    with session_scope(settings) as session:
        return purge_old_files(session, file_store(settings), days=days)
