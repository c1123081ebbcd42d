"""Gzip and single-member zip deliveries, opened as a guarded decompressing stream.

The guard counts the bytes it hands out and stops as soon as they pass the
absolute limit, or pass the allowed ratio to the compressed size: a few
kilobytes that inflate to gigabytes (a decompression bomb) are refused after
reading a bounded amount, never after filling memory or disk.
"""

from __future__ import annotations

import gzip
import io
import zipfile
import zlib
from pathlib import Path
from typing import BinaryIO

from worker.profiling.errors import ProfileError
from worker.profiling.options import ProfileOptions

# Small deliveries are never refused for their ratio: below this many
# decompressed bytes a high ratio does no harm (common practice).
RATIO_GRACE_BYTES = 16 * 1024**2
# Folders and metadata that archivers add beside the one real member.
ZIP_JUNK_PREFIXES = ("__MACOSX/",)


class GuardedStream(io.RawIOBase):
    """A read-only decompressing stream that refuses decompression bombs."""

    def __init__(
        self,
        inner: BinaryIO,
        *,
        compressed_size: int,
        options: ProfileOptions,
        raw: BinaryIO | None = None,
        declared_size: int | None = None,
    ) -> None:
        super().__init__()
        self._inner = inner
        self._raw = raw
        self._compressed_size = max(compressed_size, 1)
        self._declared_size = declared_size
        self._byte_limit = options.decompressed_limit_bytes
        self._ratio_limit = options.decompression_ratio_limit
        self.produced = 0
        self.refusal: ProfileError | None = None

    def readable(self) -> bool:
        return True

    def readinto(self, buffer: bytearray | memoryview) -> int:  # type: ignore[override]
        data = self.read(len(buffer))
        buffer[: len(data)] = data
        return len(data)

    def read(self, size: int | None = -1) -> bytes:
        if self.refusal is not None:
            raise self.refusal
        try:
            data = self._inner.read(size if size is not None and size >= 0 else -1)
        except EOFError as exc:
            self.refusal = ProfileError("the compressed file is truncated (it ends too early)")
            raise self.refusal from exc
        except (OSError, zlib.error, zipfile.BadZipFile) as exc:
            self.refusal = ProfileError(f"the compressed file is damaged ({exc})")
            raise self.refusal from exc
        self.produced += len(data)
        if self.produced > self._byte_limit:
            self.refusal = ProfileError(
                f"the file inflates to more than {self._byte_limit:,} bytes, "
                "the limit for a compressed delivery"
            )
        elif (
            self.produced > RATIO_GRACE_BYTES
            and self.produced > self._ratio_limit * self._compressed_size
        ):
            self.refusal = ProfileError(
                f"the file inflates more than {self._ratio_limit:g} times its compressed size; "
                "it looks like a decompression bomb"
            )
        if self.refusal is not None:
            raise self.refusal
        return data

    def compressed_bytes_read(self) -> int:
        """Bytes of the compressed file consumed so far (exact for gzip, estimated for zip)."""
        if self._raw is not None:
            return self._raw.tell()
        if self._declared_size:
            return int(self.produced * self._compressed_size / self._declared_size)
        return 0

    def close(self) -> None:
        if not self.closed:
            self._inner.close()
            if self._raw is not None:
                self._raw.close()
        super().close()


def zip_member(archive: zipfile.ZipFile) -> zipfile.ZipInfo:
    """The one file a zip delivery holds, or ProfileError naming what is wrong."""
    members = [
        info
        for info in archive.infolist()
        if not info.is_dir() and not info.filename.startswith(ZIP_JUNK_PREFIXES)
    ]
    if not members:
        raise ProfileError("the zip file holds no files")
    if len(members) > 1:
        raise ProfileError(f"the zip holds {len(members)} files; send one")
    member = members[0]
    if member.flag_bits & 0x1:
        raise ProfileError("the zip file is password-protected")
    return member


def check_declared_sizes(archive: zipfile.ZipFile, options: ProfileOptions) -> None:
    """Refuse a zip whose own directory announces a bomb, before inflating anything."""
    for info in archive.infolist():
        if info.file_size > options.decompressed_limit_bytes:
            raise ProfileError(
                f"{info.filename} inflates to {info.file_size:,} bytes, more than the limit "
                f"of {options.decompressed_limit_bytes:,}"
            )
        ratio = info.file_size / max(info.compress_size, 1)
        if info.file_size > RATIO_GRACE_BYTES and ratio > options.decompression_ratio_limit:
            raise ProfileError(
                f"{info.filename} inflates {ratio:,.0f} times its compressed size; "
                "it looks like a decompression bomb"
            )


def open_decompressed(path: Path, compression: str, options: ProfileOptions) -> GuardedStream:
    """The decompressed content of a gzip or single-member zip file, as a guarded stream."""
    size = path.stat().st_size
    if compression == "gzip":
        raw = open(path, "rb")  # noqa: SIM115 (closed by the stream)
        return GuardedStream(
            gzip.GzipFile(fileobj=raw, mode="rb"), compressed_size=size, options=options, raw=raw
        )
    try:
        archive = zipfile.ZipFile(path)
    except (zipfile.BadZipFile, OSError) as exc:
        raise ProfileError(f"the zip file is damaged ({exc})") from exc
    try:
        member = zip_member(archive)
        check_declared_sizes(archive, options)
        inner = archive.open(member)
    except (zipfile.BadZipFile, NotImplementedError) as exc:
        archive.close()
        raise ProfileError(f"the zip file cannot be opened ({exc})") from exc
    except ProfileError:
        archive.close()
        raise
    return GuardedStream(
        _ClosingMember(inner, archive),
        compressed_size=member.compress_size,
        options=options,
        declared_size=member.file_size,
    )


class _ClosingMember:
    """A zip member's stream that also closes its archive."""

    def __init__(self, member: BinaryIO, archive: zipfile.ZipFile) -> None:
        self._member = member
        self._archive = archive

    def read(self, size: int = -1) -> bytes:
        return self._member.read(size)

    def close(self) -> None:
        self._member.close()
        self._archive.close()


def read_head(stream: BinaryIO, size: int) -> bytes:
    """Up to ``size`` bytes from the start of a stream (fewer only at its end)."""
    chunks = []
    remaining = size
    while remaining > 0:
        chunk = stream.read(remaining)
        if not chunk:
            break
        chunks.append(chunk)
        remaining -= len(chunk)
    return b"".join(chunks)
