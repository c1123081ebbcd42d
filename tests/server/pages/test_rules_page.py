"""The rules page through HTTP: the current version as YAML, versions, who may save."""

from __future__ import annotations

import html
from datetime import UTC, datetime

import yaml

from server.api.routes import history
from server.pages.rules import draft_order, rejudged_ids
from server.store.accounts import Role
from tests.server.api.reviews_support import crates_csv, token_for
from tests.support import make_supplier, upload, wait_for_intake


def test_rejudged_ids_keep_only_numbers() -> None:
    assert rejudged_ids("3,5, 8") == [3, 5, 8]
    assert rejudged_ids("3,<script>,x") == [3]
    assert rejudged_ids(None) == []


def test_admin_sees_the_editor_and_versions_viewer_reads_only(client, app_settings) -> None:
    supplier = make_supplier(client, "Crate weighing shed")
    answer = upload(client, crates_csv(1), supplier=supplier["id"], name="crates-1.csv")
    assert answer.status_code == 201, answer.text
    intake = wait_for_intake(client, answer.json()["id"])["id"]
    url = f"/suppliers/{supplier['id']}/rules"

    empty = client.get(url)
    assert empty.status_code == 200
    assert "No rules yet" in empty.text
    assert f'<option value="{intake}">' in empty.text  # the intake to draft from

    label = "<b>bold</b>"  # a label as a partner file might send it
    document = {"columns": {"grade": {"allowed_labels": ["A", label]}}}
    for note in ("first", "second"):
        saved = client.put(f"/api/v1{url}", json={"document": document, "note": note})
        assert saved.status_code == 201, saved.text
    page = client.get(url, params={"saved": 2, "rejudged": f"{intake}"})
    assert page.status_code == 200
    assert "Version 2" in page.text
    assert "Version 2 saved." in page.text
    assert f'href="/intakes/{intake}"' in page.text
    assert "version 1" in page.text and "version 2" in page.text
    assert 'id="save-button"' in page.text
    assert label not in page.text  # escaped, never markup
    start = page.text.index('id="rules-text"')
    area = page.text[page.text.index(">", start) + 1 : page.text.index("</textarea>", start)]
    assert yaml.safe_load(html.unescape(area)) == document

    earlier = client.get(url, params={"version": 1})
    assert "an earlier version" in earlier.text and "first" in earlier.text
    assert f'href="{url}?version=2"' in earlier.text

    viewer = token_for(app_settings, "shed viewer", Role.viewer)
    read_only = client.get(url, headers={"Authorization": f"Bearer {viewer}"})
    assert read_only.status_code == 200
    assert "Version 2" in read_only.text
    assert 'id="save-button"' not in read_only.text
    assert "readonly" in read_only.text


def test_unknown_supplier_is_not_found(client) -> None:
    assert client.get("/suppliers/999/rules").status_code == 404


def _entry(intake: int, day: int, status: str = "ready", decision: str | None = None):
    return history.TimelineEntry(
        intake_id=intake,
        name=f"d{intake}.csv",
        delivered_at=datetime(2031, 3, day, tzinfo=UTC),
        status=status,
        rows=10,
        score=90,
        flags={},
        suggested_verdict=None,
        decision=decision,
        rules_version=None,
    )


def test_drafts_offer_accepted_intakes_first_then_newest_and_only_profiled_ones() -> None:
    entries = [
        _entry(1, 1, decision="accepted"),
        _entry(2, 2, decision="rejected"),
        _entry(3, 3),
        _entry(4, 4, status="failed"),
        _entry(5, 5, decision="accepted"),
    ]
    assert [e.intake_id for e in draft_order(entries)] == [5, 1, 3, 2]
