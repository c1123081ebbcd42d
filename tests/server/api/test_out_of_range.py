"""Numbers and texts the database cannot hold are bad input (422), on SQLite and PostgreSQL."""

from __future__ import annotations

from pathlib import Path

import pytest

from tests.server.api.reviews_support import client_on, new_supplier
from tests.support import upload

# PostgreSQL's integer is 32-bit (its manual, "Numeric Types"); SQLite's is 64-bit
# (its documentation, "Datatypes In SQLite"). Both sides of each bound are tried.
TOO_BIG = ["2147483648", "9223372036854775808", "99999999999999999999999"]


@pytest.fixture
def api(database_url: str, tmp_path: Path):
    with client_on(database_url, tmp_path) as (client, _settings):
        yield client


def _refused(answer) -> None:
    assert answer.status_code in (404, 422), answer.text
    assert answer.headers["content-type"] == "application/json"
    if answer.status_code == 422:
        assert answer.json()["code"] in ("out_of_range", "invalid_request", "unknown_supplier")


@pytest.mark.parametrize("number", TOO_BIG)
def test_ids_beyond_the_database_range_are_refused_plainly(api, number: str) -> None:
    for url in (
        f"/api/v1/intakes/{number}",
        f"/api/v1/intakes/{number}/drift",
        f"/api/v1/intakes/{number}/judgement",
        f"/api/v1/suppliers/{number}/rules",
        f"/api/v1/history/compare?a={number}&b=1",
    ):
        _refused(api.get(url))
    # Filters: nothing matches where the database can hold the number, a 422 where it cannot.
    listing = api.get(f"/api/v1/intakes?supplier={number}")
    if listing.status_code == 200:
        assert listing.json()["items"] == []
    else:
        _refused(listing)
    older = api.get(f"/api/v1/audit?before={number}")
    if older.status_code != 200:  # 200: every event is older than that id
        _refused(older)
    _refused(upload(api, b"a,b\n1,2\n", supplier=number))
    assert api.get("/api/v1/intakes/2147483647").status_code == 404  # the largest id is fine


def test_text_the_database_refuses_is_bad_input(api, database_url: str) -> None:
    supplier = new_supplier(api)
    answer = api.put(
        f"/api/v1/suppliers/{supplier['id']}/rules",
        json={"document": {"rows": {"min": 1}}, "note": "checked\x00"},
    )
    if database_url.startswith("sqlite"):
        assert answer.status_code == 201, answer.text  # SQLite stores NUL inside text
    else:
        assert answer.status_code == 422, answer.text
        assert answer.json()["code"] == "out_of_range"
    assert api.get(f"/api/v1/suppliers/{supplier['id']}").status_code == 200
