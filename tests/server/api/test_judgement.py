"""/api/v1/intakes/{id}/judgement and /baseline, on SQLite and PostgreSQL."""

from __future__ import annotations

from pathlib import Path

import pytest

from tests.server.api.reviews_support import client_on, crates_csv, deliver, new_supplier


@pytest.fixture
def api(database_url: str, tmp_path: Path):
    with client_on(database_url, tmp_path) as (client, _settings):
        yield client


def test_every_intake_is_judged_after_profiling(api) -> None:
    supplier = new_supplier(api)
    intake = deliver(api, supplier["id"], crates_csv(1, stand_ins=15), "week-01.csv")
    judgement = api.get(f"/api/v1/intakes/{intake['id']}/judgement").json()
    assert judgement["rules_version"] is None and judgement["baseline_intake_id"] is None
    assert judgement["suggested_verdict"] == "review"  # no rules: a person must judge
    codes = {f["code"] for f in judgement["flags"]}
    assert "completeness.disguised-missing" in codes  # 15 of 300 weights are -999
    assert judgement["counts"]["warning"] >= 1
    # The profile document carries the same judgement.
    profile = api.get(f"/api/v1/intakes/{intake['id']}/profile").json()
    assert [f["code"] for f in profile["flags"]] == [f["code"] for f in judgement["flags"]]
    assert profile["score"]["overall"] == judgement["overall_score"]


def test_rejudging_uses_the_new_rules_version(api) -> None:
    supplier = new_supplier(api)
    intake = deliver(api, supplier["id"], crates_csv(2), "week-02.csv")
    rules = {"columns": {"weight_kg": {"kind": "numeric", "max": 20}}}
    assert (
        api.put(f"/api/v1/suppliers/{supplier['id']}/rules", json={"document": rules}).status_code
        == 201
    )
    judgement = api.post(f"/api/v1/intakes/{intake['id']}/judgement").json()
    assert judgement["rules_version"] == 1
    broken = [r for r in judgement["rule_results"] if not r["passed"]]
    assert [r["rule"] for r in broken] == ["columns.weight_kg.max"]
    assert "validity.rule-broken" in {f["code"] for f in judgement["flags"]}
    assert judgement["score"]["dimensions"]["conformance"] == 66  # 2 of 3 rules kept


def test_the_last_accepted_intake_is_the_default_baseline(api) -> None:
    supplier = new_supplier(api)
    first = deliver(api, supplier["id"], crates_csv(3), "week-03.csv")
    answer = api.post(f"/api/v1/intakes/{first['id']}/decisions", json={"verdict": "accepted"})
    assert answer.status_code == 201, answer.text
    second = deliver(api, supplier["id"], crates_csv(4, shift=4.0), "week-04.csv")
    judgement = api.get(f"/api/v1/intakes/{second['id']}/judgement").json()
    assert judgement["baseline_intake_id"] == first["id"]
    assert judgement["baseline_chosen"] is False
    shift = [f for f in judgement["flags"] if f["code"] == "stability.distribution-shift"]
    assert shift and shift[0]["columns"] == ["weight_kg"]  # two SD heavier
    assert judgement["score"]["dimensions"]["stability"] is not None


def test_choosing_a_baseline(api) -> None:
    supplier = new_supplier(api)
    other = new_supplier(api, "Saltmarsh cold store")
    first = deliver(api, supplier["id"], crates_csv(5), "a.csv")
    foreign = deliver(api, other["id"], crates_csv(6, rows=100), "b.csv")
    url = f"/api/v1/intakes/{first['id']}/baseline"
    judgement = api.put(url, json={"intake_id": foreign["id"]}).json()
    assert judgement["baseline_intake_id"] == foreign["id"] and judgement["baseline_chosen"]
    assert "stability.volume-change" in {f["code"] for f in judgement["flags"]}
    # The choice stays when judging again, until it is cleared.
    again = api.post(f"/api/v1/intakes/{first['id']}/judgement").json()
    assert again["baseline_intake_id"] == foreign["id"]
    cleared = api.put(url, json={"intake_id": None}).json()
    assert cleared["baseline_intake_id"] is None and not cleared["baseline_chosen"]
    assert api.put(url, json={"intake_id": first["id"]}).status_code == 422
    assert api.put(url, json={"intake_id": 999999}).status_code == 404


def test_unknown_intake_is_404(api) -> None:
    answer = api.get("/api/v1/intakes/424242/judgement")
    assert answer.status_code == 404 and answer.json()["code"] == "not_found"


def test_accepting_an_earlier_delivery_judges_later_ones_again(api) -> None:
    supplier = new_supplier(api)
    first = deliver(api, supplier["id"], crates_csv(7), "week-07.csv")
    second = deliver(api, supplier["id"], crates_csv(8, shift=4.0), "week-08.csv")
    url = f"/api/v1/intakes/{second['id']}/judgement"
    assert api.get(url).json()["baseline_intake_id"] is None  # nothing accepted yet
    api.post(f"/api/v1/intakes/{first['id']}/decisions", json={"verdict": "accepted"})
    judgement = api.get(url).json()
    assert judgement["baseline_intake_id"] == first["id"]
    assert "stability.distribution-shift" in {f["code"] for f in judgement["flags"]}
    api.post(
        f"/api/v1/intakes/{first['id']}/decisions",
        json={"verdict": "rejected", "reason": "the scale was miscalibrated"},
    )
    assert api.get(url).json()["baseline_intake_id"] is None


def test_an_intake_past_the_rejudge_cap_is_judged_by_the_new_rules_when_asked_for(
    api, monkeypatch: pytest.MonkeyPatch
) -> None:
    from worker.jobs import judging

    monkeypatch.setattr(judging, "REJUDGE_MAX", 1)
    supplier = new_supplier(api)
    older = deliver(api, supplier["id"], crates_csv(5), "week-05.csv")
    newer = deliver(api, supplier["id"], crates_csv(6), "week-06.csv")
    rules = {"columns": {"weight_kg": {"kind": "numeric", "max": 20}}}
    saved = api.put(f"/api/v1/suppliers/{supplier['id']}/rules", json={"document": rules})
    assert saved.json()["rejudged"] == [newer["id"]]  # the cap: only the newest at once
    judgement = api.get(f"/api/v1/intakes/{older['id']}/judgement").json()
    assert judgement["rules_version"] == 1  # caught up on the way out
    assert "validity.rule-broken" in {f["code"] for f in judgement["flags"]}
