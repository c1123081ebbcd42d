"""Supplier rules through the API on SQLite and PostgreSQL: versions, validation, drafts."""

from __future__ import annotations

from pathlib import Path

import pytest
import yaml

from server.store.accounts import Role
from tests.server.api.reviews_support import (
    client_on,
    crates_csv,
    deliver,
    new_supplier,
    token_for,
)

RULES_YAML = """
rows: {min: 100}
columns:
  crate_id: {kind: identifier, unique: true}
  weight_kg: {kind: numeric, min: 0, max: 40}
  grade: {allowed_labels: [A, B, C, D]}
"""


@pytest.fixture
def api(database_url: str, tmp_path: Path):
    with client_on(database_url, tmp_path) as pair:
        yield pair


def test_versions_are_kept(api) -> None:
    client, _settings = api
    supplier = new_supplier(client)
    url = f"/api/v1/suppliers/{supplier['id']}/rules"
    assert client.get(url).status_code == 404
    first = client.put(url, json={"document": RULES_YAML, "note": "first draft"})
    assert first.status_code == 201, first.text
    assert first.json()["version"] == 1
    assert first.json()["document"]["columns"]["weight_kg"]["max"] == 40
    second = client.put(url, json={"document": {"rows": {"min": 50}}})
    assert second.json()["version"] == 2
    assert client.get(url).json()["version"] == 2
    versions = client.get(f"{url}/versions").json()
    assert [v["version"] for v in versions] == [2, 1]
    assert client.get(f"{url}/versions/1").json()["note"] == "first draft"
    assert client.get(f"{url}/versions/7").status_code == 404


def test_mistakes_are_listed_with_their_paths(api) -> None:
    client, _settings = api
    supplier = new_supplier(client)
    bad = {"columns": {"weight_kg": {"min": "light", "colour": "red"}}}
    answer = client.put(f"/api/v1/suppliers/{supplier['id']}/rules", json={"document": bad})
    assert answer.status_code == 422
    body = answer.json()
    assert body["code"] == "invalid_rules"
    paths = {p["path"] for p in body["problems"]}
    assert paths == {"columns.weight_kg.min", "columns.weight_kg.colour"}
    check = client.post("/api/v1/rules/validate", json={"document": bad}).json()
    assert check["valid"] is False and len(check["problems"]) == 2
    good = client.post("/api/v1/rules/validate", json={"document": RULES_YAML}).json()
    assert good["valid"] is True and good["document"]["rows"] == {"min": 100}


def test_only_admins_save_rules(api) -> None:
    client, settings = api
    supplier = new_supplier(client)
    reviewer = token_for(settings, "dock reviewer", Role.reviewer)
    answer = client.put(
        f"/api/v1/suppliers/{supplier['id']}/rules",
        json={"document": RULES_YAML},
        headers={"Authorization": f"Bearer {reviewer}"},
    )
    assert answer.status_code == 403


def test_draft_from_an_intake_saves_and_is_kept(api) -> None:
    client, _settings = api
    supplier = new_supplier(client)
    intake = deliver(client, supplier["id"], crates_csv(7), "week-07.csv")
    draft = client.get(f"/api/v1/intakes/{intake['id']}/rules-draft").json()
    assert draft["document"]["columns"]["grade"]["allowed_labels"] == ["A", "B", "C", "D"]
    assert yaml.safe_load(draft["yaml"]) == draft["document"]
    saved = client.put(
        f"/api/v1/suppliers/{supplier['id']}/rules", json={"document": draft["yaml"]}
    )
    assert saved.status_code == 201, saved.text
    judgement = client.post(f"/api/v1/intakes/{intake['id']}/judgement").json()
    assert judgement["rules_version"] == 1
    assert all(r["passed"] for r in judgement["rule_results"])
    assert judgement["score"]["dimensions"]["conformance"] == 100


def test_saving_rules_judges_the_undecided_intakes_again(api) -> None:
    client, _settings = api
    supplier = new_supplier(client)
    decided = deliver(client, supplier["id"], crates_csv(8), "week-08.csv")
    waiting = deliver(client, supplier["id"], crates_csv(9), "week-09.csv")
    accepted = client.post(
        f"/api/v1/intakes/{decided['id']}/decisions", json={"verdict": "accepted"}
    )
    assert accepted.status_code == 201, accepted.text
    # Weights are about 18 kg, so a maximum of 10 kg is broken by both deliveries.
    strict = {"columns": {"weight_kg": {"max": 10}}}
    url = f"/api/v1/suppliers/{supplier['id']}/rules"
    saved = client.put(url, json={"document": strict})
    assert saved.status_code == 201, saved.text
    assert saved.json()["rejudged"] == [waiting["id"]]
    now = client.get(f"/api/v1/intakes/{waiting['id']}/judgement").json()
    assert now["rules_version"] == 1
    assert "columns.weight_kg.max" in {r["rule"] for r in now["rule_results"] if not r["passed"]}
    kept = client.get(f"/api/v1/intakes/{decided['id']}/judgement").json()
    assert kept["rules_version"] is None  # judged before any rules; its decision stands on that
    # Asked not to, saving leaves the judgements as they were.
    again = client.put(f"{url}?rejudge=false", json={"document": {"rows": {"min": 1}}})
    assert again.status_code == 201 and again.json()["rejudged"] == []
    assert client.get(f"/api/v1/intakes/{waiting['id']}/judgement").json()["rules_version"] == 1
