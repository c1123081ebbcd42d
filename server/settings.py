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

from pydantic import Field
from pydantic_settings import BaseSettings, SettingsConfigDict

from worker.profiling.options import ProfileOptions


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
        900, description="An intake queued or profiling longer than this is enqueued again."
    )
    sweeper_interval_seconds: int = Field(60, description="How often the sweeper looks.")
    host: str = Field("127.0.0.1", description="Address `tidewaiter serve` listens on.")
    port: int = Field(8000, description="Port `tidewaiter serve` listens on.")
    profiling: ProfileOptions = Field(default_factory=ProfileOptions)

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
