"""Hostile, broken and mislabelled deliveries through the API: a readable error on the
intake, never a 500 and never a stopped worker; markup from a file stays text in the pages."""

from __future__ import annotations

import gzip
import io
import os
import zipfile

import pytest

from server.settings import Settings
from tests.support import make_supplier, upload, wait_for_intake

GOOD = b"station,level_m\nnorth pier,2.1\nsouth pier,2.4\n"
HOSTILE_NAME = '<script>document.title="owned"</script>'
HOSTILE_VALUE = '<img src=x onerror="document.title=1">'


def _gzip_truncated() -> bytes:
    whole = gzip.compress(b"station,level_m\n" + b"north pier,2.1\n" * 5000)
    return whole[: len(whole) // 2]


def _zip_bomb() -> bytes:
    buffer = io.BytesIO()
    with zipfile.ZipFile(buffer, "w", compression=zipfile.ZIP_DEFLATED) as archive:
        archive.writestr("levels.csv", b"station,level_m\n" + b"0" * (64 * 1024 * 1024))
    return buffer.getvalue()


def _fake_workbook() -> bytes:
    buffer = io.BytesIO()
    with zipfile.ZipFile(buffer, "w") as archive:
        archive.writestr("[Content_Types].xml", "<Types/>")
        archive.writestr("xl/workbook.xml", "<workbook><sheets>")  # cut short
    return buffer.getvalue()


def _workbook_with_external_entity() -> bytes:
    """A real workbook whose sheet declares an entity that reads a local file (XXE)."""
    from openpyxl import Workbook

    book = Workbook()
    book.active.append(["station", "level_m"])
    book.active.append(["north pier", 2.1])
    clean = io.BytesIO()
    book.save(clean)
    attack = '<?xml version="1.0"?><!DOCTYPE x [<!ENTITY leak SYSTEM "file:///etc/passwd">]>'
    attacked = io.BytesIO()
    with zipfile.ZipFile(clean) as source, zipfile.ZipFile(attacked, "w") as target:
        for info in source.infolist():
            data = source.read(info)
            if info.filename == "xl/worksheets/sheet1.xml":
                text = data.decode()
                body = text[text.index("<worksheet") :].replace("north pier", "&leak;")
                data = (attack + body).encode()
            target.writestr(info, data)
    return attacked.getvalue()


BROKEN = {
    "external XML entity": ("levels.xlsx", _workbook_with_external_entity()),
    "random bytes": ("levels.csv", os.urandom(4096)),
    "truncated gzip": ("levels.csv.gz", _gzip_truncated()),
    "decompression bomb": ("levels.zip", _zip_bomb()),
    "broken workbook": ("levels.xlsx", _fake_workbook()),
    "a PNG named .csv": ("levels.csv", b"\x89PNG\r\n\x1a\n" + os.urandom(2048)),
    "NUL bytes only": ("levels.csv", b"\x00" * 2048),
}

# A word of the plain reason each one gets.
WORDS = {
    "external XML entity": "entit",
    "random bytes": "binary",
    "truncated gzip": "truncated",
    "decompression bomb": "inflates",
    "broken workbook": "workbook",
    "a PNG named .csv": "PNG",
    "NUL bytes only": "binary",
}


@pytest.mark.parametrize("case", sorted(BROKEN))
def test_broken_files_fail_with_a_readable_reason(client, app_settings: Settings, case) -> None:
    supplier = make_supplier(client)
    name, content = BROKEN[case]
    answer = upload(client, content, supplier=supplier["name"], name=name)
    assert answer.status_code == 201, answer.text  # stored; the reason comes from profiling
    intake = wait_for_intake(client, answer.json()["id"])
    error = intake["error"]
    assert intake["status"] == "failed" and error
    assert "Traceback" not in error and str(app_settings.data_dir) not in error
    assert "root:" not in error  # nothing of a local file leaks out
    assert len(error) < 500
    assert WORDS[case] in error
    refused = client.get(f"/api/v1/intakes/{intake['id']}/profile")
    assert refused.status_code == 409 and refused.json()["code"] == "failed"
    # The worker is still there: a good delivery right after profiles.
    good = upload(client, GOOD, supplier=supplier["name"], name="good.csv").json()
    assert wait_for_intake(client, good["id"])["status"] == "ready"


def test_the_bomb_is_refused_for_its_ratio(client) -> None:
    supplier = make_supplier(client)
    answer = upload(client, _zip_bomb(), supplier=supplier["name"], name="levels.zip")
    intake = wait_for_intake(client, answer.json()["id"])
    assert intake["status"] == "failed" and "inflates" in intake["error"]


def test_empty_and_oversized_uploads_are_refused_up_front(client, app_settings) -> None:
    supplier = make_supplier(client)
    empty = upload(client, b"", supplier=supplier["name"])
    assert empty.status_code == 422 and empty.json()["detail"]
    big = upload(client, b"x" * (app_settings.upload_limit_bytes + 1), supplier=supplier["name"])
    assert big.status_code == 413 and "limit" in big.json()["detail"]


def test_a_path_in_the_upload_name_is_kept_as_text_only(client, app_settings) -> None:
    supplier = make_supplier(client)
    answer = upload(client, GOOD, supplier=supplier["name"], name="../../etc/passwd")
    assert answer.status_code == 201
    assert "/" not in answer.json()["original_name"]
    stored = [p for p in (app_settings.data_dir / "files").rglob("*") if p.is_file()]
    assert stored and all("passwd" not in p.name for p in stored)
    assert not (app_settings.data_dir.parent / "etc").exists()


def test_markup_in_names_and_values_is_escaped_in_the_pages(client) -> None:
    supplier = make_supplier(client)
    content = f"{HOSTILE_NAME},level_m\n{HOSTILE_VALUE},2.1\n{HOSTILE_VALUE},2.2\n".encode()
    answer = upload(client, content, supplier=supplier["name"], name=f"{HOSTILE_NAME}.csv")
    intake = wait_for_intake(client, answer.json()["id"])
    assert intake["status"] == "ready", intake["error"]
    # JSON carries the text as it was: it is data, not markup.
    profile = client.get(f"/api/v1/intakes/{intake['id']}/profile").json()
    assert profile["columns"][0]["name"] == HOSTILE_NAME
    assert "&lt;script&gt;document.title" in client.get(f"/intakes/{intake['id']}").text
    for path in (f"/intakes/{intake['id']}", "/"):
        page = client.get(path)
        assert page.status_code == 200
        assert "<script>document.title" not in page.text
        assert "<img src=x" not in page.text
        assert page.headers["content-security-policy"].startswith("default-src 'self'")
