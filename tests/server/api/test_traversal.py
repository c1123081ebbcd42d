"""Path traversal in any part of a request is refused before a route runs (OWASP Path
Traversal: dot-dot sequences, their encoded forms, NUL bytes)."""

from __future__ import annotations

import pytest

from tests.support import make_supplier


@pytest.mark.parametrize(
    "url",
    [
        "/static/%2e%2e/%2e%2e/pyproject.toml",
        "/static/vendor/%2E%2E/%2E%2E/%2E%2E/server/settings.py",
        "/api/v1/intakes/1/labels?column=../../etc/passwd",
        "/api/v1/intakes?supplier=..%5C..%5Cboot.ini",
        "/api/v1/intakes?supplier=north%00.csv",
        "/intakes/1?next=../../../etc/passwd",
    ],
)
def test_traversal_is_refused_everywhere(client, url: str) -> None:
    answer = client.get(url)
    assert answer.status_code == 400, (url, answer.status_code)
    assert answer.json()["detail"] == "path traversal is not allowed in a request"
    assert "TIDEWAITER_" not in answer.text and "[project]" not in answer.text
    assert answer.headers["x-content-type-options"] == "nosniff"


def test_ordinary_requests_pass(client) -> None:
    make_supplier(client, "Saltmarsh v1..2 buoys")
    assert client.get("/api/v1/suppliers?note=v1..2").status_code == 200
    assert client.get("/api/v1/suppliers").json()[0]["name"] == "Saltmarsh v1..2 buoys"
    assert client.get("/static/tidewaiter.css").status_code == 200
