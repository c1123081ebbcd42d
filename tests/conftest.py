"""Fixtures shared by the whole suite.

- ``postgres_url`` / ``redis_url``: the real services, each test with its own
  fresh PostgreSQL database (created from ``TIDEWAITER_TEST_DATABASE_URL`` and
  dropped afterwards). Without the services these tests skip, unless
  ``TIDEWAITER_REQUIRE_SERVICES=1``, where they fail.
- ``database_url``: parametrised over SQLite and PostgreSQL, an empty database.
- ``app_settings``: embedded settings on a temporary data folder.
- ``client``: a TestClient of a fresh app on a migrated database, signed in as
  an admin through a real API token; ``anonymous_client`` carries no credentials.
"""

from __future__ import annotations

import shutil
from collections.abc import Iterator
from pathlib import Path

import pytest

from server.settings import Settings
from server.store import dispose_engines, schema
from tests.support import admin_token, empty_redis_database, fresh_postgres_database


@pytest.fixture
def postgres_url() -> Iterator[str]:
    """URL of a fresh, empty PostgreSQL database, dropped after the test."""
    with fresh_postgres_database() as url:
        yield url


@pytest.fixture
def redis_url() -> str:
    """URL of a Redis database of its own (emptied first)."""
    return empty_redis_database()


@pytest.fixture(params=["sqlite", "postgres"])
def database_url(request: pytest.FixtureRequest, tmp_path: Path) -> str:
    """An empty database: a SQLite file, then a fresh PostgreSQL database."""
    if request.param == "sqlite":
        return f"sqlite:///{tmp_path / 'test.sqlite3'}"
    return request.getfixturevalue("postgres_url")


def make_settings(data_dir: Path, **overrides: object) -> Settings:
    """Embedded settings on ``data_dir`` that ignore the environment's TIDEWAITER_ variables."""
    values: dict[str, object] = {
        "data_dir": data_dir,
        "database_url": f"sqlite:///{data_dir / 'tidewaiter.sqlite3'}",
        "job_runner": "inprocess",
        "inprocess_workers": 2,
        "sweeper_enabled": False,
        "job_progress_interval_seconds": 0.05,
        "upload_limit_bytes": 1024 * 1024,
    }
    values.update(overrides)
    data_dir.mkdir(parents=True, exist_ok=True)
    return Settings(**values)  # type: ignore[arg-type]


@pytest.fixture(scope="session")
def migrated_sqlite(tmp_path_factory: pytest.TempPathFactory) -> Path:
    """A SQLite file migrated to the newest schema once per run, copied by ``app_settings``."""
    path = tmp_path_factory.mktemp("template") / "tidewaiter.sqlite3"
    schema.upgrade(f"sqlite:///{path}")
    dispose_engines()
    return path


@pytest.fixture
def app_settings(tmp_path: Path, migrated_sqlite: Path) -> Settings:
    """Embedded settings with a temporary data folder, a migrated database, a 1 MiB limit."""
    settings = make_settings(tmp_path / "data")
    shutil.copyfile(migrated_sqlite, settings.data_dir / "tidewaiter.sqlite3")
    return settings


@pytest.fixture
def anonymous_client(app_settings: Settings) -> Iterator[object]:
    """A TestClient of a fresh app on the migrated database, with no credentials."""
    from fastapi.testclient import TestClient

    from server.app import create_app
    from worker.jobs.inprocess import runner_for

    with TestClient(create_app(app_settings)) as client:
        yield client
        runner_for(app_settings).wait_idle(timeout=60)
    dispose_engines()


@pytest.fixture
def client(anonymous_client: object, app_settings: Settings) -> object:
    """The same app, signed in as an admin through a real API token."""
    token = admin_token(app_settings)
    if token is not None:
        anonymous_client.headers["Authorization"] = f"Bearer {token}"  # type: ignore[attr-defined]
    return anonymous_client
