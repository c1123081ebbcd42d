"""Refusing path traversal in any parameter that names a file or a sheet.

Stored files are named by their content's digest, never by the upload, so no
request parameter should ever need to reach outside a folder. These checks
refuse what would: separators, parent references, absolute and drive paths,
control characters and NUL bytes, and names that resolve outside their base.

References: OWASP "Path Traversal" (attack examples: ``../``, encoded and
absolute forms); CWE-22.
"""

from __future__ import annotations

import unicodedata
from pathlib import Path


class UnsafeName(ValueError):
    """A file or sheet name that could reach outside where it belongs."""


MAX_NAME_LENGTH = 255
"""Longest name accepted: the common file-system limit for one path component."""


def _has_control(text: str) -> bool:
    return any(unicodedata.category(ch) in ("Cc", "Cf") for ch in text)


def safe_name(name: str) -> str:
    """Return ``name`` when it is one plain path component; raise ``UnsafeName`` otherwise."""
    if not name or name.strip() != name or len(name) > MAX_NAME_LENGTH:
        raise UnsafeName("a name must be 1 to 255 characters with no leading or trailing space")
    if _has_control(name):
        raise UnsafeName("a name cannot hold control characters")
    if "/" in name or "\\" in name:
        raise UnsafeName("a name cannot hold a path separator")
    if name in (".", "..") or ":" in name:
        raise UnsafeName("a name cannot be a parent reference or a drive")
    if "%2e" in name.lower() or "%2f" in name.lower() or "%5c" in name.lower():
        raise UnsafeName("a name cannot hold encoded separators or dots")
    return name


def safe_sheet_name(name: str) -> str:
    """Return a spreadsheet sheet name when it is safe to look up; raise ``UnsafeName``.

    Sheet names may hold spaces and most punctuation, but never the characters
    spreadsheets forbid (``: \\ / ? * [ ]``) nor control characters; at most 31
    characters (the limit of the xlsx format).
    """
    if not name or len(name) > 31:
        raise UnsafeName("a sheet name must be 1 to 31 characters")
    if _has_control(name) or any(ch in name for ch in ":\\/?*[]"):
        raise UnsafeName("a sheet name cannot hold control characters or : \\ / ? * [ ]")
    if name in (".", ".."):
        raise UnsafeName("a sheet name cannot be a parent reference")
    return name


def within(base: Path, name: str) -> Path:
    """The path of ``name`` inside ``base``, refusing anything that resolves outside it."""
    candidate = (base / safe_name(name)).resolve()
    root = base.resolve()
    if candidate.parent != root:
        raise UnsafeName("the name leads outside its folder")
    return candidate
