"""The review routes are all described in the OpenAPI schema."""

from __future__ import annotations

REVIEW_PATHS = {
    "/api/v1/intakes/{intake_id}/judgement": {"get", "post"},
    "/api/v1/intakes/{intake_id}/baseline": {"put"},
    "/api/v1/intakes/{intake_id}/drift": {"get"},
    "/api/v1/intakes/{intake_id}/decisions": {"get", "post"},
    "/api/v1/intakes/{intake_id}/threads": {"get", "post"},
    "/api/v1/threads/{thread_id}/comments": {"post"},
    "/api/v1/comments/{comment_id}": {"patch"},
    "/api/v1/threads/{thread_id}/resolve": {"post"},
    "/api/v1/threads/{thread_id}/reopen": {"post"},
    "/api/v1/suppliers/{supplier_id}/rules": {"get", "put"},
    "/api/v1/suppliers/{supplier_id}/rules/versions": {"get"},
    "/api/v1/suppliers/{supplier_id}/rules/versions/{version}": {"get"},
    "/api/v1/rules/validate": {"post"},
    "/api/v1/intakes/{intake_id}/rules-draft": {"get"},
    "/api/v1/history/suppliers/{supplier_id}/timeline": {"get"},
    "/api/v1/history/suppliers/{supplier_id}/columns/{column}": {"get"},
    "/api/v1/history/suppliers": {"get"},
    "/api/v1/history/compare": {"get"},
}


def test_every_review_route_is_in_the_schema(client) -> None:
    paths = client.get("/openapi.json").json()["paths"]
    for path, methods in REVIEW_PATHS.items():
        assert path in paths, path
        assert methods <= set(paths[path]), (path, set(paths[path]))
        for method in methods:
            assert paths[path][method].get("summary"), (path, method)
