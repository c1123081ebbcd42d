"""Signing in and out through the API: cookie attributes, CSRF, origin check, throttling."""

from __future__ import annotations

from server.security.access import SESSION_COOKIE
from server.settings import Settings
from server.store import accounts, session_scope
from tests.conftest import make_settings
from tests.server.api.accounts_support import PASSWORD, add_user, bearer, sign_in


def test_sign_in_sets_a_safe_session_cookie(anonymous_client, app_settings: Settings) -> None:
    add_user(app_settings, "rui", "reviewer")
    answer = anonymous_client.post(
        "/api/v1/auth/sign-in", json={"name": "rui", "password": PASSWORD}
    )
    assert answer.status_code == 200
    cookie = answer.headers["set-cookie"]
    assert cookie.startswith(f"{SESSION_COOKIE}=")
    assert "HttpOnly" in cookie and "SameSite=lax" in cookie and "Max-Age=43200" in cookie
    assert "Secure" not in cookie  # the default settings say the site is not on HTTPS
    body = answer.json()
    assert body["name"] == "rui" and body["role"] == "reviewer" and len(body["csrf_token"]) == 64
    assert anonymous_client.get("/api/v1/auth/me").json()["name"] == "rui"


def test_cookie_is_secure_when_served_over_https(tmp_path) -> None:
    from fastapi.testclient import TestClient

    from server.app import create_app
    from server.store import schema

    settings = make_settings(tmp_path / "data", security={"https": True, "session_hours": 1})
    schema.upgrade(settings.resolved_database_url)
    add_user(settings, "rui", "reviewer")
    with TestClient(create_app(settings), base_url="https://testserver") as client:
        answer = client.post("/api/v1/auth/sign-in", json={"name": "rui", "password": PASSWORD})
        assert "Secure" in answer.headers["set-cookie"]
        assert "Max-Age=3600" in answer.headers["set-cookie"]
        assert answer.headers["strict-transport-security"].startswith("max-age=")


def test_wrong_password_and_unknown_name_answer_alike(anonymous_client, app_settings) -> None:
    add_user(app_settings, "rui", "reviewer")
    wrong = anonymous_client.post("/api/v1/auth/sign-in", json={"name": "rui", "password": "x"})
    unknown = anonymous_client.post(
        "/api/v1/auth/sign-in", json={"name": "nobody", "password": "x"}
    )
    assert wrong.status_code == unknown.status_code == 401
    assert wrong.json()["detail"] == unknown.json()["detail"]
    assert "set-cookie" not in wrong.headers


def test_changes_under_a_cookie_need_the_csrf_token(anonymous_client, app_settings) -> None:
    add_user(app_settings, "ada", "admin")
    csrf = sign_in(anonymous_client, "ada")
    body = {"name": "Saltmarsh buoy network"}
    refused = anonymous_client.post("/api/v1/suppliers", json=body)
    assert refused.status_code == 403 and refused.json()["code"] == "csrf"
    forged = anonymous_client.post(
        "/api/v1/suppliers", json=body, headers={"X-CSRF-Token": "0" * 64}
    )
    assert forged.status_code == 403
    accepted = anonymous_client.post("/api/v1/suppliers", json=body, headers={"X-CSRF-Token": csrf})
    assert accepted.status_code == 201, accepted.text


def test_changes_from_another_site_are_refused(anonymous_client, app_settings) -> None:
    add_user(app_settings, "ada", "admin")
    csrf = sign_in(anonymous_client, "ada")
    answer = anonymous_client.post(
        "/api/v1/suppliers",
        json={"name": "Saltmarsh buoy network"},
        headers={"X-CSRF-Token": csrf, "Origin": "http://evil.example"},
    )
    assert answer.status_code == 403 and answer.json()["code"] == "csrf"


def test_bearer_tokens_need_no_csrf_token(anonymous_client, app_settings) -> None:
    token = add_user(app_settings, "ada", "admin")
    answer = anonymous_client.post(
        "/api/v1/suppliers", json={"name": "Saltmarsh buoy network"}, headers=bearer(token)
    )
    assert answer.status_code == 201


def test_sign_out_ends_the_session_on_the_server(anonymous_client, app_settings) -> None:
    add_user(app_settings, "vera", "viewer")
    csrf = sign_in(anonymous_client, "vera")
    secret = anonymous_client.cookies[SESSION_COOKIE]
    answer = anonymous_client.post("/api/v1/auth/sign-out", headers={"X-CSRF-Token": csrf})
    assert answer.status_code == 204
    assert anonymous_client.get("/api/v1/auth/me").status_code == 401
    # Replaying the old cookie opens nothing: the server forgot the session.
    anonymous_client.cookies.set(SESSION_COOKIE, secret)
    assert anonymous_client.get("/api/v1/auth/me").status_code == 401


def test_expired_sessions_are_refused(anonymous_client, app_settings) -> None:
    add_user(app_settings, "vera", "viewer")
    sign_in(anonymous_client, "vera")
    with session_scope(app_settings) as session:
        for row in session.query(accounts.UserSession):
            row.expires_at = row.created_at
    assert anonymous_client.get("/api/v1/auth/me").status_code == 401


def test_repeated_failures_hold_the_account_back(anonymous_client, app_settings) -> None:
    add_user(app_settings, "rui", "reviewer")
    limit = app_settings.security.max_failed_sign_ins
    for _ in range(limit):
        wrong = anonymous_client.post("/api/v1/auth/sign-in", json={"name": "rui", "password": "x"})
        assert wrong.status_code == 401
    held = anonymous_client.post("/api/v1/auth/sign-in", json={"name": "rui", "password": PASSWORD})
    assert held.status_code == 429  # even the right password waits out the window
    assert held.json()["code"] == "held" and held.json()["retry_after_seconds"] > 0
    assert "try again in" in held.json()["detail"]


