"""The in-process runner: jobs on a thread pool, interrupted when the server stops."""

from __future__ import annotations

import threading
import time

import pytest

from server.settings import Settings
from server.store import Intake, IntakeStatus, session_scope
from tests.worker.jobs.test_sweeper import _intake
from worker.jobs.inprocess import InProcessRunner


def test_stopping_the_runner_interrupts_a_long_job_without_waiting(
    app_settings: Settings, monkeypatch: pytest.MonkeyPatch
) -> None:
    started = threading.Event()

    def endless_engine(path, options, *, progress, **kwargs):
        # A file that would take long: bounded at a minute, so a runner that failed to
        # interrupt it fails this test instead of holding the interpreter at exit.
        for _ in range(6000):
            progress("reading", 0.1)
            started.set()
            time.sleep(0.01)

    monkeypatch.setattr("worker.jobs.profile_job.profile_file", endless_engine)
    intake_id = _intake(app_settings, status="queued", age_seconds=0)
    runner = InProcessRunner(app_settings)
    runner.submit(intake_id)
    assert started.wait(30)
    runner.shutdown()
    assert runner.wait_idle(timeout=10)  # the job noticed and ended
    with session_scope(app_settings) as session:
        assert session.get(Intake, intake_id).status == IntakeStatus.queued
