"""/healthz: database, queue and storage, each with its state."""

from __future__ import annotations

from fastapi.testclient import TestClient

from server.app import create_app
from tests.conftest import make_settings


def test_healthy_embedded_service(anonymous_client) -> None:
    answer = anonymous_client.get("/healthz")
    assert answer.status_code == 200
    body = answer.json()
    assert body["status"] == "ok"
    assert body["checks"]["database"]["state"] == "ok"
    assert body["checks"]["queue"] == {"state": "ok", "runner": "inprocess", "threads": 2}
    assert body["checks"]["storage"]["free_bytes"] > 0


def test_unmigrated_database_is_reported_outdated(tmp_path) -> None:
    settings = make_settings(tmp_path / "data")
    with TestClient(create_app(settings)) as client:
        answer = client.get("/healthz")
    assert answer.status_code == 503
    database = answer.json()["checks"]["database"]
    assert database["state"] == "outdated"
    assert "tidewaiter db upgrade" in database["detail"]


def test_unreachable_queue_and_database_are_reported_down(tmp_path) -> None:
    settings = make_settings(
        tmp_path / "data",
        database_url="postgresql+psycopg://nobody@127.0.0.1:1/none",
        job_runner="celery",
        redis_url="redis://127.0.0.1:1/0",
    )
    with TestClient(create_app(settings)) as client:
        answer = client.get("/healthz")
    assert answer.status_code == 503
    checks = answer.json()["checks"]
    assert checks["database"]["state"] == "down"
    assert checks["queue"]["state"] == "down"
    assert checks["storage"]["state"] == "ok"
