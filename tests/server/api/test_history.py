"""/api/v1/history on SQLite and PostgreSQL: timeline, column figures, suppliers, side by side."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from tests.server.api.reviews_support import client_on, crates_csv, deliver, new_supplier


@pytest.fixture
def api(database_url: str, tmp_path: Path):
    with client_on(database_url, tmp_path) as (client, _settings):
        yield client


def _two_suppliers(api):
    weighers = new_supplier(api)
    cold = new_supplier(api, "Saltmarsh cold store")
    a1 = deliver(api, weighers["id"], crates_csv(1, stand_ins=12), "w1.csv")
    a2 = deliver(api, weighers["id"], crates_csv(2, stand_ins=15, rows=200), "w2.csv")
    b1 = deliver(api, cold["id"], crates_csv(3), "c1.csv")
    api.post(f"/api/v1/intakes/{a1['id']}/decisions", json={"verdict": "accepted"})
    api.post(
        f"/api/v1/intakes/{a2['id']}/decisions",
        json={"verdict": "rejected", "reason": "too many -999 weights"},
    )
    api.post(f"/api/v1/intakes/{b1['id']}/decisions", json={"verdict": "accepted"})
    return weighers, cold, a1, a2, b1


def test_timeline(api) -> None:
    weighers, _cold, a1, a2, _b1 = _two_suppliers(api)
    timeline = api.get(f"/api/v1/history/suppliers/{weighers['id']}/timeline").json()
    assert [e["intake_id"] for e in timeline] == [a1["id"], a2["id"]]
    assert [e["rows"] for e in timeline] == [300, 200]
    assert [e["decision"] for e in timeline] == ["accepted", "rejected"]
    assert all(e["score"] is not None and e["flags"]["warning"] >= 1 for e in timeline)


def test_column_figures_over_deliveries(api) -> None:
    weighers, _cold, a1, a2, _b1 = _two_suppliers(api)
    points = api.get(f"/api/v1/history/suppliers/{weighers['id']}/columns/weight_kg").json()
    assert [p["intake_id"] for p in points] == [a1["id"], a2["id"]]
    # Reference: numpy on the planted values (the mean includes the -999 stand-ins).
    rng = np.random.default_rng(1)
    weights = np.round(rng.normal(18.0, 2.0, 300), 2)
    weights[:12] = -999
    assert points[0]["mean"] == pytest.approx(float(weights.mean()), rel=1e-9)
    assert points[0]["kind"] == "numeric"
    grades = api.get(f"/api/v1/history/suppliers/{weighers['id']}/columns/grade").json()
    assert grades[0]["top_label_share"] == pytest.approx(0.25)
    assert api.get(f"/api/v1/history/suppliers/{weighers['id']}/columns/nope").status_code == 404


def test_supplier_comparison(api) -> None:
    weighers, cold, *_ = _two_suppliers(api)
    rows = {r["name"]: r for r in api.get("/api/v1/history/suppliers").json()}
    w = rows[weighers["name"]]
    assert w["deliveries"] == 2 and w["decided"] == 2 and w["accepted_share"] == 0.5
    assert "completeness.disguised-missing" in {f["code"] for f in w["recurring_flags"]}
    assert rows[cold["name"]]["accepted_share"] == 1.0
    assert rows[cold["name"]]["recurring_flags"] == []  # a single delivery recurs nothing
    only = api.get("/api/v1/history/suppliers", params={"supplier": cold["id"]}).json()
    assert [r["supplier_id"] for r in only] == [cold["id"]]


def test_side_by_side_across_suppliers(api) -> None:
    _weighers, cold, _a1, a2, b1 = _two_suppliers(api)
    both = api.get("/api/v1/history/compare", params={"a": a2["id"], "b": b1["id"]}).json()
    assert both["a"]["intake_id"] == a2["id"] and both["b"]["supplier"] == cold["name"]
    assert both["a"]["decision"] == "rejected"
    assert both["drift"]["volume"]["ratio"] == 1.5
    assert api.get("/api/v1/history/compare", params={"a": a2["id"], "b": 999}).status_code == 404
