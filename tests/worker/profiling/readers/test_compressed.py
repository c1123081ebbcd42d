"""Gzip and zip deliveries, and the guard against decompression bombs."""

from __future__ import annotations

import gzip
import zipfile
import zlib
from pathlib import Path

import pyarrow as pa
import pytest

from worker.profiling.errors import ProfileError
from worker.profiling.options import ProfileOptions
from worker.profiling.readers import open_table

TEXT = "pallet;dock;crates\nP-1;Nord;4\nP-2;Süd;5\nP-3;Nord;\n"


def _table(path: Path, options: ProfileOptions | None = None) -> tuple[object, pa.Table]:
    with open_table(path, options=options or ProfileOptions()) as source:
        return source, pa.Table.from_batches(list(source.batches()))


def _bomb_bytes(inflated: int) -> bytes:
    """A gzip stream of ``inflated`` bytes of "0,0" rows, built chunk by chunk (a few kB)."""
    packer = zlib.compressobj(9, zlib.DEFLATED, 31)  # wbits 31: gzip framing
    chunk = b"0,0\n" * (256 * 1024)
    parts = [packer.compress(chunk) for _ in range(inflated // len(chunk))]
    return b"".join(parts) + packer.flush()


def test_gzip_is_read_like_the_plain_file(tmp_path: Path) -> None:
    path = tmp_path / "d.csv.gz"
    path.write_bytes(gzip.compress(TEXT.encode("cp1252")))
    source, table = _table(path)
    assert source.info.compression == "gzip"
    assert source.info.encoding == "cp1252"
    assert table.column("dock").to_pylist() == ["Nord", "Süd", "Nord"]
    assert source.bytes_read() == source.total_bytes


def test_single_member_zip_is_read(tmp_path: Path) -> None:
    path = tmp_path / "d.zip"
    with zipfile.ZipFile(path, "w", zipfile.ZIP_DEFLATED) as archive:
        archive.writestr("delivery/pallets.csv", TEXT)
        archive.writestr("__MACOSX/._pallets.csv", b"\x00\x05")
    source, table = _table(path)
    assert source.info.compression == "zip"
    assert table.column("crates").to_pylist() == ["4", "5", None]


def test_multi_member_zip_is_refused(tmp_path: Path) -> None:
    path = tmp_path / "d.zip"
    with zipfile.ZipFile(path, "w") as archive:
        for name in ("a.csv", "b.csv", "c.csv"):
            archive.writestr(name, TEXT)
    with pytest.raises(ProfileError, match="the zip holds 3 files; send one"):
        open_table(path)


def test_gzip_bomb_is_refused_after_a_bounded_read(tmp_path: Path) -> None:
    path = tmp_path / "bomb.csv.gz"
    path.write_bytes(_bomb_bytes(64 * 1024 * 1024))
    assert path.stat().st_size < 200_000  # small file, ratio above 300 by construction
    with pytest.raises(ProfileError, match="decompression bomb"), open_table(path) as source:
        for _ in source.batches():
            pass


def test_zip_bomb_is_refused_from_its_directory(tmp_path: Path) -> None:
    path = tmp_path / "bomb.zip"
    with (
        zipfile.ZipFile(path, "w", zipfile.ZIP_DEFLATED, compresslevel=9) as archive,
        archive.open("zeros.csv", "w") as member,
    ):
        for _ in range(40):
            member.write(b"0" * (1024 * 1024))
    with pytest.raises(ProfileError, match="decompression bomb"):
        open_table(path)


def test_absolute_limit_applies_below_the_ratio(tmp_path: Path) -> None:
    path = tmp_path / "d.csv.gz"
    path.write_bytes(gzip.compress(("a,b\n" + "1,2\n" * 50_000).encode()))
    options = ProfileOptions(decompressed_limit_bytes=100_000, sniff_sample_bytes=4096)
    with pytest.raises(ProfileError, match="limit"), open_table(path, options=options) as source:
        for _ in source.batches():
            pass


def test_truncated_gzip_is_a_clear_error(tmp_path: Path) -> None:
    whole = gzip.compress(("a,b\n" + "".join(f"{n},{n}\n" for n in range(200_000))).encode())
    path = tmp_path / "cut.csv.gz"
    path.write_bytes(whole[: len(whole) // 2])
    options = ProfileOptions(sniff_sample_bytes=4096)
    with pytest.raises(ProfileError, match="truncated"), open_table(path, options=options) as src:
        for _ in src.batches():
            pass


def test_gzip_of_jsonl_is_read(tmp_path: Path) -> None:
    path = tmp_path / "d.jsonl.gz"
    path.write_bytes(gzip.compress(b'{"a": 1}\n{"a": 2, "b": "x"}\n'))
    source, table = _table(path)
    assert (source.info.format, source.info.compression) == ("jsonl", "gzip")
    assert table.column("b").to_pylist() == [None, "x"]
