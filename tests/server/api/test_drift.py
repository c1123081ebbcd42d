"""/api/v1/intakes/{id}/drift on SQLite and PostgreSQL."""

from __future__ import annotations

from pathlib import Path

import pytest

from tests.server.api.reviews_support import client_on, crates_csv, deliver, new_supplier


@pytest.fixture
def api(database_url: str, tmp_path: Path):
    with client_on(database_url, tmp_path) as (client, _settings):
        yield client


def test_without_an_accepted_delivery_there_is_no_baseline(api) -> None:
    intake = deliver(api, new_supplier(api)["id"], crates_csv(1), "w1.csv")
    answer = api.get(f"/api/v1/intakes/{intake['id']}/drift")
    assert answer.status_code == 404 and answer.json()["code"] == "no_baseline"


def test_drift_against_the_default_and_a_chosen_baseline(api) -> None:
    supplier = new_supplier(api)
    first = deliver(api, supplier["id"], crates_csv(2), "w2.csv")
    api.post(f"/api/v1/intakes/{first['id']}/decisions", json={"verdict": "accepted"})
    second = deliver(api, supplier["id"], crates_csv(3, rows=120, shift=3.0), "w3.csv")
    drift = api.get(f"/api/v1/intakes/{second['id']}/drift").json()
    assert drift["baseline"]["intake_id"] == first["id"]
    assert drift["volume"] == {"rows_baseline": 300, "rows_target": 120, "ratio": 0.4}
    weight = next(c for c in drift["columns"] if c["name"] == "weight_kg")
    assert weight["mean_shift_sd"] > 1.0
    codes = {f["code"] for f in drift["flags"]}
    assert {"stability.volume-change", "stability.distribution-shift"} <= codes

    third = deliver(api, supplier["id"], crates_csv(4), "w4.csv")
    chosen = api.get(f"/api/v1/intakes/{third['id']}/drift", params={"baseline": second["id"]})
    assert chosen.json()["baseline"]["intake_id"] == second["id"]
    missing = api.get(f"/api/v1/intakes/{third['id']}/drift", params={"baseline": 999999})
    assert missing.status_code == 404


def test_the_suppliers_rules_may_change_the_thresholds(api) -> None:
    supplier = new_supplier(api)
    first = deliver(api, supplier["id"], crates_csv(5), "w5.csv")
    second = deliver(api, supplier["id"], crates_csv(6, rows=120), "w6.csv")
    url = f"/api/v1/intakes/{second['id']}/drift"
    params = {"baseline": first["id"]}
    assert "stability.volume-change" in {
        f["code"] for f in api.get(url, params=params).json()["flags"]
    }
    rules = {"thresholds": {"volume_change": 0.9}}  # this supplier's volume varies a lot
    assert (
        api.put(f"/api/v1/suppliers/{supplier['id']}/rules", json={"document": rules}).status_code
        == 201
    )
    codes = {f["code"] for f in api.get(url, params=params).json()["flags"]}
    assert "stability.volume-change" not in codes
