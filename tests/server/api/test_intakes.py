"""/api/v1/intakes in the embedded deployment: upload over HTTP, profile in the background."""

from __future__ import annotations

import io
from pathlib import Path

import pandas as pd
import pytest

from server.settings import Settings
from tests.support import make_supplier, upload, wait_for_intake

# Invented delivery, planted with one missing level.
DELIVERY = (
    b"reading_time,water_level_m,sensor_status\n"
    b"2031-03-01 00:00,2.10,ok\n"
    b"2031-03-01 00:10,2.25,ok\n"
    b"2031-03-01 00:20,,fault\n"
    b"2031-03-01 00:30,2.61,ok\n"
)


def _store_is_clean(settings: Settings) -> bool:
    tmp = settings.data_dir / "tmp"
    return not tmp.exists() or not any(tmp.iterdir())


def _stored_files(settings: Settings) -> list[Path]:
    return sorted(p for p in (settings.data_dir / "files").rglob("*") if p.is_file())


def test_upload_then_profile_end_to_end(client, app_settings: Settings) -> None:
    supplier = make_supplier(client)
    answer = upload(client, DELIVERY, supplier=supplier["name"], name="gullwick-03.csv")
    assert answer.status_code == 201, answer.text
    created = answer.json()
    assert created["status"] == "queued"
    assert answer.headers["location"] == f"/api/v1/intakes/{created['id']}"
    assert created["bytes"] == len(DELIVERY)

    intake = wait_for_intake(client, created["id"])
    assert intake["status"] == "ready", intake["error"]
    assert intake["progress"] == 1.0
    assert intake["headline"]["rows"] == 4
    assert intake["headline"]["columns"] == 3

    profile = client.get(f"/api/v1/intakes/{created['id']}/profile").json()
    assert profile["format_version"] == 1
    assert profile["source"]["name"] == "gullwick-03.csv"
    assert profile["source"]["sha256"] == created["sha256"]
    # Reference: pandas reads the same bytes to 4 rows with one missing level.
    frame = pd.read_csv(io.BytesIO(DELIVERY))
    assert profile["dataset"]["rows"] == len(frame)
    levels = next(c for c in profile["columns"] if c["name"] == "water_level_m")
    assert levels["missing"] == int(frame["water_level_m"].isna().sum())


def test_stored_file_is_named_by_content_and_downloadable(client, app_settings: Settings) -> None:
    make_supplier(client)
    created = upload(client, DELIVERY, supplier=1, name="../../etc/passwd").json()
    assert created["original_name"] == "passwd"
    files = _stored_files(app_settings)
    assert [p.name for p in files] == [created["sha256"]]
    download = client.get(f"/api/v1/intakes/{created['id']}/file")
    assert download.status_code == 200
    assert download.content == DELIVERY
    assert "passwd" in download.headers["content-disposition"]