def test_repeated_failures_from_one_address_hold_it_back(tmp_path) -> None:
    from fastapi.testclient import TestClient

    from server.app import create_app
    from server.store import schema

    settings = make_settings(
        tmp_path / "data",
        security={"max_failed_sign_ins": 100, "max_failed_sign_ins_per_address": 3},
    )
    schema.upgrade(settings.resolved_database_url)
    add_user(settings, "rui", "reviewer")
    with TestClient(create_app(settings)) as client:
        for name in ("a", "b", "c"):  # three different names, one address
            client.post("/api/v1/auth/sign-in", json={"name": name, "password": "x"})
        held = client.post("/api/v1/auth/sign-in", json={"name": "rui", "password": PASSWORD})
        assert held.status_code == 429


def test_a_disabled_account_cannot_sign_in_or_use_its_token(anonymous_client, app_settings) -> None:
    token = add_user(app_settings, "rui", "reviewer")
    with session_scope(app_settings) as session:
        accounts.find_user(session, "rui").is_active = False
    refused = anonymous_client.post(
        "/api/v1/auth/sign-in", json={"name": "rui", "password": PASSWORD}
    )
    assert refused.status_code == 401
    assert anonymous_client.get("/api/v1/intakes", headers=bearer(token)).status_code == 401


def test_sign_in_is_audited(anonymous_client, app_settings) -> None:
    admin = add_user(app_settings, "ada", "admin")
    anonymous_client.post("/api/v1/auth/sign-in", json={"name": "ada", "password": "nope"})
    sign_in(anonymous_client, "ada")
    events = anonymous_client.get("/api/v1/audit", headers=bearer(admin)).json()
    actions = [e["action"] for e in events]
    assert actions[:2] == ["sign-in", "sign-in-failed"]
    assert events[0]["actor"] == "ada" and events[0]["address"] == "testclient"


def test_changing_ones_password_ends_the_other_sessions(anonymous_client, app_settings) -> None:
    from fastapi.testclient import TestClient

    add_user(app_settings, "vera", "viewer")
    other = TestClient(anonymous_client.app)
    sign_in(other, "vera")
    csrf = sign_in(anonymous_client, "vera")
    new = "a brand new tide table"
    wrong = anonymous_client.put(
        "/api/v1/auth/password",
        json={"current": "not it", "new": new},
        headers={"X-CSRF-Token": csrf},
    )
    assert wrong.status_code == 422 and "not right" in wrong.json()["detail"]
    weak = anonymous_client.put(
        "/api/v1/auth/password",
        json={"current": PASSWORD, "new": "short"},
        headers={"X-CSRF-Token": csrf},
    )
    assert weak.status_code == 422 and "refused" in weak.json()["detail"]
    done = anonymous_client.put(
        "/api/v1/auth/password",
        json={"current": PASSWORD, "new": new},
        headers={"X-CSRF-Token": csrf},
    )
    assert done.status_code == 204
    assert anonymous_client.get("/api/v1/auth/me").json()["name"] == "vera"  # this one goes on
    assert other.get("/api/v1/auth/me").status_code == 401  # the other browser is out
    answer = other.post("/api/v1/auth/sign-in", json={"name": "vera", "password": new})
    assert answer.status_code == 200


def test_signing_in_again_ends_the_earlier_session(anonymous_client, app_settings) -> None:
    add_user(app_settings, "vera", "viewer")
    add_user(app_settings, "rui", "reviewer")
    sign_in(anonymous_client, "vera")
    first = anonymous_client.cookies[SESSION_COOKIE]
    sign_in(anonymous_client, "rui")
    assert anonymous_client.cookies[SESSION_COOKIE] != first
    anonymous_client.cookies.set(SESSION_COOKIE, first)
    assert anonymous_client.get("/api/v1/auth/me").status_code == 401


def _held_after_three(tmp_path, trusted: str, forwarded: list[str]) -> list[int]:
    """Status codes of sign-ins, each failing one "forwarded" from the given address."""
    from fastapi.testclient import TestClient

    from server.app import create_app
    from server.store import schema

    settings = make_settings(
        tmp_path / "data",
        security={
            "max_failed_sign_ins": 100,
            "max_failed_sign_ins_per_address": 3,
            "trusted_proxies": trusted,
        },
    )
    schema.upgrade(settings.resolved_database_url)
    codes = []
    with TestClient(create_app(settings)) as client:
        for address in forwarded:
            answer = client.post(
                "/api/v1/auth/sign-in",
                json={"name": "nobody", "password": "x"},
                headers={"X-Forwarded-For": address},
            )
            codes.append(answer.status_code)
    return codes


def test_forwarded_addresses_count_only_from_a_trusted_proxy(tmp_path) -> None:
    """Behind a trusted proxy each client is throttled on its own; otherwise by the peer."""
    addresses = ["203.0.113.7", "203.0.113.8", "203.0.113.9", "203.0.113.10", "203.0.113.7"]
    # "testclient" is the peer address Starlette's TestClient reports.
    behind = _held_after_three(tmp_path / "behind", "testclient", addresses)
    assert behind == [401, 401, 401, 401, 401]
    # Without trust the forged header is ignored: all five come from one peer.
    untrusted = _held_after_three(tmp_path / "open", "", addresses)
    assert untrusted == [401, 401, 401, 429, 429]
    # A trusted proxy passing on one client's many tries still holds that client back.
    same = _held_after_three(tmp_path / "one", "testclient", ["198.51.100.4"] * 4)
    assert same == [401, 401, 401, 429]
