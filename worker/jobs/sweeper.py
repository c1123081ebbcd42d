"""The sweeper: intakes stuck in queued or profiling are enqueued again.

An intake is stuck when nothing touched it for ``sweeper_timeout_seconds``:
a running job writes a heartbeat (``updated_at``) at least every
``job_heartbeat_seconds``, so only a lost message or a dead worker leaves an
intake untouched that long. The claim is a conditional update, so two
sweepers (two server processes) never enqueue the same intake twice in one
round. After ``sweeper_max_attempts`` started attempts the intake is marked
failed instead: a file that kills its worker must not loop forever.

In ``tidewaiter serve`` the sweeper runs as a thread (both deployments);
``tidewaiter sweep`` runs one round, or rounds forever with ``--loop``.
"""

from __future__ import annotations

import logging
import threading
from dataclasses import dataclass, field
from datetime import datetime, timedelta

from sqlalchemy import select, update

from server.security.retention import purge_by_settings
from server.settings import Settings
from server.store import Intake, IntakeStatus, session_scope
from server.store.models import utcnow
from worker.jobs.enqueue import enqueue_profile

log = logging.getLogger(__name__)

WAITING = (IntakeStatus.queued, IntakeStatus.profiling)


@dataclass
class SweepResult:
    """What one round did."""

    requeued: list[int] = field(default_factory=list)
    failed: list[int] = field(default_factory=list)


def sweep(
    settings: Settings, *, now: datetime | None = None, timeout: float | None = None
) -> SweepResult:
    """One round: re-enqueue (or give up on) intakes untouched for longer than the timeout.

    ``timeout=0`` takes every queued or profiling intake: that is how the
    embedded server recovers its own jobs at start-up.
    """
    now = now or utcnow()
    seconds = settings.sweeper_timeout_seconds if timeout is None else timeout
    cutoff = now - timedelta(seconds=seconds)
    result = SweepResult()
    with session_scope(settings) as session:
        stuck = session.execute(
            select(Intake.id, Intake.attempts).where(
                Intake.status.in_(WAITING), Intake.updated_at <= cutoff
            )
        ).all()
        for intake_id, attempts in stuck:
            giving_up = attempts >= settings.sweeper_max_attempts
            values = (
                {
                    "status": IntakeStatus.failed,
                    "stage": "failed",
                    "error": f"profiling did not finish after {attempts} attempts; the worker "
                    "may have run out of memory or time on this file",
                    "finished_at": now,
                }
                if giving_up
                else {"status": IntakeStatus.queued, "stage": "requeued", "progress": 0.0}
            )
            claimed = session.execute(
                update(Intake)
                .where(
                    Intake.id == intake_id,
                    Intake.status.in_(WAITING),
                    Intake.updated_at <= cutoff,
                )
                .values(updated_at=now, **values)
            ).rowcount
            if claimed:
                (result.failed if giving_up else result.requeued).append(intake_id)
    for intake_id in result.requeued:
        enqueue_profile(intake_id, settings)
    if result.requeued or result.failed:
        log.info("sweeper: requeued %s, gave up on %s", result.requeued, result.failed)
    return result


class SweeperThread(threading.Thread):
    """Runs ``sweep`` every ``sweeper_interval_seconds`` until stopped."""

    def __init__(self, settings: Settings) -> None:
        super().__init__(name="tidewaiter-sweeper", daemon=True)
        self.settings = settings
        self._stop_event = threading.Event()

    def run(self) -> None:
        while not self._stop_event.wait(self.settings.sweeper_interval_seconds):
            try:
                sweep(self.settings)
                purge_by_settings(self.settings)  # retention: old stored files, profiles stay
            except Exception:
                log.exception("sweeper round failed; trying again next round")

    def stop(self) -> None:
        """Ask the thread to end and wait for it."""
        self._stop_event.set()
        self.join(timeout=10)
