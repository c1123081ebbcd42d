"""Path traversal refused in names of files and sheets (OWASP Path Traversal, CWE-22)."""

from __future__ import annotations

from pathlib import Path

import pytest

from server.security.paths import (
    UnsafeName,
    looks_like_traversal,
    safe_name,
    safe_sheet_name,
    within,
)

# Attack forms from OWASP's Path Traversal page: parent references, absolute paths,
# backslashes, encoded dots and slashes, NUL bytes.
HOSTILE = [
    "../etc/passwd",
    "..",
    ".",
    "/etc/passwd",
    "..\\..\\boot.ini",
    "C:\\Windows",
    "c:boot.ini",
    "%2e%2e%2fsecret",
    "..%2fsecret",
    "%5c..",
    "name\x00.csv",
    "name\n.csv",
    " leading-space.csv",
    "",
    "x" * 256,
]


@pytest.mark.parametrize("name", HOSTILE)
def test_hostile_names_are_refused(name: str) -> None:
    with pytest.raises(UnsafeName):
        safe_name(name)


@pytest.mark.parametrize("name", ["deliveries.csv", "März 2026.xlsx", "a..b.csv", "x" * 255])
def test_plain_names_pass(name: str) -> None:
    assert safe_name(name) == name


def test_within_stays_inside_its_base(tmp_path: Path) -> None:
    assert within(tmp_path, "ab12.csv") == (tmp_path / "ab12.csv").resolve()
    with pytest.raises(UnsafeName):
        within(tmp_path, "../outside.csv")


def test_within_refuses_a_symlink_leading_out(tmp_path: Path) -> None:
    outside = tmp_path / "outside"
    outside.mkdir()
    base = tmp_path / "base"
    base.mkdir()
    (base / "link").symlink_to(outside / "target.csv")
    with pytest.raises(UnsafeName):
        within(base, "link")


@pytest.mark.parametrize("name", ["Sheet1", "Q1 deliveries", "north-east (2026)"])
def test_plain_sheet_names_pass(name: str) -> None:
    assert safe_sheet_name(name) == name


@pytest.mark.parametrize("name", ["../x", "a/b", "a\\b", "a:b", "a*", "[x]", "", "x" * 32, ".."])
def test_hostile_sheet_names_are_refused(name: str) -> None:
    with pytest.raises(UnsafeName):
        safe_sheet_name(name)


@pytest.mark.parametrize("text", ["../x", "..\\x", "..", " .. ", "a\x00b", "x/../y"])
def test_traversal_is_recognised(text: str) -> None:
    assert looks_like_traversal(text)


@pytest.mark.parametrize("text", ["a..b", "...", "v1.2", "north/south", "2.5"])
def test_ordinary_values_are_not_traversal(text: str) -> None:
    assert not looks_like_traversal(text)
