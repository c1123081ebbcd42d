"""A signed-in client on a migrated SQLite or PostgreSQL database, and invented deliveries.

The deliveries are crate-weighing files of an invented harbour supplier,
written by the tests; their faults are planted, so the truth is known.
"""

from __future__ import annotations

import csv
import io
import time
from collections.abc import Iterator
from contextlib import contextmanager
from pathlib import Path
from typing import Any

import numpy as np
from fastapi.testclient import TestClient

from server.app import create_app
from server.settings import Settings
from server.store import dispose_engines, schema, session_scope
from server.store.accounts import Role, create_token, create_user
from tests.conftest import make_settings
from tests.support import make_supplier, upload, wait_for_intake
from worker.jobs.inprocess import runner_for


@contextmanager
def client_on(database_url: str, tmp_path: Path) -> Iterator[tuple[TestClient, Settings]]:
    """A TestClient of a fresh app on ``database_url`` (migrated), signed in as an admin."""
    schema.upgrade(database_url)
    dispose_engines()
    settings = make_settings(tmp_path / "data", database_url=database_url)
    with TestClient(create_app(settings)) as client:
        client.headers["Authorization"] = f"Bearer {token_for(settings, 'desk admin', Role.admin)}"
        yield client, settings
        runner_for(settings).wait_idle(timeout=60)
    dispose_engines()


def token_for(settings: Settings, name: str, role: Role) -> str:
    """A real API token of a new user with ``role``."""
    with session_scope(settings) as session:
        user = create_user(session, name, role)
        _token, plaintext = create_token(session, user, "tests")
    return plaintext


def crates_csv(seed: int, rows: int = 300, *, shift: float = 0.0, stand_ins: int = 0) -> bytes:
    """A crate-weighing delivery: key, weight, grade, dock; ``stand_ins`` weights are -999."""
    rng = np.random.default_rng(seed)
    weights = np.round(rng.normal(18.0 + shift, 2.0, rows), 2)
    docks = rng.permutation(["north", "south"] * (rows // 2) + ["north"] * (rows % 2))
    out = io.StringIO()
    writer = csv.writer(out)
    writer.writerow(["crate_id", "weight_kg", "grade", "dock"])
    for i in range(rows):
        weight = "-999" if i < stand_ins else f"{weights[i]:.2f}"
        writer.writerow([f"CR-{seed:02d}-{i:05d}", weight, "ABCD"[i % 4], docks[i]])
    return out.getvalue().encode()


def deliver(client: TestClient, supplier: Any, content: bytes, name: str) -> dict[str, Any]:
    """Upload a delivery and wait until it is profiled and judged."""
    answer = upload(client, content, supplier=supplier, name=name)
    assert answer.status_code == 201, answer.text
    intake = wait_for_intake(client, answer.json()["id"])
    assert intake["status"] == "ready", intake.get("error")
    wait_for_judgement(client, intake["id"])
    return intake


def wait_for_judgement(client: TestClient, intake_id: int, timeout: float = 30.0) -> dict:
    """Poll the judgement, which the job stores right after marking the intake ready."""
    deadline = time.monotonic() + timeout
    while True:
        answer = client.get(f"/api/v1/intakes/{intake_id}/judgement")
        if answer.status_code == 200:
            return answer.json()
        assert answer.status_code == 404, answer.text
        if time.monotonic() > deadline:
            raise AssertionError(f"intake {intake_id} not judged after {timeout} s")
        time.sleep(0.05)


def new_supplier(client: TestClient, name: str = "Brackwater crate weighers") -> dict[str, Any]:
    """A supplier created through the API."""
    return make_supplier(client, name)
