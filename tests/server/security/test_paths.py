"""Recognising path traversal in request text (OWASP Path Traversal, CWE-22)."""

from __future__ import annotations

import pytest

from server.security.paths import looks_like_traversal


# Attack forms from OWASP's Path Traversal page: parent references, backslashes, NUL bytes.
@pytest.mark.parametrize(
    "text", ["../x", "..\\x", "..", " .. ", "a\x00b", "x/../y", "..\\..\\boot.ini"]
)
def test_traversal_is_recognised(text: str) -> None:
    assert looks_like_traversal(text)


@pytest.mark.parametrize("text", ["a..b", "...", "v1.2", "north/south", "2.5", "März.xlsx"])
def test_ordinary_values_are_not_traversal(text: str) -> None:
    assert not looks_like_traversal(text)
