"""Comment threads through the API on SQLite and PostgreSQL."""

from __future__ import annotations

from pathlib import Path

import pytest

from server.store.accounts import Role
from tests.server.api.reviews_support import (
    client_on,
    crates_csv,
    deliver,
    new_supplier,
    token_for,
)


@pytest.fixture
def api(database_url: str, tmp_path: Path):
    with client_on(database_url, tmp_path) as pair:
        yield pair


def test_post_reply_edit_resolve_reopen(api) -> None:
    client, settings = api
    intake = deliver(client, new_supplier(client)["id"], crates_csv(1, stand_ins=12), "w1.csv")
    started = client.post(
        f"/api/v1/intakes/{intake['id']}/threads",
        json={
            "column": "weight_kg",
            "flag_code": "completeness.disguised-missing",
            "body": "Is -999 their code for a broken scale?",
        },
    )
    assert started.status_code == 201, started.text
    thread = started.json()
    assert thread["status"] == "open" and thread["created_by"] == "desk admin"
    assert thread["discussed_before"] is None

    reviewer = {"Authorization": f"Bearer {token_for(settings, 'quay reviewer', Role.reviewer)}"}
    replied = client.post(
        f"/api/v1/threads/{thread['id']}/comments",
        json={"body": "Yes, scale 3 was out of order."},
        headers=reviewer,
    )
    assert replied.status_code == 201
    comments = replied.json()["comments"]
    assert [c["author"] for c in comments] == ["desk admin", "quay reviewer"]

    mine, theirs = comments[0]["id"], comments[1]["id"]
    edited = client.patch(f"/api/v1/comments/{mine}", json={"body": "Is -999 a broken scale?"})
    assert edited.status_code == 200 and edited.json()["edited_at"] is not None
    assert client.patch(f"/api/v1/comments/{theirs}", json={"body": "no"}).status_code == 403

    resolved = client.post(f"/api/v1/threads/{thread['id']}/resolve").json()
    assert resolved["status"] == "resolved" and resolved["resolved_by"] == "desk admin"
    reopened = client.post(f"/api/v1/threads/{thread['id']}/reopen").json()
    assert reopened["status"] == "open" and reopened["resolved_at"] is None


def test_a_recurring_flag_links_the_earlier_thread(api) -> None:
    client, _settings = api
    supplier = new_supplier(client)
    first = deliver(client, supplier["id"], crates_csv(2, stand_ins=12), "w2.csv")
    earlier = client.post(
        f"/api/v1/intakes/{first['id']}/threads",
        json={"column": "weight_kg", "flag_code": "completeness.disguised-missing",
              "body": "Scale 3 writes -999 when it is offline."},
    ).json()  # fmt: skip
    second = deliver(client, supplier["id"], crates_csv(3, stand_ins=20), "w3.csv")
    listing = client.get(f"/api/v1/intakes/{second['id']}/threads").json()
    (found,) = [d for d in listing["discussed_before"] if d["column"] == "weight_kg"]
    assert found["flag_code"] == "completeness.disguised-missing"
    assert found["earlier"]["thread_id"] == earlier["id"]
    assert found["earlier"]["last_comment"] == "Scale 3 writes -999 when it is offline."
    new = client.post(
        f"/api/v1/intakes/{second['id']}/threads",
        json={"column": "weight_kg", "flag_code": "completeness.disguised-missing",
              "body": "Again scale 3."},
    ).json()  # fmt: skip
    assert new["discussed_before"]["intake_id"] == first["id"]
    # Another supplier's intake does not see this supplier's threads.
    other = deliver(client, new_supplier(client, "Saltmarsh")["id"], crates_csv(4, stand_ins=12),
                    "s.csv")  # fmt: skip
    assert client.get(f"/api/v1/intakes/{other['id']}/threads").json()["discussed_before"] == []


def test_bad_targets_are_422(api) -> None:
    client, _settings = api
    intake = deliver(client, new_supplier(client)["id"], crates_csv(5), "w5.csv")
    url = f"/api/v1/intakes/{intake['id']}/threads"
    answer = client.post(url, json={"column": "colour", "body": "?"})
    assert answer.status_code == 422 and answer.json()["code"] == "unknown_column"
    answer = client.post(url, json={"flag_code": "made.up", "body": "?"})
    assert answer.status_code == 422 and answer.json()["code"] == "unknown_flag_code"
    empty = client.post(url, json={"body": ""})
    assert empty.status_code == 422
    assert [e["field"] for e in empty.json()["errors"]] == ["body"]  # the field, by its name
    whole = client.post(url, json={"body": "Looks like last week's file."})
    assert whole.status_code == 201 and whole.json()["column"] is None
    assert client.post("/api/v1/threads/999999/resolve").status_code == 404
