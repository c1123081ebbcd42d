"""The app's background work: unfinished intakes recovered at start, the sweeper thread."""

from __future__ import annotations

import shutil
import time

from fastapi.testclient import TestClient
from sqlalchemy import select, update

from server.app import create_app
from server.settings import Settings
from server.store import Intake, IntakeStatus, Supplier, file_store, session_scope
from server.store.models import utcnow
from tests.conftest import make_settings


def _left_over(settings: Settings, status: str) -> int:
    stored = file_store(settings).store_chunks([b"station,level\nG1,2.1\nG1,2.4\n"])
    with session_scope(settings) as session:
        name = "Gullwick tide-gauge station"
        supplier = session.scalar(select(Supplier).where(Supplier.name == name))
        intake = Intake(
            supplier=supplier or Supplier(name=name),
            original_name="levels.csv",
            file_key=stored.key,
            sha256=stored.sha256,
            bytes=stored.bytes,
            status=status,
            attempts=1 if status == IntakeStatus.profiling else 0,
        )
        session.add(intake)
        session.flush()
        return intake.id


def _wait_ready(settings: Settings, intake_id: int, timeout: float = 30) -> str:
    deadline = time.monotonic() + timeout
    while time.monotonic() < deadline:
        with session_scope(settings) as session:
            status = session.get(Intake, intake_id).status
        if status in (IntakeStatus.ready, IntakeStatus.failed):
            return status
        time.sleep(0.05)
    return status


def test_embedded_start_recovers_intakes_a_stop_left_unfinished(app_settings: Settings) -> None:
    queued = _left_over(app_settings, IntakeStatus.queued)
    interrupted = _left_over(app_settings, IntakeStatus.profiling)
    with TestClient(create_app(app_settings)):
        assert _wait_ready(app_settings, queued) == IntakeStatus.ready
        assert _wait_ready(app_settings, interrupted) == IntakeStatus.ready


def test_sweeper_thread_requeues_a_stuck_intake(tmp_path, migrated_sqlite, monkeypatch) -> None:

    settings = make_settings(
        tmp_path / "data",
        job_runner="celery",  # nothing recovers it at start: only the sweeper can
        sweeper_enabled=True,
        sweeper_interval_seconds=1,
        sweeper_timeout_seconds=1,
    )
    shutil.copyfile(migrated_sqlite, settings.data_dir / "tidewaiter.sqlite3")
    stuck = _left_over(settings, IntakeStatus.profiling)
    with session_scope(settings) as session:
        session.execute(update(Intake).where(Intake.id == stuck).values(updated_at=utcnow()))
    sent: list[int] = []
    monkeypatch.setattr(
        "worker.jobs.sweeper.enqueue_profile", lambda intake_id, _settings: sent.append(intake_id)
    )
    with TestClient(create_app(settings)):
        deadline = time.monotonic() + 10
        while not sent and time.monotonic() < deadline:
            time.sleep(0.1)
    assert sent == [stuck]
    with session_scope(settings) as session:
        assert session.get(Intake, stuck).status == IntakeStatus.queued
