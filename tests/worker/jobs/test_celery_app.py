"""The Celery app is configured for at-least-once delivery of idempotent jobs."""

from __future__ import annotations

from server.settings import Settings
from worker.jobs.celery_app import TASK_NAME, make_celery
from worker.jobs.profile_job import TRANSIENT_ERRORS


def test_delivery_guarantees(app_settings: Settings) -> None:
    app = make_celery(app_settings)
    conf = app.conf
    assert conf.task_acks_late is True
    assert conf.task_reject_on_worker_lost is True
    assert conf.worker_prefetch_multiplier == 1
    assert conf.task_ignore_result is True  # the database holds the results
    visibility = conf.broker_transport_options["visibility_timeout"]
    assert visibility == app_settings.job_visibility_timeout_seconds
    assert visibility > app_settings.sweeper_timeout_seconds


def test_task_retries_transient_errors_with_backoff(app_settings: Settings) -> None:
    task = make_celery(app_settings).tasks[TASK_NAME]
    assert tuple(task.autoretry_for) == TRANSIENT_ERRORS
    assert task.retry_backoff is True
    assert task.retry_backoff_max == app_settings.job_retry_backoff_max_seconds
    assert task.max_retries == app_settings.job_max_retries


def test_each_app_runs_the_task_with_its_own_settings(app_settings: Settings, monkeypatch) -> None:
    """Two apps in one process (other settings) must not share one task callable."""
    seen: list[tuple[int, Settings]] = []
    monkeypatch.setattr("worker.jobs.celery_app.profile_intake", lambda i, s: seen.append((i, s)))
    other = app_settings.model_copy(update={"job_max_retries": app_settings.job_max_retries + 1})
    first, second = make_celery(app_settings), make_celery(other)
    first.tasks[TASK_NAME].run(1)
    second.tasks[TASK_NAME].run(2)
    assert seen == [(1, app_settings), (2, other)]
    assert second.tasks[TASK_NAME].max_retries == other.job_max_retries
