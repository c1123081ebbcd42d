"""Every route of the app, walked: anonymous callers are refused, viewers cannot change
anything, reviewers cannot administer. Routes that must stay open are an explicit list."""

from __future__ import annotations

import re
from collections.abc import Iterator

import pytest
from starlette.routing import Mount

from server.settings import Settings
from tests.server.api.accounts_support import add_user, bearer

# Open to everyone: the sign-in itself, the health check, static files (our own CSS, JS
# and plotly), and the API's description (no data in it).
OPEN = {
    ("GET", "/healthz"),
    ("GET", "/sign-in"),
    ("POST", "/sign-in"),
    ("POST", "/api/v1/auth/sign-in"),
    ("GET", "/static/vendor/plotly.min.js"),
    ("GET", "/favicon.ico"),
    ("GET", "/openapi.json"),
}

# Changes to the caller's own things, which a viewer may make.
SELF_SERVICE = {
    ("POST", "/api/v1/auth/sign-out"),
    ("PUT", "/api/v1/auth/password"),
    ("POST", "/account/password"),
    ("POST", "/api/v1/tokens"),
    ("DELETE", "/api/v1/tokens/{token_id}"),
    ("POST", "/sign-out"),
    ("POST", "/account/tokens"),
    ("POST", "/account/tokens/{token_id}/revoke"),
}

# Administration: users, the audit log, suppliers, rules and settings, unmasking and
# deleting an intake entirely.
ADMIN_PATTERNS = [
    (r".*", r"^/api/v1/users.*"),
    (r".*", r"^/api/v1/audit.*"),
    (r"^(PUT|POST|PATCH|DELETE)$", r".*/unmasking$"),
    (r"^DELETE$", r"^/api/v1/intakes/\{intake_id\}$"),
    (r"^(PUT|POST|PATCH|DELETE)$", r"^/api/v1/suppliers.*"),
    (r"^(PUT|POST|PATCH|DELETE)$", r"^/api/v1/suppliers/\{supplier_id\}/rules.*"),
    (r"^(PUT|POST|PATCH|DELETE)$", r".*/settings.*"),
    (r".*", r"^/admin/.*"),
    (r"^POST$", r"^/intakes/\{intake_id\}/(unmasking|delete)$"),
]
SAFE = {"GET", "HEAD", "OPTIONS"}


def walk(app) -> Iterator[tuple[str, str]]:
    """(method, path template) of every route, included routers flattened."""
    for route in app.routes:
        if isinstance(route, Mount):
            yield "GET", route.path + "/{path}"
        elif hasattr(route, "effective_route_contexts"):
            for context in route.effective_route_contexts():
                for method in sorted(context.methods or ()):
                    yield method, context.path
        else:
            for method in sorted(getattr(route, "methods", None) or ()):
                if method != "HEAD":
                    yield method, route.path


def concrete(path: str) -> str:
    """A path template with every parameter filled in."""
    return re.sub(r"\{[^}]+\}", lambda m: "app.css" if m.group(0) == "{path}" else "1", path)


def is_admin(method: str, path: str) -> bool:
    return any(re.match(m, method) and re.match(p, path) for m, p in ADMIN_PATTERNS)


@pytest.fixture
def routes(anonymous_client) -> list[tuple[str, str]]:
    found = sorted(set(walk(anonymous_client.app)))
    assert len(found) > 20  # the walk sees the included routers, not just the app's own
    return found


def test_the_walk_sees_every_part_of_the_app(routes) -> None:
    paths = {path for _method, path in routes}
    assert {"/api/v1/intakes", "/api/v1/users", "/sign-in", "/", "/static/{path}"} <= paths


def test_anonymous_callers_are_refused_everywhere_but_the_open_list(
    anonymous_client, routes
) -> None:
    for method, path in routes:
        if (method, path) in OPEN or path.startswith("/static/"):
            continue
        answer = anonymous_client.request(method, concrete(path), follow_redirects=False)
        if path.startswith("/api/"):
            assert answer.status_code == 401, (method, path, answer.status_code)
            assert answer.headers["www-authenticate"] == "Bearer"
            assert answer.json()["code"] == "not_signed_in"
        else:
            assert answer.status_code == 303, (method, path, answer.status_code)
            assert answer.headers["location"].startswith("/sign-in"), (method, path)


def test_open_routes_really_are_open(anonymous_client) -> None:
    assert anonymous_client.get("/healthz").status_code == 200
    assert anonymous_client.get("/sign-in").status_code == 200
    assert anonymous_client.get("/static/vendor/plotly.min.js").status_code == 200


def test_a_viewer_cannot_change_anything(anonymous_client, app_settings: Settings, routes) -> None:
    viewer = bearer(add_user(app_settings, "vera viewer", "viewer"))
    checked = 0
    for method, path in routes:
        if method in SAFE or (method, path) in OPEN | SELF_SERVICE:
            continue
        answer = anonymous_client.request(method, concrete(path), headers=viewer)
        assert answer.status_code == 403, (method, path, answer.status_code, answer.text)
        checked += 1
    assert checked >= 5


def test_a_viewer_can_read(anonymous_client, app_settings: Settings) -> None:
    viewer = bearer(add_user(app_settings, "vera viewer", "viewer"))
    assert anonymous_client.get("/api/v1/intakes", headers=viewer).status_code == 200
    assert anonymous_client.get("/api/v1/suppliers", headers=viewer).status_code == 200


def test_a_reviewer_cannot_administer(anonymous_client, app_settings: Settings, routes) -> None:
    reviewer = bearer(add_user(app_settings, "rui reviewer", "reviewer"))
    admin_routes = [(m, p) for m, p in routes if is_admin(m, p)]
    assert len(admin_routes) >= 5
    for method, path in admin_routes:
        answer = anonymous_client.request(method, concrete(path), headers=reviewer)
        assert answer.status_code == 403, (method, path, answer.status_code, answer.text)


def test_an_admin_passes_the_admin_routes(anonymous_client, app_settings: Settings) -> None:
    admin = bearer(add_user(app_settings, "ada admin", "admin"))
    assert anonymous_client.get("/api/v1/users", headers=admin).status_code == 200
    assert anonymous_client.get("/api/v1/audit", headers=admin).status_code == 200
