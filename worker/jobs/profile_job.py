"""The job body: profile one intake and store the result.

It takes an intake id and re-reads everything from the database (the source
of truth), so it can run anywhere: on the in-process thread pool or in a
Celery worker. It is idempotent: running it again replaces the profile and the
column summaries, never adds a second copy.

Outcomes:
- the engine reads the file → status ready, profile and column summaries stored;
- the engine cannot read the file (``ProfileError``) → status failed with its message;
- a transient error (database or queue unreachable) → raised, so the caller retries;
- any other error → status failed with a plain message; the worker keeps running.
"""

from __future__ import annotations

import logging
import os
import uuid
from collections.abc import Callable
from typing import Any

import redis.exceptions
import sqlalchemy.exc
from sqlalchemy import delete, update

from server.settings import Settings, get_settings
from server.store import (
    ColumnSummary,
    Intake,
    IntakeStatus,
    Profile,
    file_store,
    session_scope,
)
from server.store.models import utcnow
from worker.jobs.judging import judge_quietly
from worker.jobs.progress import JobInterrupted, ProgressReporter
from worker.jobs.summaries import column_rows, json_safe, overall_score
from worker.profiling import ProfileError, profile_file

log = logging.getLogger(__name__)

TRANSIENT_ERRORS: tuple[type[BaseException], ...] = (
    sqlalchemy.exc.OperationalError,
    sqlalchemy.exc.InterfaceError,
    redis.exceptions.ConnectionError,
    redis.exceptions.TimeoutError,
)
"""Errors worth retrying later: the service around the job, not the file, is at fault."""


def profile_intake(
    intake_id: int,
    settings: Settings | None = None,
    *,
    force: bool = False,
    stop_requested: Callable[[], bool] | None = None,
) -> IntakeStatus | None:
    """Profile intake ``intake_id`` and store its profile; returns its final status.

    An intake already ``ready`` is left alone unless ``force`` is set (a
    redelivered message costs nothing). Returns None for an unknown id.
    ``stop_requested`` lets the in-process runner interrupt a long job when the
    server stops: the intake goes back to queued and is profiled at the next start.
    """
    settings = settings or get_settings()
    store = file_store(settings)
    with session_scope(settings) as session:
        intake = session.get(Intake, intake_id)
        if intake is None:
            log.warning("intake %s does not exist; nothing to profile", intake_id)
            return None
        if intake.status == IntakeStatus.ready and not force:
            return IntakeStatus.ready
        if (
            intake.status == IntakeStatus.profiling
            and intake.attempts >= settings.sweeper_max_attempts
        ):
            # Every earlier attempt died mid-way (the message came back after its worker
            # was lost): a file that kills its worker must not loop forever.
            _mark_failed(
                intake,
                f"profiling did not finish after {intake.attempts} attempts; the worker "
                "may have run out of memory or time on this file",
            )
            return IntakeStatus.failed
        if intake.file_key is None or not store.exists(intake.file_key):
            _mark_failed(intake, "the stored file of this intake is no longer there")
            return IntakeStatus.failed
        intake.status = IntakeStatus.profiling
        intake.stage = "starting"
        intake.progress = 0.0
        intake.error = None
        intake.attempts += 1
        intake.started_at = utcnow()
        intake.finished_at = None
        key, original_name, digest = intake.file_key, intake.original_name, intake.sha256

    final_copy = store.columnar_path(key)
    partial_copy = final_copy.with_name(f"{final_copy.stem}.{uuid.uuid4().hex}.part.parquet")
    reporter = ProgressReporter(
        lambda stage, share: _write_progress(settings, intake_id, stage, share),
        interval=settings.job_progress_interval_seconds,
        heartbeat=settings.job_heartbeat_seconds,
        stop_requested=stop_requested,
    )
    try:
        with reporter:
            document = profile_file(
                store.path(key),
                settings.profiling,
                progress=reporter.report,
                columnar_copy=partial_copy,
                source_name=original_name,
                sha256=digest,  # computed while the upload streamed in
            )
    except ProfileError as exc:
        partial_copy.unlink(missing_ok=True)
        return _fail(settings, intake_id, str(exc))
    except JobInterrupted:
        partial_copy.unlink(missing_ok=True)
        _requeue(settings, intake_id)
        return IntakeStatus.queued
    except TRANSIENT_ERRORS:
        partial_copy.unlink(missing_ok=True)
        raise
    except Exception as exc:
        partial_copy.unlink(missing_ok=True)
        if stop_requested is not None and stop_requested():
            # The process is going away under the job (its thread pools refuse new work):
            # not the file's fault, so it goes back to the queue.
            _requeue(settings, intake_id)
            return IntakeStatus.queued
        log.exception("profiling intake %s stopped on an unexpected error", intake_id)
        return _fail(
            settings,
            intake_id,
            f"profiling stopped on an unexpected error ({type(exc).__name__}: {exc}); "
            "the file is kept and can be profiled again",
        )

    if partial_copy.exists():
        os.replace(partial_copy, final_copy)
    _store_profile(settings, intake_id, json_safe(document))
    return IntakeStatus.ready


def _write_progress(settings: Settings, intake_id: int, stage: str, share: float) -> None:
    with session_scope(settings) as session:
        session.execute(
            update(Intake)
            .where(Intake.id == intake_id, Intake.status == IntakeStatus.profiling)
            .values(stage=stage[:40], progress=share, updated_at=utcnow())
        )


def _requeue(settings: Settings, intake_id: int) -> None:
    with session_scope(settings) as session:
        session.execute(
            update(Intake)
            .where(Intake.id == intake_id)
            .values(
                status=IntakeStatus.queued,
                stage="interrupted",
                progress=0.0,
                attempts=Intake.attempts - 1,  # not the file's fault: the attempt does not count
            )
        )


def _mark_failed(intake: Intake, message: str) -> None:
    intake.status = IntakeStatus.failed
    intake.stage = "failed"
    intake.error = message
    intake.finished_at = utcnow()


def _fail(settings: Settings, intake_id: int, message: str) -> IntakeStatus:
    with session_scope(settings) as session:
        intake = session.get(Intake, intake_id)
        if intake is not None:
            session.execute(delete(ColumnSummary).where(ColumnSummary.intake_id == intake_id))
            session.execute(delete(Profile).where(Profile.intake_id == intake_id))
            _mark_failed(intake, message)
    return IntakeStatus.failed


def _store_profile(settings: Settings, intake_id: int, document: dict[str, Any]) -> None:
    """Replace the intake's profile and column summaries in one transaction."""
    dataset = document.get("dataset") or {}
    with session_scope(settings) as session:
        intake = session.get(Intake, intake_id)
        if intake is None:  # deleted while it was being profiled
            return
        session.execute(delete(ColumnSummary).where(ColumnSummary.intake_id == intake_id))
        session.execute(delete(Profile).where(Profile.intake_id == intake_id))
        session.flush()
        session.add(
            Profile(
                intake_id=intake_id,
                format_version=int(document.get("format_version", 1)),
                document=document,
                rows=int(dataset.get("rows") or 0),
                columns=int(dataset.get("columns") or len(document.get("columns") or [])),
                overall_score=overall_score(document),
            )
        )
        session.add_all(ColumnSummary(intake_id=intake_id, **row) for row in column_rows(document))
        judge_quietly(session, intake, settings)
        intake.status = IntakeStatus.ready
        intake.stage = "done"
        intake.progress = 1.0
        intake.error = None
        intake.finished_at = utcnow()
