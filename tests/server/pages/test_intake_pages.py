"""The intake pages: list, upload form, one intake; escaped names; the local plotly bundle."""

from __future__ import annotations

from pathlib import Path

import plotly

from tests.support import make_supplier, upload, wait_for_intake

HOSTILE_NAME = "<img src=x onerror=alert(1)>levels.csv"


def test_list_and_intake_page_show_the_intake_with_its_name_escaped(client) -> None:
    make_supplier(client)
    created = upload(client, b"a,b\n1,2\n3,4\n", supplier=1, name=HOSTILE_NAME).json()
    wait_for_intake(client, created["id"])
    for path in ("/", f"/intakes/{created['id']}"):
        page = client.get(path)
        assert page.status_code == 200
        assert "<img src=x" not in page.text
        assert "&lt;img src=x onerror=alert(1)&gt;levels.csv" in page.text
    intake_page = client.get(f"/intakes/{created['id']}").text
    assert "ready" in intake_page


def test_upload_form_offers_the_suppliers(client) -> None:
    make_supplier(client, "Brannock Bay fishing cooperative")
    page = client.get("/upload")
    assert page.status_code == 200
    assert "Brannock Bay fishing cooperative" in page.text
    assert 'type="file"' in page.text


def test_plotly_is_served_from_the_installed_package(client) -> None:
    answer = client.get("/static/vendor/plotly.min.js")
    assert answer.status_code == 200
    bundled = Path(plotly.__file__).parent / "package_data" / "plotly.min.js"
    assert answer.content == bundled.read_bytes()
    assert answer.headers["content-type"].startswith("text/javascript")
