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


def test_renamed_and_retyped_columns_keep_their_field_names(api) -> None:
    """The typed answer still says "schema" and "from", as the design notes' document does."""
    supplier = new_supplier(api)
    first = deliver(api, supplier["id"], crates_csv(5), "w5.csv")
    api.post(f"/api/v1/intakes/{first['id']}/decisions", json={"verdict": "accepted"})
    # Same crates, with weight_kg delivered as mass_kg and dock as a number.
    text = crates_csv(5).decode().replace("weight_kg", "mass_kg", 1)
    text = text.replace(",north", ",1").replace(",south", ",2")
    second = deliver(api, supplier["id"], text.encode(), "w6.csv")
    answer = api.get(f"/api/v1/intakes/{second['id']}/drift")
    assert answer.status_code == 200, answer.text
    schema = answer.json()["schema"]
    assert [(r["from"], r["to"]) for r in schema["renamed"]] == [("weight_kg", "mass_kg")]
    assert schema["kind_changed"] == [{"name": "dock", "from": "categorical", "to": "numeric"}]
    assert "from_" not in answer.text
