"""The service's settings: one object, read from ``TIDEWAITER_*`` variables.

With no variable set, Tidewaiter runs embedded: a SQLite file and stored files
under ``./var``, jobs on an in-process thread pool. Setting a PostgreSQL
``TIDEWAITER_DATABASE_URL`` and ``TIDEWAITER_JOB_RUNNER=celery`` (with
``TIDEWAITER_REDIS_URL``) gives the team deployment.
"""

from __future__ import annotations

from functools import lru_cache
from pathlib import Path
from typing import Literal

from pydantic import BaseModel, Field
from pydantic_settings import BaseSettings, SettingsConfigDict

from worker.profiling.options import ProfileOptions


class SecuritySettings(BaseModel):
    """Sign-in, sessions, throttling and retention (``TIDEWAITER_SECURITY__<FIELD>``)."""

    https: bool = Field(
        False, description="The site is served over HTTPS: session cookies get the Secure flag."
    )
    session_hours: float = Field(
        12.0, description="A session ends this long after sign-in (common practice: a work day)."
    )
    max_failed_sign_ins: int = Field(
        5,
        description="Failed sign-ins per account within the window before it is held "
        "(common practice; OWASP Authentication Cheat Sheet).",
    )
    max_failed_sign_ins_per_address: int = Field(
        20, description="Failed sign-ins per client address within the window (common practice)."
    )
    failed_sign_in_window_minutes: int = Field(
        15, description="Window over which failed sign-ins are counted (common practice)."
    )
    trusted_proxies: str = Field(
        "",
        description="Comma-separated addresses or networks (CIDR) of reverse proxies whose "
        "X-Forwarded-For and X-Forwarded-Proto headers are believed, so sign-in throttling "
        "and the audit log see the real client; empty believes no one.",
    )
    retention_days: int | None = Field(
        None,
        description="Stored files older than this are purged (profiles are kept); "
        "empty keeps files until an admin deletes them.",
    )
    preview_rows_limit: int = Field(
        200,
        description="Most rows one preview of an intake's delivered rows may ask for; more "
        "is refused with a plain error (common practice: a screenful, not a copy of the file).",
    )


class Settings(BaseSettings):
    """Every setting of the service, with its default."""

    model_config = SettingsConfigDict(
        env_prefix="TIDEWAITER_", env_nested_delimiter="__", extra="ignore"
    )

    data_dir: Path = Field(Path("var"), description="Folder for the SQLite file and stored files.")
    database_url: str | None = Field(
        None, description="SQLAlchemy URL; empty means a SQLite file in the data folder."
    )
    redis_url: str = Field("redis://127.0.0.1:6379/0", description="Celery broker and results.")
    job_runner: Literal["inprocess", "celery"] = Field(
        "inprocess", description="Where profiling jobs run: a thread pool here, or Celery workers."
    )
    inprocess_workers: int = Field(2, description="Threads of the in-process job runner.")
    upload_limit_bytes: int = Field(
        2 * 1024**3, description="Largest accepted upload; larger ones get 413 while streaming."
    )
    sweeper_timeout_seconds: int = Field(
        900,
        description="An intake queued, or profiling with no heartbeat, for longer than this "
        "is enqueued again.",
    )
    sweeper_interval_seconds: int = Field(60, description="How often the sweeper looks.")
    sweeper_max_attempts: int = Field(
        3,
        description="After this many started attempts the sweeper marks a stuck intake failed "
        "instead of enqueuing it again (a file that kills its worker must not loop forever).",
    )
    sweeper_enabled: bool = Field(
        True, description="Run the sweeper as a thread inside `tidewaiter serve`."
    )
    job_heartbeat_seconds: float = Field(
        30.0,
        description="A running job touches its intake at least this often, so the sweeper "
        "can tell a slow job from a dead one (keep it well below the sweeper timeout).",
    )
    job_progress_interval_seconds: float = Field(
        0.5, description="Shortest time between two progress writes of a running job."
    )
    job_max_retries: int = Field(
        5, description="Retries of a job after a transient error (database or queue down)."
    )
    job_retry_backoff_max_seconds: int = Field(
        600, description="Longest wait between two retries (exponential backoff up to this)."
    )
    job_visibility_timeout_seconds: int = Field(
        6 * 3600,
        description="Redis visibility timeout: a message not acknowledged within this is "
        "delivered again; it must exceed the longest job.",
    )
    worker_concurrency: int = Field(2, description="Processes of one `tidewaiter worker`.")
    host: str = Field("127.0.0.1", description="Address `tidewaiter serve` listens on.")
    port: int = Field(8000, description="Port `tidewaiter serve` listens on.")
    profiling: ProfileOptions = Field(default_factory=ProfileOptions)
    security: SecuritySettings = Field(default_factory=SecuritySettings)

    @property
    def resolved_database_url(self) -> str:
        """The configured URL, or the embedded SQLite file under ``data_dir``."""
        if self.database_url:
            return self.database_url
        return f"sqlite:///{(self.data_dir / 'tidewaiter.sqlite3').resolve()}"


@lru_cache
def get_settings() -> Settings:
    """The process-wide settings, read once from the environment."""
    return Settings()
