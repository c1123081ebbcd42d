"""The one seam between the service and the job runners: ``enqueue_profile``."""

from __future__ import annotations

from server.settings import Settings, get_settings


def enqueue_profile(intake_id: int, settings: Settings | None = None) -> None:
    """Ask for intake ``intake_id`` to be profiled.

    Call it only after the transaction that created or re-queued the intake has
    committed: the job re-reads the intake from the database. Where it runs
    depends on ``settings.job_runner``: the in-process thread pool, or a Celery
    worker through Redis.
    """
    settings = settings or get_settings()
    if settings.job_runner == "celery":
        from worker.jobs.celery_app import TASK_NAME, celery_for

        celery_for(settings).send_task(TASK_NAME, args=[intake_id])
    else:
        from worker.jobs.inprocess import runner_for

        runner_for(settings).submit(intake_id)
