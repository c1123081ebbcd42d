"""The OpenAPI description names every intake and supplier route and the upload's form."""

from __future__ import annotations


def test_openapi_lists_the_routes_and_the_upload_form(client) -> None:
    spec = client.get("/openapi.json").json()
    paths = spec["paths"]
    for path, method in [
        ("/api/v1/intakes", "post"),
        ("/api/v1/intakes", "get"),
        ("/api/v1/intakes/{intake_id}", "get"),
        ("/api/v1/intakes/{intake_id}/profile", "get"),
        ("/api/v1/intakes/{intake_id}/file", "get"),
        ("/api/v1/intakes/{intake_id}/file", "delete"),
        ("/api/v1/intakes/{intake_id}/reprofile", "post"),
        ("/api/v1/suppliers", "get"),
        ("/api/v1/suppliers", "post"),
        ("/healthz", "get"),
    ]:
        assert method in paths.get(path, {}), f"{method.upper()} {path} is not described"
    form = paths["/api/v1/intakes"]["post"]["requestBody"]["content"]["multipart/form-data"]
    assert set(form["schema"]["required"]) == {"file", "supplier"}
    assert form["schema"]["properties"]["file"]["format"] == "binary"
