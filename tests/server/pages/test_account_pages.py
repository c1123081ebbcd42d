"""The account and admin pages through HTTP: sign-in form, CSRF on form posts, safe
redirects, admin pages for accounts, the audit log, unmasking and deleting an intake."""

from __future__ import annotations

import re

import pytest

from server.pages.account import local_target
from tests.server.api.accounts_support import PASSWORD, add_user, bearer
from tests.support import make_supplier, upload, wait_for_intake


def _form_sign_in(client, name: str, next_path: str = "/"):
    return client.post(
        "/sign-in",
        data={"name": name, "password": PASSWORD, "next": next_path},
        follow_redirects=False,
    )


def _csrf(client) -> str:
    page = client.get("/account").text
    return re.search(r'name="csrf_token" value="([0-9a-f]{64})"', page).group(1)


@pytest.mark.parametrize(
    ("target", "safe"),
    [
        ("/intakes/3", "/intakes/3"),
        ("/?supplier=2", "/?supplier=2"),
        ("//evil.example/x", "/"),
        ("https://evil.example/", "/"),
        ("/\\evil.example", "/"),
        ("javascript:alert(1)", "/"),
        ("", "/"),
        (None, "/"),
    ],
)
def test_after_sign_in_only_local_paths(target, safe) -> None:
    # Open-redirect forms from OWASP's Unvalidated Redirects and Forwards Cheat Sheet.
    assert local_target(target) == safe


def test_the_sign_in_form_starts_a_session_and_goes_on(anonymous_client, app_settings) -> None:
    add_user(app_settings, "rui", "reviewer")
    answer = _form_sign_in(anonymous_client, "rui", "/upload")
    assert answer.status_code == 303 and answer.headers["location"] == "/upload"
    assert "HttpOnly" in answer.headers["set-cookie"]
    assert anonymous_client.get("/upload").status_code == 200


def test_a_sign_in_posted_from_another_site_is_refused(anonymous_client, app_settings) -> None:
    add_user(app_settings, "rui", "reviewer")
    answer = anonymous_client.post(
        "/sign-in",
        data={"name": "rui", "password": PASSWORD},
        headers={"Origin": "http://evil.example"},
        follow_redirects=False,
    )
    assert answer.status_code == 403 and "set-cookie" not in answer.headers


def test_a_wrong_password_shows_the_form_again(anonymous_client, app_settings) -> None:
    add_user(app_settings, "rui", "reviewer")
    answer = anonymous_client.post("/sign-in", data={"name": "rui<b>", "password": "nope"})
    assert answer.status_code == 200
    assert "not right" in answer.text and "rui&lt;b&gt;" in answer.text


def test_form_posts_need_the_csrf_token(anonymous_client, app_settings) -> None:
    add_user(app_settings, "vera", "viewer")
    _form_sign_in(anonymous_client, "vera")
    refused = anonymous_client.post("/sign-out", follow_redirects=False)
    assert refused.status_code == 403
    assert anonymous_client.get("/account").status_code == 200  # still signed in
    token = _csrf(anonymous_client)
    done = anonymous_client.post("/sign-out", data={"csrf_token": token}, follow_redirects=False)
    assert done.status_code == 303 and done.headers["location"] == "/sign-in"
    assert anonymous_client.get("/account", follow_redirects=False).status_code == 303


def test_pages_carry_the_csrf_meta_and_the_security_headers(anonymous_client, app_settings):
    add_user(app_settings, "vera", "viewer")
    _form_sign_in(anonymous_client, "vera")
    page = anonymous_client.get("/")
    assert re.search(r'<meta name="csrf-token" content="[0-9a-f]{64}">', page.text)
    assert page.headers["x-frame-options"] == "DENY"
    assert "script-src 'self'" in page.headers["content-security-policy"]
    assert page.headers["cache-control"] == "no-store"


def test_an_admin_adds_an_account_on_the_admin_page(anonymous_client, app_settings) -> None:
    add_user(app_settings, "ada", "admin")
    _form_sign_in(anonymous_client, "ada")
    token = _csrf(anonymous_client)
    weak = anonymous_client.post(
        "/admin/users",
        data={"csrf_token": token, "name": "kim", "role": "viewer", "password": "short"},
    )
    assert "Not added" in weak.text
    added = anonymous_client.post(
        "/admin/users",
        data={"csrf_token": token, "name": "kim", "role": "viewer", "password": PASSWORD},
        follow_redirects=False,
    )
    assert added.status_code == 303
    assert "kim" in anonymous_client.get("/admin/users").text
    audit = anonymous_client.get("/admin/audit?action=sign-in").text
    assert "ada" in audit and "sign-in" in audit


def test_an_admin_unmasks_and_deletes_an_intake_from_its_page(client, app_settings) -> None:
    supplier = make_supplier(client)
    content = b"lead,shift\nlo@example.org,early\nlo@example.org,late\nli@example.org,early\n"
    created = upload(client, content, supplier=supplier["name"], name="crew.csv").json()
    assert wait_for_intake(client, created["id"])["status"] == "ready"
    from fastapi.testclient import TestClient

    browser = TestClient(client.app)
    add_user(app_settings, "ada", "admin")
    _form_sign_in(browser, "ada")
    page = browser.get(f"/intakes/{created['id']}").text
    assert "lo@example.org" not in page and "Data protection (admin)" in page
    token = _csrf(browser)
    browser.post(
        f"/intakes/{created['id']}/unmasking", data={"csrf_token": token, "unmasked": "yes"}
    )
    assert "lo@example.org" in browser.get(f"/intakes/{created['id']}").text
    unconfirmed = browser.post(f"/intakes/{created['id']}/delete", data={"csrf_token": token})
    assert unconfirmed.status_code == 422
    deleted = browser.post(
        f"/intakes/{created['id']}/delete",
        data={"csrf_token": token, "confirm": "yes"},
        follow_redirects=False,
    )
    assert deleted.status_code == 303
    assert client.get(f"/api/v1/intakes/{created['id']}").status_code == 404


def test_a_reviewer_sees_no_admin_controls(client, app_settings) -> None:
    supplier = make_supplier(client)
    created = upload(client, b"a,b\n1,2\n", supplier=supplier["name"]).json()
    wait_for_intake(client, created["id"])
    reviewer = bearer(add_user(app_settings, "rui", "reviewer"))
    page = client.get(f"/intakes/{created['id']}", headers=reviewer).text
    assert "Data protection (admin)" not in page
    assert client.get("/admin/users", headers=reviewer).status_code == 403


def test_the_account_page_changes_the_password(anonymous_client, app_settings) -> None:
    add_user(app_settings, "vera", "viewer")
    _form_sign_in(anonymous_client, "vera")
    token = _csrf(anonymous_client)
    wrong = anonymous_client.post(
        "/account/password", data={"csrf_token": token, "current": "x", "new": "y" * 12}
    )
    assert "not right" in wrong.text
    done = anonymous_client.post(
        "/account/password",
        data={"csrf_token": token, "current": PASSWORD, "new": "a brand new tide table"},
    )
    assert done.status_code == 200 and "Your password is changed" in done.text


def test_a_refused_page_says_why_in_a_page(client, app_settings) -> None:
    viewer = bearer(add_user(app_settings, "vera", "viewer"))
    answer = client.get("/admin/users", headers=viewer)
    assert answer.status_code == 403
    assert "<h1>Not allowed</h1>" in answer.text and "admin role" in answer.text
