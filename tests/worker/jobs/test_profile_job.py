"""The job body: idempotent, failures recorded with their reason, the worker never crashes."""

from __future__ import annotations

import pytest
from sqlalchemy import func, select

from server.settings import Settings
from server.store import (
    ColumnSummary,
    Intake,
    IntakeStatus,
    Profile,
    Supplier,
    file_store,
    session_scope,
)
from tests.support import stored_intake
from worker.jobs import profile_intake

# Invented delivery with one planted missing value.
DELIVERY = b"vessel,weight_kg,species\nBB-001,120.5,cod\nBB-002,,haddock\nBB-003,98.0,cod\n"


def _new_intake(settings: Settings, content: bytes = DELIVERY) -> int:
    with session_scope(settings) as session:
        supplier = Supplier(name="Brannock Bay fishing cooperative")
        store = file_store(settings)
        return stored_intake(session, store, content, supplier=supplier, name="landings.csv").id


def _counts(settings: Settings, intake_id: int) -> tuple[int, int]:
    with session_scope(settings) as session:
        profiles = session.scalar(
            select(func.count()).select_from(Profile).where(Profile.intake_id == intake_id)
        )
        columns = session.scalar(
            select(func.count())
            .select_from(ColumnSummary)
            .where(ColumnSummary.intake_id == intake_id)
        )
    return profiles, columns


def test_profiles_and_stores_one_row_per_column(app_settings: Settings) -> None:
    intake_id = _new_intake(app_settings)
    assert profile_intake(intake_id, app_settings) == IntakeStatus.ready
    assert _counts(app_settings, intake_id) == (1, 3)
    with session_scope(app_settings) as session:
        intake = session.get(Intake, intake_id)
        assert intake.status == IntakeStatus.ready
        assert intake.attempts == 1
        assert intake.profile.rows == 3
        weights = next(c for c in intake.column_summaries if c.name == "weight_kg")
        # By construction: one of three weights is missing.
        assert weights.missing_share == pytest.approx(1 / 3)


def test_running_again_replaces_and_never_duplicates(app_settings: Settings) -> None:
    intake_id = _new_intake(app_settings)
    profile_intake(intake_id, app_settings)
    # A redelivered message for a ready intake does nothing...
    assert profile_intake(intake_id, app_settings) == IntakeStatus.ready
    # ...and a forced re-run replaces the profile and the column rows.
    assert profile_intake(intake_id, app_settings, force=True) == IntakeStatus.ready
    assert _counts(app_settings, intake_id) == (1, 3)
    with session_scope(app_settings) as session:
        assert session.get(Intake, intake_id).attempts == 2


def test_unreadable_file_is_failed_with_the_engine_reason(app_settings: Settings) -> None:
    intake_id = _new_intake(app_settings, bytes(range(256)) * 4)
    assert profile_intake(intake_id, app_settings) == IntakeStatus.failed
    with session_scope(app_settings) as session:
        intake = session.get(Intake, intake_id)
        assert intake.status == IntakeStatus.failed
        assert intake.error and len(intake.error) > 10
        assert intake.finished_at is not None
    assert _counts(app_settings, intake_id) == (0, 0)


def test_missing_stored_file_is_failed_not_raised(app_settings: Settings) -> None:
    intake_id = _new_intake(app_settings)
    with session_scope(app_settings) as session:
        key = session.get(Intake, intake_id).file_key
    file_store(app_settings).delete(key)
    assert profile_intake(intake_id, app_settings) == IntakeStatus.failed
    with session_scope(app_settings) as session:
        assert "no longer there" in session.get(Intake, intake_id).error


def test_unexpected_engine_error_is_failed_with_a_plain_message(
    app_settings: Settings, monkeypatch: pytest.MonkeyPatch
) -> None:
    def broken_engine(*args: object, **kwargs: object) -> dict:
        raise ZeroDivisionError("planted fault")

    monkeypatch.setattr("worker.jobs.profile_job.profile_file", broken_engine)
    intake_id = _new_intake(app_settings)
    assert profile_intake(intake_id, app_settings) == IntakeStatus.failed
    with session_scope(app_settings) as session:
        error = session.get(Intake, intake_id).error
    assert "unexpected error" in error and "planted fault" in error


def test_transient_errors_are_raised_for_a_retry(
    app_settings: Settings, monkeypatch: pytest.MonkeyPatch
) -> None:
    import sqlalchemy.exc

    def database_gone(*args: object, **kwargs: object) -> dict:
        raise sqlalchemy.exc.OperationalError("SELECT 1", {}, Exception("connection refused"))

    monkeypatch.setattr("worker.jobs.profile_job.profile_file", database_gone)
    intake_id = _new_intake(app_settings)
    with pytest.raises(sqlalchemy.exc.OperationalError):
        profile_intake(intake_id, app_settings)
    with session_scope(app_settings) as session:
        assert session.get(Intake, intake_id).status == IntakeStatus.profiling  # for the sweeper


def test_progress_reaches_the_intake_row(
    app_settings: Settings, monkeypatch: pytest.MonkeyPatch
) -> None:
    import threading

    from worker.profiling import profile_file

    seen: list[tuple[str, float]] = []
    release = threading.Event()

    def slow_engine(path, options, *, progress, **kwargs):
        progress("reading", 0.5)
        release.wait(5)
        return profile_file(path, options, progress=progress, **kwargs)

    monkeypatch.setattr("worker.jobs.profile_job.profile_file", slow_engine)
    intake_id = _new_intake(app_settings)
    job = threading.Thread(target=profile_intake, args=(intake_id, app_settings))
    job.start()
    try:
        for _ in range(100):
            with session_scope(app_settings) as session:
                intake = session.get(Intake, intake_id)
                seen.append((intake.stage, intake.progress))
            if seen[-1] == ("reading", 0.5):
                break
            release.wait(0.05)
    finally:
        release.set()
        job.join(timeout=60)
    assert not job.is_alive(), "the profiling job did not finish"
    assert ("reading", 0.5) in seen


def test_a_message_back_from_a_lost_worker_gives_up_after_the_attempt_limit(
    app_settings: Settings,
) -> None:
    intake_id = _new_intake(app_settings)
    with session_scope(app_settings) as session:
        intake = session.get(Intake, intake_id)
        # As left by attempts whose worker process died mid-way.
        intake.status = IntakeStatus.profiling
        intake.attempts = app_settings.sweeper_max_attempts
    assert profile_intake(intake_id, app_settings) == IntakeStatus.failed
    with session_scope(app_settings) as session:
        assert "did not finish after" in session.get(Intake, intake_id).error


def test_a_stopping_process_puts_its_running_job_back_in_the_queue(
    app_settings: Settings, monkeypatch: pytest.MonkeyPatch
) -> None:
    import threading

    stop = threading.Event()

    def long_engine(path, options, *, progress, **kwargs):
        for i in range(10_000):
            progress("reading", i / 10_000)
            if i == 5:
                stop.set()  # the server is asked to stop mid-file
        raise AssertionError("the engine should have been interrupted")

    monkeypatch.setattr("worker.jobs.profile_job.profile_file", long_engine)
    intake_id = _new_intake(app_settings)
    status = profile_intake(intake_id, app_settings, stop_requested=stop.is_set)
    assert status == IntakeStatus.queued
    with session_scope(app_settings) as session:
        intake = session.get(Intake, intake_id)
        assert (intake.status, intake.stage, intake.attempts) == ("queued", "interrupted", 0)
    assert _counts(app_settings, intake_id) == (0, 0)
