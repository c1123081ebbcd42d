"""Every page answers for a profiled intake (the browser tests look closer; this is fast)."""

from __future__ import annotations

import csv
import io

import numpy as np
import pandas as pd
from fastapi.testclient import TestClient

from tests.support import make_supplier, upload, wait_for_intake


def delivery(seed: int, rows: int = 120) -> bytes:
    """Invented berth bookings: berth, vessel class, length and a °C/°F pair."""
    rng = np.random.default_rng(seed)
    temp = rng.normal(12, 2, rows).round(2)
    return (
        pd.DataFrame(
            {
                "berth": rng.choice(["north", "south", "=SUM(A1)"], rows),
                "vessel_class": rng.choice(["tug", "ferry"], rows),
                "length_m": rng.normal(40, 9, rows).round(1),
                "water_temp_c": temp,
                "water_temp_f": (temp * 9 / 5 + 32).round(2),
            }
        )
        .to_csv(index=False)
        .encode()
    )


def test_pages_answer_for_two_deliveries(client: TestClient) -> None:
    supplier = make_supplier(client, "Berth office")
    ids = []
    for seed in (1, 2):
        answer = upload(client, delivery(seed), supplier=supplier["id"], name=f"b{seed}.csv")
        assert answer.status_code == 201, answer.text
        ids.append(wait_for_intake(client, answer.json()["id"])["id"])
    first, second = ids
    pages = {
        "/": "b2.csv",
        "/upload": "Upload a delivery",
        f"/intakes/{second}": "What needs a look",
        "/suppliers": "Berth office",
        f"/suppliers/{supplier['id']}": "One column across deliveries",
        f"/compare?a={first}&b={second}": "What changed from the first to the second",
    }
    for path, text in pages.items():
        answer = client.get(path)
        assert answer.status_code == 200, (path, answer.text[:300])
        assert text in answer.text, path
    figures = client.get(f"/intakes/{second}/figures.json", params={"start": 0, "count": 3})
    assert set(figures.json()) == {"fig-col-0", "fig-col-1", "fig-col-2"}
    summary = client.get(f"/intakes/{second}/columns.csv")
    rows = list(csv.reader(io.StringIO(summary.content.decode("utf-8-sig"))))
    assert [r[1] for r in rows[1:]] == [
        "berth",
        "vessel_class",
        "length_m",
        "water_temp_c",
        "water_temp_f",
    ]
    assert "attachment" in summary.headers["content-disposition"]
    report = client.get(f"/intakes/{second}/report.html")
    assert report.status_code == 200 and "Tidewaiter intake report" in report.text
    assert client.get("/intakes/999999").status_code == 404
