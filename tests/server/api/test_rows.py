"""/api/v1/intakes/{id}/rows: a bounded preview of delivered rows, personal cells masked."""

from __future__ import annotations

import io

import pandas as pd

from tests.server.api.accounts_support import add_user, bearer
from tests.support import make_supplier, upload, wait_for_intake

# Invented crew roster; addresses in the documentation domain.
ROSTER = b"crew_id,contact,shift\n" + b"".join(
    f"{i},person{i}@example.org,{'early' if i % 2 else 'late'}\n".encode() for i in range(1, 41)
)


def _ready(client) -> int:
    supplier = make_supplier(client)
    created = upload(client, ROSTER, supplier=supplier["name"], name="roster.csv").json()
    assert wait_for_intake(client, created["id"])["status"] == "ready"
    return created["id"]


def test_a_preview_shows_rows_as_delivered_with_personal_cells_masked(client) -> None:
    intake_id = _ready(client)
    answer = client.get(f"/api/v1/intakes/{intake_id}/rows?n=5")
    assert answer.status_code == 200, answer.text
    body = answer.json()
    assert body["masked"] == ["contact"]
    assert len(body["rows"]) == 5
    frame = pd.read_csv(io.BytesIO(ROSTER), dtype=str)  # reference: pandas reads the same rows
    for row in body["rows"]:
        expected = frame.iloc[row["row"]]
        assert row["values"]["crew_id"] == expected["crew_id"]
        assert row["values"]["shift"] == expected["shift"]
        assert row["values"]["contact"] == "p***@e***.org"
    assert "example.org" not in answer.text


def test_a_filter_on_an_ordinary_column_narrows_the_rows(client) -> None:
    intake_id = _ready(client)
    body = client.get(
        f"/api/v1/intakes/{intake_id}/rows?n=50&where_column=shift&where_value=early"
    ).json()
    assert len(body["rows"]) == 20 and {r["values"]["shift"] for r in body["rows"]} == {"early"}


def test_a_filter_on_a_personal_column_is_refused_until_unmasked(client) -> None:
    intake_id = _ready(client)
    url = f"/api/v1/intakes/{intake_id}/rows?where_column=contact&where_value=person3@example.org"
    refused = client.get(url)
    assert refused.status_code == 403 and refused.json()["code"] == "masked"
    client.put(f"/api/v1/intakes/{intake_id}/unmasking", json={"unmasked": True})
    shown = client.get(url).json()
    assert [r["values"]["contact"] for r in shown["rows"]] == ["person3@example.org"]
    assert shown["masked"] == []


def test_more_rows_than_the_limit_is_a_plain_error(client, app_settings) -> None:
    intake_id = _ready(client)
    limit = app_settings.security.preview_rows_limit
    answer = client.get(f"/api/v1/intakes/{intake_id}/rows?n={limit + 1}")
    assert answer.status_code == 422 and answer.json()["code"] == "too_many_rows"
    assert f"at most {limit} rows" in answer.json()["detail"]


def test_previews_are_audited_and_viewers_may_look(client, app_settings) -> None:
    intake_id = _ready(client)
    viewer = bearer(add_user(app_settings, "vera", "viewer"))
    assert client.get(f"/api/v1/intakes/{intake_id}/rows", headers=viewer).status_code == 200
    events = client.get("/api/v1/audit?action=download").json()
    assert events[0]["actor"] == "vera" and events[0]["target"].endswith("/rows")