def test_over_the_limit_is_413_and_leaves_nothing(client, app_settings: Settings) -> None:
    make_supplier(client)
    too_big = b"a,b\n" + b"1,2\n" * (app_settings.upload_limit_bytes // 4 + 10)
    answer = upload(client, too_big, supplier=1)
    assert answer.status_code == 413
    assert "upload limit" in answer.json()["detail"]
    assert _store_is_clean(app_settings)
    assert _stored_files(app_settings) == []
    assert client.get("/api/v1/intakes").json()["total"] == 0


def test_empty_file_is_422_and_leaves_nothing(client, app_settings: Settings) -> None:
    make_supplier(client)
    answer = upload(client, b"", supplier=1)
    assert answer.status_code == 422
    assert answer.json()["code"] == "empty_file"
    assert _store_is_clean(app_settings)
    assert _stored_files(app_settings) == []
    assert client.get("/api/v1/intakes").json()["total"] == 0


def test_unreadable_file_fails_with_its_reason(client, app_settings: Settings) -> None:
    make_supplier(client)
    garbage = bytes(range(256)) * 8  # not a table in any format
    created = upload(client, garbage, supplier=1, name="broken.csv").json()
    intake = wait_for_intake(client, created["id"])
    assert intake["status"] == "failed"
    assert intake["error"]  # the engine's plain reason
    assert intake["headline"] is None
    answer = client.get(f"/api/v1/intakes/{created['id']}/profile")
    assert answer.status_code == 409
    assert intake["error"] in answer.json()["detail"]
    parquet = [p for p in _stored_files(app_settings) if ".parquet" in p.name]
    assert parquet == []  # no half-written columnar copy
    assert _store_is_clean(app_settings)


def test_unknown_or_missing_supplier_is_422_and_discards_the_file(
    client, app_settings: Settings
) -> None:
    answer = upload(client, DELIVERY, supplier="Nobody at all")
    assert answer.status_code == 422
    assert answer.json()["code"] == "unknown_supplier"
    answer = client.post("/api/v1/intakes", files={"file": ("a.csv", DELIVERY)})
    assert answer.json()["code"] == "no_supplier"
    assert _stored_files(app_settings) == []


def test_body_that_is_not_a_form_is_415(client) -> None:
    answer = client.post("/api/v1/intakes", content=DELIVERY, headers={"content-type": "text/csv"})
    assert answer.status_code == 415
    assert "multipart/form-data" in answer.json()["detail"]


def test_form_without_file_is_422(client) -> None:
    make_supplier(client)
    # A multipart form whose parts are all text fields.
    answer = client.post("/api/v1/intakes", files={"supplier": (None, "1"), "note": (None, "x")})
    assert answer.status_code == 422
    assert answer.json()["code"] == "no_file"


def test_same_bytes_again_points_at_the_earlier_intake(client) -> None:
    make_supplier(client)
    first = upload(client, DELIVERY, supplier=1).json()
    second = upload(client, DELIVERY, supplier=1, name="resent.csv").json()
    assert second["same_content_as"] == [first["id"]]


def test_listing_filters_and_pages(client) -> None:
    tide = make_supplier(client, "Gullwick tide-gauge station")
    fish = make_supplier(client, "Brannock Bay fishing cooperative")
    ids = []
    for n in range(3):
        ids.append(upload(client, DELIVERY + b"x" * n, supplier=tide["id"]).json()["id"])
    upload(client, DELIVERY + b"y", supplier=fish["id"])
    for intake_id in ids:
        wait_for_intake(client, intake_id)

    page = client.get("/api/v1/intakes", params={"supplier": tide["id"], "limit": 2}).json()
    assert page["total"] == 3
    assert [i["id"] for i in page["items"]] == [ids[2], ids[1]]  # newest first
    rest = client.get(
        "/api/v1/intakes", params={"supplier": tide["id"], "limit": 2, "offset": 2}
    ).json()
    assert [i["id"] for i in rest["items"]] == [ids[0]]
    assert client.get("/api/v1/intakes", params={"status": "queued"}).status_code == 200
    bad = client.get("/api/v1/intakes", params={"status": "sunk"})
    assert bad.status_code == 422
    assert bad.json()["errors"][0]["field"] == "status"
    assert client.get("/api/v1/intakes", params={"limit": 0}).status_code == 422


def test_purging_the_file_keeps_the_profile(client, app_settings: Settings) -> None:
    make_supplier(client)
    created = upload(client, DELIVERY, supplier=1).json()
    wait_for_intake(client, created["id"])
    assert client.delete(f"/api/v1/intakes/{created['id']}/file").status_code == 204
    intake = client.get(f"/api/v1/intakes/{created['id']}").json()
    assert intake["file_available"] is False
    assert intake["file_purged_at"] is not None
    assert client.get(f"/api/v1/intakes/{created['id']}/profile").status_code == 200
    assert client.get(f"/api/v1/intakes/{created['id']}/file").status_code == 410
    assert _stored_files(app_settings) == []
    # Purging again is harmless.
    assert client.delete(f"/api/v1/intakes/{created['id']}/file").status_code == 204


def test_a_shared_file_survives_until_its_last_intake_purges_it(
    client, app_settings: Settings
) -> None:
    make_supplier(client)
    first = upload(client, DELIVERY, supplier=1).json()
    second = upload(client, DELIVERY, supplier=1).json()
    wait_for_intake(client, first["id"])
    wait_for_intake(client, second["id"])
    client.delete(f"/api/v1/intakes/{first['id']}/file")
    assert client.get(f"/api/v1/intakes/{second['id']}/file").content == DELIVERY
    client.delete(f"/api/v1/intakes/{second['id']}/file")
    assert [p for p in _stored_files(app_settings) if p.name == first["sha256"]] == []


def test_reprofile_runs_the_job_again(client) -> None:
    make_supplier(client)
    created = upload(client, DELIVERY, supplier=1).json()
    wait_for_intake(client, created["id"])
    answer = client.post(f"/api/v1/intakes/{created['id']}/reprofile")
    assert answer.status_code == 202
    intake = wait_for_intake(client, created["id"])
    assert intake["status"] == "ready"
    assert intake["attempts"] == 1  # counted afresh


@pytest.mark.parametrize(
    "path",
    ["/api/v1/intakes/999", "/api/v1/intakes/999/profile", "/api/v1/intakes/999/file"],
)
def test_unknown_intake_is_404(client, path: str) -> None:
    answer = client.get(path)
    assert answer.status_code == 404
    assert answer.json() == {"detail": "there is no intake 999", "code": "not_found"}


def test_non_numeric_id_is_422_not_500(client) -> None:
    answer = client.get("/api/v1/intakes/first")
    assert answer.status_code == 422
    assert answer.json()["code"] == "invalid_request"
