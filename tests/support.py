"""Helpers for tests that drive the service."""

from __future__ import annotations

import time
from typing import Any

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
