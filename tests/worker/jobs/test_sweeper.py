"""The sweeper: stuck intakes are enqueued again; fresh ones are left alone."""

from __future__ import annotations

from datetime import timedelta

import pytest
from sqlalchemy import update

from server.settings import Settings
from server.store import Intake, IntakeStatus, Supplier, file_store, session_scope
from server.store.models import utcnow
from tests.support import stored_intake
from worker.jobs.sweeper import sweep


def _intake(settings: Settings, *, status: str, age_seconds: float, attempts: int = 0) -> int:
    with session_scope(settings) as session:
        supplier = session.query(Supplier).first() or Supplier(name="Gullwick tide-gauge station")
        intake_id = stored_intake(
            session,
            file_store(settings),
            b"a,b\n1,2\n3,4\n",
            supplier=supplier,
            name="levels.csv",
            status=status,
            attempts=attempts,
        ).id
    with session_scope(settings) as session:  # set the age after the row's own onupdate
        session.execute(
            update(Intake)
            .where(Intake.id == intake_id)
            .values(updated_at=utcnow() - timedelta(seconds=age_seconds))
        )
    return intake_id


@pytest.fixture
def enqueued(monkeypatch: pytest.MonkeyPatch) -> list[int]:
    sent: list[int] = []
    monkeypatch.setattr(
        "worker.jobs.sweeper.enqueue_profile", lambda intake_id, settings: sent.append(intake_id)
    )
    return sent


def test_stuck_intakes_are_requeued_and_fresh_ones_left(
    app_settings: Settings, enqueued: list[int]
) -> None:
    timeout = app_settings.sweeper_timeout_seconds
    stuck_queued = _intake(app_settings, status="queued", age_seconds=timeout + 60)
    stuck_running = _intake(app_settings, status="profiling", age_seconds=timeout + 60, attempts=1)
    fresh = _intake(app_settings, status="profiling", age_seconds=5, attempts=1)
    done = _intake(app_settings, status="ready", age_seconds=timeout * 10)

    result = sweep(app_settings)
    assert sorted(result.requeued) == sorted([stuck_queued, stuck_running])
    assert sorted(enqueued) == sorted([stuck_queued, stuck_running])
    with session_scope(app_settings) as session:
        assert session.get(Intake, stuck_running).status == IntakeStatus.queued
        assert session.get(Intake, fresh).status == IntakeStatus.profiling
        assert session.get(Intake, done).status == IntakeStatus.ready

    # The claim touched them: a second round right after does nothing.
    assert sweep(app_settings).requeued == []


def test_gives_up_after_the_attempt_limit(app_settings: Settings, enqueued: list[int]) -> None:
    limit = app_settings.sweeper_max_attempts
    hopeless = _intake(
        app_settings,
        status="profiling",
        age_seconds=app_settings.sweeper_timeout_seconds + 1,
        attempts=limit,
    )
    result = sweep(app_settings)
    assert result.failed == [hopeless]
    assert enqueued == []
    with session_scope(app_settings) as session:
        intake = session.get(Intake, hopeless)
        assert intake.status == IntakeStatus.failed
        assert f"after {limit} attempts" in intake.error


def test_a_requeued_intake_is_profiled_by_the_real_runner(app_settings: Settings) -> None:
    from worker.jobs.inprocess import runner_for, shutdown_runner

    stuck = _intake(
        app_settings, status="queued", age_seconds=app_settings.sweeper_timeout_seconds + 1
    )
    assert sweep(app_settings).requeued == [stuck]
    try:
        assert runner_for(app_settings).wait_idle(timeout=60)
    finally:
        shutdown_runner(app_settings, wait_for_jobs=True)
    with session_scope(app_settings) as session:
        assert session.get(Intake, stuck).status == IntakeStatus.ready
