"""/api/v1/tokens: created and revoked by their owner, shown once, carrying the owner's role."""

from __future__ import annotations

from server.security.tokens import digest
from server.store import accounts, session_scope
from tests.server.api.accounts_support import add_user, bearer, sign_in


def test_a_token_is_shown_once_and_works_as_its_owner(anonymous_client, app_settings) -> None:
    add_user(app_settings, "vera", "viewer")
    csrf = sign_in(anonymous_client, "vera")
    created = anonymous_client.post(
        "/api/v1/tokens", json={"name": "nightly"}, headers={"X-CSRF-Token": csrf}
    )
    assert created.status_code == 201
    token = created.json()["token"]
    listed = anonymous_client.get("/api/v1/tokens").json()
    assert [t["name"] for t in listed] == ["nightly", "tests"]
    assert all("token" not in t for t in listed)  # the text is never listed again
    assert listed[0]["hint"] == token[-4:]
    with session_scope(app_settings) as session:
        row = session.query(accounts.ApiToken).filter_by(name="nightly").one()
        assert row.digest == digest(token) and token not in repr(row.__dict__)
    anonymous_client.cookies.clear()
    me = anonymous_client.get("/api/v1/auth/me", headers=bearer(token)).json()
    assert me == {
        "id": me["id"],
        "name": "vera",
        "role": "viewer",
        "is_demo": False,
        "via": "token",
        "csrf_token": None,
    }
    # A viewer's token is a viewer: it reads, it cannot change.
    assert anonymous_client.get("/api/v1/intakes", headers=bearer(token)).status_code == 200
    refused = anonymous_client.post("/api/v1/suppliers", json={"name": "x"}, headers=bearer(token))
    assert refused.status_code == 403


def test_a_revoked_token_opens_nothing(anonymous_client, app_settings) -> None:
    token = add_user(app_settings, "rui", "reviewer")
    mine = anonymous_client.get("/api/v1/tokens", headers=bearer(token)).json()
    answer = anonymous_client.delete(f"/api/v1/tokens/{mine[0]['id']}", headers=bearer(token))
    assert answer.status_code == 204
    refused = anonymous_client.get("/api/v1/intakes", headers=bearer(token))
    assert refused.status_code == 401 and refused.json()["code"] == "not_signed_in"


def test_nobody_revokes_someone_elses_token(anonymous_client, app_settings) -> None:
    ada = add_user(app_settings, "ada", "admin")
    rui = add_user(app_settings, "rui", "reviewer")
    rui_token_id = anonymous_client.get("/api/v1/tokens", headers=bearer(rui)).json()[0]["id"]
    answer = anonymous_client.delete(f"/api/v1/tokens/{rui_token_id}", headers=bearer(ada))
    assert answer.status_code == 404
    assert anonymous_client.get("/api/v1/intakes", headers=bearer(rui)).status_code == 200


def test_garbage_tokens_are_refused(anonymous_client) -> None:
    for header in ("Bearer ", "Bearer tw_nothing", "Bearer " + "x" * 5000):
        answer = anonymous_client.get("/api/v1/intakes", headers={"Authorization": header})
        assert answer.status_code == 401
