"""Which finished requests become audit events, and under what name."""

from __future__ import annotations

import pytest

from server.security.audit import action_for


@pytest.mark.parametrize(
    ("method", "path", "action"),
    [
        ("POST", "/api/v1/intakes", "upload"),
        ("GET", "/api/v1/intakes/3/file", "download"),
        ("GET", "/intakes/3/columns.csv", "download"),
        ("GET", "/intakes/3/report.html", "download"),
        ("GET", "/api/v1/intakes/3", None),
        ("POST", "/api/v1/intakes/3/decisions", "decision"),
        ("POST", "/api/v1/intakes/3/threads", "comment"),
        ("POST", "/api/v1/threads/4/resolve", "comment"),
        ("POST", "/api/v1/rules/validate", None),
        ("PUT", "/api/v1/intakes/3/baseline", "change"),
        ("POST", "/api/v1/threads/4/comments", "comment"),
        ("PUT", "/api/v1/suppliers/2/rules", "rule-change"),
        ("POST", "/api/v1/suppliers", "supplier-change"),
        ("PATCH", "/api/v1/users/5", "user-change"),
        ("POST", "/api/v1/tokens", "token-change"),
        ("DELETE", "/api/v1/intakes/3", "deletion"),
        ("DELETE", "/api/v1/intakes/3/file", "deletion"),
        ("POST", "/api/v1/auth/sign-in", None),  # recorded by the sign-in itself
        ("POST", "/sign-out", None),
        ("PUT", "/api/v1/intakes/3/unmasking", None),
        ("POST", "/intakes/3/unmasking", None),
        ("POST", "/intakes/3/delete", "deletion"),
        ("POST", "/account/password", None),
        ("PUT", "/api/v1/auth/password", None),
        ("POST", "/account/tokens", "token-change"),
        ("POST", "/admin/users/4", "user-change"),  # recorded by the route, with more detail
    ],
)
def test_action_names(method: str, path: str, action: str | None) -> None:
    assert action_for(method, path) == action
