"""/api/v1/users: admins add accounts, change roles, disable; the last admin stays."""

from __future__ import annotations

from tests.server.api.accounts_support import PASSWORD, add_user, bearer


def test_an_admin_adds_a_user_who_can_then_sign_in(client, anonymous_client) -> None:
    answer = client.post(
        "/api/v1/users", json={"name": "rui", "role": "reviewer", "password": PASSWORD}
    )
    assert answer.status_code == 201
    body = answer.json()
    assert body["role"] == "reviewer" and "password" not in str(body) and "hash" not in str(body)
    signed = client.post("/api/v1/auth/sign-in", json={"name": "rui", "password": PASSWORD})
    assert signed.status_code == 200 and signed.json()["role"] == "reviewer"


def test_weak_passwords_duplicates_and_unknown_roles_are_refused(client) -> None:
    weak = client.post("/api/v1/users", json={"name": "rui", "role": "viewer", "password": "abc"})
    assert weak.status_code == 422 and weak.json()["code"] == "weak_password"
    client.post("/api/v1/users", json={"name": "rui", "role": "viewer", "password": PASSWORD})
    again = client.post(
        "/api/v1/users", json={"name": "rui", "role": "viewer", "password": PASSWORD}
    )
    assert again.status_code == 409
    odd = client.post("/api/v1/users", json={"name": "x", "role": "owner", "password": PASSWORD})
    assert odd.status_code == 422


def test_a_role_change_takes_effect_at_once(client, app_settings) -> None:
    token = add_user(app_settings, "rui", "reviewer")
    user_id = next(u["id"] for u in client.get("/api/v1/users").json() if u["name"] == "rui")
    assert client.patch(f"/api/v1/users/{user_id}", json={"role": "viewer"}).status_code == 200
    refused = client.post("/api/v1/suppliers", json={"name": "Kelp"}, headers=bearer(token))
    assert refused.status_code == 403


def test_disabling_ends_sessions_and_tokens(client, anonymous_client, app_settings) -> None:
    token = add_user(app_settings, "rui", "reviewer")
    user_id = next(u["id"] for u in client.get("/api/v1/users").json() if u["name"] == "rui")
    assert client.patch(f"/api/v1/users/{user_id}", json={"is_active": False}).status_code == 200
    assert anonymous_client.get("/api/v1/intakes", headers=bearer(token)).status_code == 401


def test_the_last_admin_cannot_be_demoted(client) -> None:
    admin_id = next(u["id"] for u in client.get("/api/v1/users").json() if u["role"] == "admin")
    answer = client.patch(f"/api/v1/users/{admin_id}", json={"role": "reviewer"})
    assert answer.status_code == 409
    assert client.get("/api/v1/users").status_code == 200  # still an admin
