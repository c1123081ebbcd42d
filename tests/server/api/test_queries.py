"""/api/v1/intakes/{id}/crosstab and /labels: on-demand questions from the columnar copy."""

from __future__ import annotations

import io

import numpy as np
import pandas as pd
from fastapi.testclient import TestClient

from tests.support import make_supplier, upload, wait_for_intake


def harbour_calls(rows: int = 240, seed: int = 4) -> bytes:
    """Invented port calls: vessel class, berth and tide state, plus a number."""
    rng = np.random.default_rng(seed)
    frame = pd.DataFrame(
        {
            "vessel_class": rng.choice(["tug", "ferry", "trawler"], rows, p=[0.5, 0.3, 0.2]),
            "berth": rng.choice(["north", "south", "east"], rows),
            "tide": rng.choice(["high", "low"], rows),
            "draught_m": np.round(rng.normal(4, 1, rows), 2),
        }
    )
    return frame.to_csv(index=False).encode()


def profiled(client: TestClient, content: bytes) -> int:
    supplier = make_supplier(client, "Port office")
    answer = upload(client, content, supplier=supplier["id"], name="calls.csv")
    assert answer.status_code == 201, answer.text
    intake = wait_for_intake(client, answer.json()["id"])
    assert intake["status"] == "ready", intake.get("error")
    return int(intake["id"])


def test_crosstab_with_a_filter_matches_pandas(client: TestClient) -> None:
    content = harbour_calls()
    intake = profiled(client, content)
    answer = client.get(
        f"/api/v1/intakes/{intake}/crosstab",
        params={"a": "vessel_class", "b": "berth", "where_column": "tide", "where_value": "low"},
    )
    assert answer.status_code == 200, answer.text
    doc = answer.json()
    frame = pd.read_csv(io.BytesIO(content))
    low = frame[frame.tide == "low"]
    # Reference: pandas crosstab of the same rows.
    expected = pd.crosstab(low.vessel_class, low.berth)
    got = pd.DataFrame(
        doc["counts"]["matrix"], index=doc["counts"]["a_labels"], columns=doc["counts"]["b_labels"]
    )
    pd.testing.assert_frame_equal(
        got.loc[expected.index, expected.columns], expected, check_names=False, check_dtype=False
    )
    assert doc["n"] == len(low) and doc["where"] == {"tide": "low"}


def test_labels_answer_counts_most_frequent_first(client: TestClient) -> None:
    content = harbour_calls()
    intake = profiled(client, content)
    answer = client.get(f"/api/v1/intakes/{intake}/labels", params={"column": "vessel_class"})
    assert answer.status_code == 200, answer.text
    counts = pd.read_csv(io.BytesIO(content)).vessel_class.value_counts()  # pandas reference
    assert [(x["value"], x["count"]) for x in answer.json()] == list(counts.items())


def test_bad_questions_say_what_is_wrong(client: TestClient) -> None:
    intake = profiled(client, harbour_calls())
    same = client.get(f"/api/v1/intakes/{intake}/crosstab", params={"a": "berth", "b": "berth"})
    assert same.status_code == 422 and same.json()["code"] == "bad_query"
    unknown = client.get(
        f"/api/v1/intakes/{intake}/crosstab", params={"a": "berth", "b": "no_such_column"}
    )
    assert unknown.status_code == 422 and "no_such_column" in unknown.json()["detail"]
    assert client.delete(f"/api/v1/intakes/{intake}/file").status_code == 204
    gone = client.get(f"/api/v1/intakes/{intake}/labels", params={"column": "berth"})
    assert gone.status_code == 410 and gone.json()["code"] == "gone"


def test_personal_columns_answer_only_once_unmasked(client: TestClient) -> None:
    rows = 60
    frame = pd.DataFrame(
        {
            "skipper_email": [f"skipper{i % 7}@example.org" for i in range(rows)],
            "berth": ["north", "south", "east"] * (rows // 3),
        }
    )
    intake = profiled(client, frame.to_csv(index=False).encode())
    answer = client.get(
        f"/api/v1/intakes/{intake}/crosstab", params={"a": "skipper_email", "b": "berth"}
    )
    assert answer.status_code == 403 and answer.json()["code"] == "masked"
    allowed = client.get(f"/api/v1/intakes/{intake}/labels", params={"column": "berth"})
    assert allowed.status_code == 200
