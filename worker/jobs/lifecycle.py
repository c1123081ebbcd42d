"""Background work owned by a server process: job recovery, the runner, the sweeper."""

from __future__ import annotations

import logging

from server.settings import Settings
from worker.jobs.inprocess import shutdown_runner
from worker.jobs.sweeper import SweeperThread, sweep

log = logging.getLogger(__name__)


def start_background(settings: Settings) -> SweeperThread | None:
    """Start what a server process runs beside its requests; returns the sweeper thread.

    Embedded, the server is the only job runner, so every intake left queued
    or profiling by a previous run is enqueued again at once.
    """
    if settings.job_runner == "inprocess":
        try:
            recovered = sweep(settings, timeout=0)
            if recovered.requeued:
                log.info("re-enqueued %d unfinished intakes", len(recovered.requeued))
        except Exception:
            log.exception("could not recover unfinished intakes; the sweeper will try later")
    if not settings.sweeper_enabled:
        return None
    sweeper = SweeperThread(settings)
    sweeper.start()
    return sweeper


def stop_background(settings: Settings, sweeper: SweeperThread | None) -> None:
    """Stop the sweeper and the in-process runner (queued jobs stay queued in the database)."""
    if sweeper is not None:
        sweeper.stop()
    shutdown_runner(settings)
