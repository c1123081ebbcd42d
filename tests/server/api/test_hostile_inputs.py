"""Every API route, fed ids, queries and bodies of the wrong kind: never a 500, always JSON.

The route list comes from the app itself (the same walk as the authorisation
test), so a new route is covered the day it is added. Runs on SQLite and on
PostgreSQL, whose integers are narrower (32-bit; PostgreSQL manual, "Numeric
Types").
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest

from tests.server.api.reviews_support import client_on, crates_csv, deliver, new_supplier
from tests.server.api.test_authorisation import walk

# An id that is not a number, one beyond PostgreSQL's integer, one beyond SQLite's,
# a negative one, and the real intake / supplier (1) so the routes get past the lookup.
IDS = ["pelican", "2147483648", "9223372036854775808", "-3", "1"]
QUERY = (
    "?limit=-5&offset=abc&baseline=zz&a=&b=&column=&n=99999999999999999999&status=asleep"
    "&supplier=9223372036854775808&before=x&verdict=maybe&where_column=%3Cb%3E"
)
BODIES: list[dict] = [
    {},
    {"content": b"{not json", "headers": {"content-type": "application/json"}},
    {"json": []},
    {"json": {"name": 5, "document": 7, "verdict": 9, "body": [1], "intake_id": "x"}},
    {"json": {"role": "captain", "password": 3, "reason": {"a": 1}, "column": None}},
]


@pytest.fixture
def api(database_url: str, tmp_path: Path):
    with client_on(database_url, tmp_path) as (client, _settings):
        supplier = new_supplier(client)
        deliver(client, supplier["id"], crates_csv(11, rows=40), "w11.csv")
        yield client


def test_no_route_answers_bad_input_with_a_500(api) -> None:
    app = api.app
    faults = []
    routes = sorted({(m, p) for m, p in walk(app) if p.startswith("/api/")})
    assert len(routes) > 30  # the walk found the API
    for method, template in routes:
        if (method, template) == ("DELETE", "/api/v1/intakes/{intake_id}"):
            continue  # would delete the intake the other routes are fed
        for value in IDS:
            url = re.sub(r"\{[^}]+\}", value, template)
            bodies = BODIES if method in ("POST", "PUT", "PATCH") else [{}]
            for query in ("", QUERY):
                for body in bodies:
                    answer = api.request(method, url + query, **body)
                    is_json = answer.headers.get("content-type", "").startswith(
                        ("application/json", "text/csv", "application/octet-stream")
                    )
                    if answer.status_code >= 500 or (answer.status_code >= 400 and not is_json):
                        faults.append(f"{method} {url + query} {body}: {answer.status_code}")
    assert faults == []
