"""Helpers for tests that drive the service."""

from __future__ import annotations

import os
import time
import uuid
from collections.abc import Iterator
from contextlib import contextmanager
from typing import Any

import pytest
from sqlalchemy import create_engine, text
from sqlalchemy.engine import make_url

from server.settings import Settings
from server.store import dispose_engines

DEFAULT_TEST_DATABASE = "postgresql+psycopg://postgres@127.0.0.1:5432/test"
DEFAULT_TEST_REDIS = "redis://127.0.0.1:6379/15"

FINISHED = ("ready", "failed")


def wait_for_intake(client: Any, intake_id: int, *, timeout: float = 60.0) -> dict[str, Any]:
    """Poll ``GET /api/v1/intakes/{id}`` until the intake is ready or failed."""
    deadline = time.monotonic() + timeout
    while True:
        body = client.get(f"/api/v1/intakes/{intake_id}").json()
        if body["status"] in FINISHED:
            return body
        if time.monotonic() > deadline:
            raise AssertionError(f"intake {intake_id} still {body['status']} after {timeout} s")
        time.sleep(0.05)


def make_supplier(client: Any, name: str = "Gullwick tide-gauge station") -> dict[str, Any]:
    """Create a supplier through the API and return it."""
    answer = client.post("/api/v1/suppliers", json={"name": name})
    assert answer.status_code == 201, answer.text
    return answer.json()


def upload(client: Any, content: bytes, *, supplier: str | int, name: str = "delivery.csv") -> Any:
    """POST a file to ``/api/v1/intakes`` and return the response."""
    return client.post(
        "/api/v1/intakes",
        data={"supplier": str(supplier)},
        files={"file": (name, content, "text/csv")},
    )


def service_missing(what: str, reason: object) -> None:
    """Skip the test, or fail it when TIDEWAITER_REQUIRE_SERVICES=1."""
    message = f"{what} is not reachable ({reason})"
    if os.environ.get("TIDEWAITER_REQUIRE_SERVICES") == "1":
        pytest.fail(f"{message}, and TIDEWAITER_REQUIRE_SERVICES=1")
    pytest.skip(message)


@contextmanager
def fresh_postgres_database() -> Iterator[str]:
    """A new, empty database created from TIDEWAITER_TEST_DATABASE_URL, dropped at the end."""
    base = make_url(os.environ.get("TIDEWAITER_TEST_DATABASE_URL", DEFAULT_TEST_DATABASE))
    admin = create_engine(base, isolation_level="AUTOCOMMIT")
    name = f"tidewaiter_test_{uuid.uuid4().hex[:12]}"
    try:
        with admin.connect() as conn:
            conn.execute(text(f'CREATE DATABASE "{name}"'))
    except Exception as exc:
        admin.dispose()
        service_missing("PostgreSQL", exc)
    try:
        yield base.set(database=name).render_as_string(hide_password=False)
    finally:
        dispose_engines()
        with admin.connect() as conn:
            conn.execute(text(f'DROP DATABASE IF EXISTS "{name}" WITH (FORCE)'))
        admin.dispose()


def empty_redis_database() -> str:
    """TIDEWAITER_TEST_REDIS_URL (a Redis database number of the tests' own), emptied."""
    import redis

    url = os.environ.get("TIDEWAITER_TEST_REDIS_URL", DEFAULT_TEST_REDIS)
    try:
        client = redis.Redis.from_url(url, socket_connect_timeout=2)
        client.flushdb()
        client.close()
    except Exception as exc:
        service_missing("Redis", exc)
    return url


def admin_token(settings: Settings) -> str | None:
    """A real API token of a new admin, when accounts exist."""
    try:
        from server.store import accounts
    except ImportError:
        return None
    from server.store import session_scope

    with session_scope(settings) as session:
        user = accounts.create_user(session, "test admin", accounts.Role.admin)
        _token, plaintext = accounts.create_token(session, user, "tests")
    return plaintext


def stored_intake(
    session: Any, store: Any, content: bytes, *, supplier: Any, name: str, **fields: Any
) -> Any:
    """An intake row for ``content``, stored in ``store`` as an upload would be, no job run."""
    from server.store import Intake

    stored = store.store_chunks([content])
    intake = Intake(
        supplier=supplier,
        original_name=name,
        file_key=stored.key,
        sha256=stored.sha256,
        bytes=stored.bytes,
        **fields,
    )
    session.add(intake)
    session.flush()
    return intake
