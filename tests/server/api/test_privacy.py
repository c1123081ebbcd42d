"""Personal data through the API: masked by default, unmasked by an admin (audited),
and an intake deleted entirely; uploads and downloads land in the audit log."""

from __future__ import annotations

from server.settings import Settings
from server.store import Intake, session_scope
from tests.server.api.accounts_support import add_user, bearer
from tests.support import make_supplier, upload, wait_for_intake

# Invented contacts of a field crew; the addresses use the documentation domain and the
# phone numbers the drama range of the UK numbering plan (both reserved for examples).
CONTACTS = (
    b"crew_id,contact,phone,shift,reported_by\n"
    b"1,ada.marsh@example.org,+44 20 7946 0958,early,lead.one@example.org\n"
    b"2,bo.reed@example.org,+44 20 7946 0959,late,lead.two@example.org\n"
    b"3,cy.wren@example.net,+44 20 7946 0960,early,lead.one@example.org\n"
    b"4,di.teal@example.org,+44 20 7946 0961,late,lead.one@example.org\n"
)


def _ready_intake(client) -> int:
    supplier = make_supplier(client)
    created = upload(client, CONTACTS, supplier=supplier["name"], name="crew.csv").json()
    assert wait_for_intake(client, created["id"])["status"] == "ready"
    return created["id"]


def test_personal_columns_are_flagged_and_masked(client, app_settings: Settings) -> None:
    intake_id = _ready_intake(client)
    answer = client.get(f"/api/v1/intakes/{intake_id}/profile")
    text = answer.text
    assert "example.org" not in text and "7946 0958" not in text
    profile = answer.json()
    contact = next(c for c in profile["columns"] if c["name"] == "contact")
    assert contact["personal"]["kind"] == "email" and contact["personal"]["share"] == 1.0
    assert set(profile["masked"]) == {"contact", "phone", "reported_by"}
    flagged = {f["columns"][0] for f in profile["flags"] if f["code"] == "privacy.personal-data"}
    assert flagged == {"contact", "phone", "reported_by"}
    leads = next(c for c in profile["columns"] if c["name"] == "reported_by")
    assert [(t["value"], t["count"]) for t in leads["labels"]["top"]] == [
        ("l***@e***.org", 3),
        ("l***@e***.org", 1),
    ]
    shift = next(c for c in profile["columns"] if c["name"] == "shift")
    assert {t["value"] for t in shift["labels"]["top"]} == {"early", "late"}  # not personal


def test_an_admin_unmasks_an_intake_and_it_is_audited(client, app_settings) -> None:
    intake_id = _ready_intake(client)
    reviewer = bearer(add_user(app_settings, "rui", "reviewer"))
    refused = client.put(
        f"/api/v1/intakes/{intake_id}/unmasking", json={"unmasked": True}, headers=reviewer
    )
    assert refused.status_code == 403
    answer = client.put(f"/api/v1/intakes/{intake_id}/unmasking", json={"unmasked": True})
    assert answer.status_code == 200 and answer.json() == {"intake_id": intake_id, "unmasked": True}
    shown = client.get(f"/api/v1/intakes/{intake_id}/profile", headers=reviewer).json()
    assert "masked" not in shown
    leads = next(c for c in shown["columns"] if c["name"] == "reported_by")
    assert leads["labels"]["top"][0]["value"] == "lead.one@example.org"
    client.put(f"/api/v1/intakes/{intake_id}/unmasking", json={"unmasked": False})
    assert "masked" in client.get(f"/api/v1/intakes/{intake_id}/profile").json()
    actions = [e["action"] for e in client.get("/api/v1/audit").json()]
    assert actions.index("mask") < actions.index("unmask")  # newest first


def test_uploads_and_downloads_are_audited(client, app_settings) -> None:
    intake_id = _ready_intake(client)
    assert client.get(f"/api/v1/intakes/{intake_id}/file").status_code == 200
    events = client.get("/api/v1/audit").json()
    by_action = {e["action"]: e for e in events}
    assert by_action["upload"]["target"] == "/api/v1/intakes"
    assert by_action["download"]["target"] == f"/api/v1/intakes/{intake_id}/file"
    assert by_action["download"]["actor"] == "test admin"
    assert by_action["supplier-change"]["detail"]["method"] == "POST"


def test_a_refused_change_is_not_audited_as_done(client, app_settings) -> None:
    viewer = bearer(add_user(app_settings, "vera", "viewer"))
    client.post("/api/v1/suppliers", json={"name": "Kelp survey"}, headers=viewer)
    assert "supplier-change" not in [e["action"] for e in client.get("/api/v1/audit").json()]


def test_an_admin_deletes_an_intake_entirely(client, app_settings) -> None:
    intake_id = _ready_intake(client)
    files = [p for p in (app_settings.data_dir / "files").rglob("*") if p.is_file()]
    assert files
    reviewer = bearer(add_user(app_settings, "rui", "reviewer"))
    assert client.delete(f"/api/v1/intakes/{intake_id}", headers=reviewer).status_code == 403
    assert client.delete(f"/api/v1/intakes/{intake_id}").status_code == 204
    assert client.get(f"/api/v1/intakes/{intake_id}").status_code == 404
    assert not [p for p in files if p.exists()]
    with session_scope(app_settings) as session:
        assert session.get(Intake, intake_id) is None
    deletions = [e for e in client.get("/api/v1/audit").json() if e["action"] == "deletion"]
    assert deletions[0]["target"] == f"/api/v1/intakes/{intake_id}"


def test_decisions_and_comments_are_audited_with_their_author(client, app_settings) -> None:
    intake_id = _ready_intake(client)
    reviewer = bearer(add_user(app_settings, "rui", "reviewer"))
    decided = client.post(
        f"/api/v1/intakes/{intake_id}/decisions", json={"verdict": "accepted"}, headers=reviewer
    )
    assert decided.status_code == 201, decided.text
    thread = client.post(
        f"/api/v1/intakes/{intake_id}/threads",
        json={"body": "Are these addresses needed at all?", "column": "contact"},
        headers=reviewer,
    )
    assert thread.status_code == 201, thread.text
    events = client.get("/api/v1/audit").json()
    mine = [(e["action"], e["actor"]) for e in events if e["actor"] == "rui"]
    assert mine == [("comment", "rui"), ("decision", "rui")]
