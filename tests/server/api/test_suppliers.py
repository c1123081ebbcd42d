"""/api/v1/suppliers."""

from __future__ import annotations

from tests.support import make_supplier, upload, wait_for_intake


def test_create_list_and_get(client) -> None:
    created = client.post(
        "/api/v1/suppliers",
        json={"name": "  Gullwick tide-gauge station ", "note": "outer breakwater gauge"},
    )
    assert created.status_code == 201
    body = created.json()
    assert body["name"] == "Gullwick tide-gauge station"
    assert body["intakes"] == 0
    make_supplier(client, "Brannock Bay fishing cooperative")
    names = [s["name"] for s in client.get("/api/v1/suppliers").json()]
    assert names == ["Brannock Bay fishing cooperative", "Gullwick tide-gauge station"]
    assert client.get(f"/api/v1/suppliers/{body['id']}").json()["note"] == "outer breakwater gauge"


def test_counts_follow_the_intakes(client) -> None:
    supplier = make_supplier(client)
    first = upload(client, b"a,b\n1,2\n", supplier=supplier["id"]).json()
    wait_for_intake(client, first["id"])
    listed = client.get(f"/api/v1/suppliers/{supplier['id']}").json()
    assert listed["intakes"] == 1
    assert listed["last_intake_at"] == first["created_at"]


def test_duplicate_name_is_409(client) -> None:
    make_supplier(client, "Saltmere pilots")
    again = client.post("/api/v1/suppliers", json={"name": "Saltmere pilots"})
    assert again.status_code == 409
    assert "already exists" in again.json()["detail"]


def test_bad_bodies_are_422_with_the_field_named(client) -> None:
    for body in ({}, {"name": ""}, {"name": "x" * 201}, {"name": 5}):
        answer = client.post("/api/v1/suppliers", json=body)
        assert answer.status_code == 422, body
        assert answer.json()["errors"][0]["field"] == "name"
    blank = client.post("/api/v1/suppliers", json={"name": "   "})
    assert blank.status_code == 422
    broken = client.post(
        "/api/v1/suppliers", content=b"{not json", headers={"content-type": "application/json"}
    )
    assert broken.status_code == 422
    assert broken.json()["errors"] == [
        {"field": "body", "message": "not valid JSON at character 1"}
    ]


def test_unknown_supplier_is_404(client) -> None:
    answer = client.get("/api/v1/suppliers/41")
    assert answer.status_code == 404
    assert answer.json()["code"] == "not_found"
