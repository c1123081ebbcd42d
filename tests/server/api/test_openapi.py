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


def test_every_json_answer_has_a_typed_schema(client) -> None:
    """A client generated from the schema gets named fields, not an untyped object."""
    spec = client.get("/openapi.json").json()
    untyped = []
    for path, methods in spec["paths"].items():
        for method, operation in methods.items():
            for code, answer in operation["responses"].items():
                if not code.startswith("2"):
                    continue
                schema = answer.get("content", {}).get("application/json", {}).get("schema")
                if schema is None:
                    continue
                typed = "$ref" in schema or "$ref" in schema.get("items", {})
                if not typed:
                    untyped.append(f"{method.upper()} {path}: {schema}")
    assert untyped == []


def test_the_drift_document_is_described_field_by_field(client) -> None:
    spec = client.get("/openapi.json").json()
    answer = spec["paths"]["/api/v1/intakes/{intake_id}/drift"]["get"]["responses"]["200"]
    ref = answer["content"]["application/json"]["schema"]["$ref"].rsplit("/", 1)[-1]
    drift = spec["components"]["schemas"][ref]
    assert set(drift["required"]) == {"baseline", "target", "schema", "volume", "columns", "flags"}
    column = spec["components"]["schemas"]["ColumnDrift"]["properties"]
    for field in ("psi", "ks", "mean_shift_sd", "chi2_p_value", "js_distance", "new_labels"):
        assert field in column
