"""The team deployment's job runner: a Celery app on Redis.

Configured for at-least-once delivery of idempotent jobs, as Celery's guide
advises: ``acks_late`` (a message is acknowledged after the job, so a crash
re-delivers it), ``task_reject_on_worker_lost`` (a killed worker process puts
it back), one message prefetched per process, a Redis visibility timeout above
the longest job, and retries with exponential backoff for transient errors.
Results live in the database, so Celery stores none.

``tidewaiter worker`` runs ``app`` from this module.
"""

from __future__ import annotations

import threading

from celery import Celery
from celery.signals import worker_process_init

from server.settings import Settings, get_settings
from server.store import dispose_engines
from worker.jobs.profile_job import TRANSIENT_ERRORS, profile_intake

TASK_NAME = "tidewaiter.profile_intake"
QUEUE = "tidewaiter"


def make_celery(settings: Settings) -> Celery:
    """A Celery app for ``settings``, with the profiling task registered."""
    app = Celery("tidewaiter", broker=settings.redis_url)
    app.conf.update(
        task_acks_late=True,
        task_reject_on_worker_lost=True,
        worker_prefetch_multiplier=1,
        task_ignore_result=True,
        task_default_queue=QUEUE,
        task_serializer="json",
        accept_content=["json"],
        broker_connection_retry_on_startup=True,
        broker_transport_options={"visibility_timeout": settings.job_visibility_timeout_seconds},
        task_publish_retry_policy={"max_retries": 3, "interval_start": 0.2, "interval_step": 0.5},
        worker_hijack_root_logger=False,
        worker_concurrency=settings.worker_concurrency,
    )

    # shared=False: the task belongs to this app only. A shared task would be added to
    # every Celery app the process makes, so a second app (other settings) would get the
    # first app's task, bound to the first app's settings, under the same name.
    @app.task(
        name=TASK_NAME,
        shared=False,
        autoretry_for=TRANSIENT_ERRORS,
        retry_backoff=True,
        retry_backoff_max=settings.job_retry_backoff_max_seconds,
        retry_jitter=True,
        max_retries=settings.job_max_retries,
    )
    def profile_intake_task(intake_id: int) -> str | None:
        status = profile_intake(intake_id, settings)
        return None if status is None else str(status)

    return app


@worker_process_init.connect
def _fresh_connections(**_: object) -> None:
    # A forked worker process must not share the parent's database connections.
    dispose_engines()


_apps: dict[str, Celery] = {}
_lock = threading.Lock()


def celery_for(settings: Settings) -> Celery:
    """The process's Celery app for the settings' Redis URL."""
    with _lock:
        app = _apps.get(settings.redis_url)
        if app is None:
            app = _apps[settings.redis_url] = make_celery(settings)
        return app


def __getattr__(name: str) -> Celery:
    # ``celery -A worker.jobs.celery_app`` looks for ``app``; build it on demand so that
    # importing this module does not read the environment.
    if name == "app":
        return celery_for(get_settings())
    raise AttributeError(name)
