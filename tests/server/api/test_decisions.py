"""/api/v1/intakes/{id}/decisions on SQLite and PostgreSQL."""

from __future__ import annotations

from pathlib import Path

import pytest

from tests.server.api.reviews_support import client_on, crates_csv, deliver, new_supplier


@pytest.fixture
def api(database_url: str, tmp_path: Path):
    with client_on(database_url, tmp_path) as (client, _settings):
        yield client


def test_the_newest_decision_is_the_state_and_earlier_ones_stay(api) -> None:
    intake = deliver(api, new_supplier(api)["id"], crates_csv(1), "week-01.csv")
    url = f"/api/v1/intakes/{intake['id']}/decisions"
    empty = api.get(url).json()
    assert empty["current"] is None and empty["history"] == []
    assert empty["suggested_verdict"] == "review"

    first = api.post(url, json={"verdict": "accepted", "reason": ""})
    assert first.status_code == 201, first.text
    assert first.json()["decided_by"] == "desk admin"
    second = api.post(url, json={"verdict": "rejected", "reason": "dock column is swapped"})
    assert second.status_code == 201
    listing = api.get(url).json()
    assert listing["current"]["verdict"] == "rejected"
    assert [d["verdict"] for d in listing["history"]] == ["rejected", "accepted"]
    assert listing["current"]["reason"] == "dock column is swapped"
    assert listing["current"]["score"] is not None


@pytest.mark.parametrize("verdict", ["rejected", "accepted_with_caveats"])
def test_a_reason_is_needed_unless_accepting(api, verdict: str) -> None:
    intake = deliver(api, new_supplier(api)["id"], crates_csv(2), "week-02.csv")
    answer = api.post(
        f"/api/v1/intakes/{intake['id']}/decisions", json={"verdict": verdict, "reason": "  "}
    )
    assert answer.status_code == 422
    assert answer.json()["code"] == "reason_required"


def test_an_unknown_verdict_is_422(api) -> None:
    intake = deliver(api, new_supplier(api)["id"], crates_csv(3), "week-03.csv")
    answer = api.post(f"/api/v1/intakes/{intake['id']}/decisions", json={"verdict": "maybe"})
    assert answer.status_code == 422
    assert answer.json()["code"] == "invalid_request"
