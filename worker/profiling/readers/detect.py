"""What kind of file this is, from its first bytes (magic numbers), not its name.

References: the signatures are the ones each format's specification puts at
offset 0 (gzip RFC 1952, zip APPNOTE, Apache Parquet "PAR1", PDF, PNG...).
"""

from __future__ import annotations

from worker.profiling.errors import ProfileError
from worker.profiling.readers.encoding import utf16_without_bom

GZIP_MAGIC = b"\x1f\x8b"
ZIP_MAGIC = b"PK\x03\x04"
EMPTY_ZIP_MAGIC = b"PK\x05\x06"
PARQUET_MAGIC = b"PAR1"

# Files people send by mistake, with the sentence that tells them so.
NOT_A_TABLE: tuple[tuple[bytes, str], ...] = (
    (b"%PDF-", "this looks like a PDF, not a table"),
    (b"\x89PNG", "this looks like a PNG image, not a table"),
    (b"\xff\xd8\xff", "this looks like a JPEG image, not a table"),
    (b"GIF8", "this looks like a GIF image, not a table"),
    (
        b"\xd0\xcf\x11\xe0\xa1\xb1\x1a\xe1",
        "this looks like an old binary Excel (.xls) or Word file; save it as .xlsx or CSV",
    ),
    (b"7z\xbc\xaf\x27\x1c", "this is a 7-Zip archive; send a gzip or zip file instead"),
    (b"Rar!\x1a\x07", "this is a RAR archive; send a gzip or zip file instead"),
    (b"\xfd7zXZ\x00", "this is an xz file; send it uncompressed, gzipped or zipped"),
    (b"\x7fELF", "this looks like a program, not a table"),
    (b"SQLite format 3\x00", "this is a SQLite database; export a table as CSV or Parquet"),
)

UTF16_BOMS = (b"\xff\xfe", b"\xfe\xff")


def compression_of(head: bytes) -> str | None:
    """``"gzip"``, ``"zip"`` or None, from the file's first bytes."""
    if head.startswith(GZIP_MAGIC):
        return "gzip"
    if head.startswith(ZIP_MAGIC):
        return "zip"
    if head.startswith(EMPTY_ZIP_MAGIC):
        raise ProfileError("the zip file is empty")
    return None


def looks_like_utf16(head: bytes) -> bool:
    """True for UTF-16 text: a byte order mark, or every other byte zero in ASCII text."""
    return head.startswith(UTF16_BOMS) or utf16_without_bom(head) is not None


def format_of(head: bytes) -> str:
    """``"parquet"``, ``"jsonl"`` or ``"csv"`` for readable content, else ProfileError.

    ``head`` is the start of the (decompressed) content. JSON Lines is chosen
    when the first non-blank character opens an object; anything else that is
    text is read as delimited text.
    """
    if not head:
        raise ProfileError("the file is empty")
    if head.startswith(PARQUET_MAGIC):
        return "parquet"
    for magic, reason in NOT_A_TABLE:
        if head.startswith(magic):
            raise ProfileError(reason)
    if head.startswith((GZIP_MAGIC, ZIP_MAGIC)):
        raise ProfileError("this is a compressed file inside a compressed file; send one layer")
    if looks_like_utf16(head):
        return "csv"
    if _is_binary(head):
        raise ProfileError("this is binary data, not a text table")
    stripped = head.lstrip(b"\xef\xbb\xbf \t\r\n")
    if not stripped:
        raise ProfileError("the file holds only blank lines")
    if stripped.startswith(b"{"):
        return "jsonl"
    if stripped.startswith(b"["):
        raise ProfileError("this is a JSON document, not JSON Lines; send one JSON object per line")
    return "csv"


def _is_binary(head: bytes) -> bool:
    """Text has no NUL bytes and few control characters other than tab, CR, LF, FF."""
    sample = head[:8192]
    if b"\x00" in sample:
        return True
    controls = sum(sample.count(bytes([c])) for c in range(32) if c not in (9, 10, 12, 13))
    return controls > 0.05 * len(sample)
