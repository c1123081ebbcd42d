"""Files that cannot be read at all give one plain reason."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from worker.profiling.errors import ProfileError
from worker.profiling.readers import open_table


@pytest.mark.parametrize(
    ("content", "reason"),
    [
        (b"", "the file is empty"),
        (b"\n\n  \n", "only blank lines"),
        (b"%PDF-1.7\n%\xe2\xe3\xcf\xd3\n1 0 obj", "this looks like a PDF, not a table"),
        (b"\x89PNG\r\n\x1a\n\x00\x00\x00\rIHDR", "PNG image"),
        (b"\xd0\xcf\x11\xe0\xa1\xb1\x1a\xe1" + b"\x00" * 100, r"\.xls"),
        (b"PK\x05\x06" + b"\x00" * 18, "the zip file is empty"),
        (b'[{"a": 1}, {"a": 2}]', "not JSON Lines"),
    ],
)
def test_unreadable_files_name_the_reason(tmp_path: Path, content: bytes, reason: str) -> None:
    path = tmp_path / "delivery.csv"
    path.write_bytes(content)
    with pytest.raises(ProfileError, match=reason):
        open_table(path)


def test_binary_garbage_is_refused(tmp_path: Path) -> None:
    path = tmp_path / "noise.csv"
    path.write_bytes(np.random.default_rng(7).integers(0, 256, 50_000, dtype=np.uint8).tobytes())
    with pytest.raises(ProfileError, match="binary data"):
        open_table(path)


def test_missing_file_is_a_clear_error(tmp_path: Path) -> None:
    with pytest.raises(ProfileError, match=r"no file called absent\.csv"):
        open_table(tmp_path / "absent.csv")


def test_sheet_is_only_for_workbooks(tmp_path: Path) -> None:
    path = tmp_path / "d.csv"
    path.write_text("a,b\n1,2\n")
    with pytest.raises(ProfileError, match="only Excel files have sheets"):
        open_table(path, sheet="Sheet1")
