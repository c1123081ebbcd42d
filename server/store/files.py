"""Content-addressed storage of delivered files.

An upload is written in chunks to a temporary file in the store's own ``tmp``
folder (same file system, so the final rename is atomic), hashed with sha256
while it streams, checked against the size limit chunk by chunk, fsynced, then
renamed to ``files/<first two hex digits>/<sha256>``. The stored name comes
from the content only, never from the uploaded name. A file that goes over the
limit or turns out empty is removed at once: nothing half-written is left.

The Parquet columnar copy of a stored file lives beside it
(``<sha256>.parquet``).
"""

from __future__ import annotations

import contextlib
import hashlib
import os
import uuid
from collections.abc import Iterable
from dataclasses import dataclass
from pathlib import Path
from types import TracebackType
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from server.settings import Settings


class FileTooLarge(Exception):
    """The upload went over the size limit; it has been discarded."""

    def __init__(self, limit_bytes: int) -> None:
        super().__init__(f"the file is larger than the upload limit of {limit_bytes:,} bytes")
        self.limit_bytes = limit_bytes


class EmptyFile(Exception):
    """The upload held no bytes at all; it has been discarded."""

    def __init__(self) -> None:
        super().__init__("the file is empty (0 bytes)")


@dataclass(frozen=True)
class StoredFile:
    """A durable file in the store."""

    key: str
    sha256: str
    bytes: int


def _fsync_dir(path: Path) -> None:
    fd = os.open(path, os.O_RDONLY)
    try:
        os.fsync(fd)
    finally:
        os.close(fd)


class PendingFile:
    """An upload being written; ``commit`` makes it durable, ``abort`` discards it.

    Used as a context manager, it is aborted unless committed.
    """

    def __init__(self, store: FileStore) -> None:
        self._store = store
        self._tmp = store.tmp_dir / f"{uuid.uuid4().hex}.part"
        self._handle = open(self._tmp, "xb")  # noqa: SIM115 - closed in commit/abort
        self._hash = hashlib.sha256()
        self._size = 0
        self._done = False

    @property
    def size(self) -> int:
        """Bytes written so far."""
        return self._size

    def write(self, chunk: bytes) -> None:
        """Append a chunk; raises FileTooLarge (and discards the file) over the limit."""
        if not chunk:
            return
        self._size += len(chunk)
        if self._size > self._store.limit_bytes:
            self.abort()
            raise FileTooLarge(self._store.limit_bytes)
        self._hash.update(chunk)
        self._handle.write(chunk)

    def commit(self) -> StoredFile:
        """Flush, fsync and rename into place; raises EmptyFile for a 0-byte upload."""
        if self._done:
            raise RuntimeError("this upload is already finished")
        if self._size == 0:
            self.abort()
            raise EmptyFile()
        self._handle.flush()
        os.fsync(self._handle.fileno())
        self._handle.close()
        digest = self._hash.hexdigest()
        key = f"{digest[:2]}/{digest}"
        target = self._store.path(key)
        target.parent.mkdir(parents=True, exist_ok=True)
        if target.exists():
            # Same content already stored: keep the durable copy, drop this one.
            self._tmp.unlink()
        else:
            os.replace(self._tmp, target)
            _fsync_dir(target.parent)
        self._done = True
        return StoredFile(key=key, sha256=digest, bytes=self._size)

    def abort(self) -> None:
        """Discard the temporary file (safe to call more than once)."""
        if self._done:
            return
        self._done = True
        self._handle.close()
        self._tmp.unlink(missing_ok=True)

    def __enter__(self) -> PendingFile:
        return self

    def __exit__(
        self,
        exc_type: type[BaseException] | None,
        exc: BaseException | None,
        tb: TracebackType | None,
    ) -> None:
        self.abort()


class FileStore:
    """Delivered files under ``root``, named by their sha256."""

    def __init__(self, root: Path, *, limit_bytes: int) -> None:
        self.root = Path(root)
        self.limit_bytes = limit_bytes
        self.files_dir = self.root / "files"
        self.tmp_dir = self.root / "tmp"
        self.files_dir.mkdir(parents=True, exist_ok=True)
        self.tmp_dir.mkdir(parents=True, exist_ok=True)

    def begin(self) -> PendingFile:
        """Start writing a new upload."""
        return PendingFile(self)

    def store_chunks(self, chunks: Iterable[bytes]) -> StoredFile:
        """Store a whole file given as chunks (demo data, tests, imports)."""
        with self.begin() as pending:
            for chunk in chunks:
                pending.write(chunk)
            return pending.commit()

    def path(self, key: str) -> Path:
        """Where the stored file of ``key`` lives."""
        if not _valid_key(key):
            raise ValueError(f"not a file key: {key!r}")
        return self.files_dir / key

    def columnar_path(self, key: str) -> Path:
        """Where the Parquet copy of the stored file of ``key`` lives (beside it)."""
        return self.path(key).with_suffix(".parquet")

    def exists(self, key: str) -> bool:
        """Whether the stored file of ``key`` is present."""
        return self.path(key).is_file()

    def delete(self, key: str) -> None:
        """Remove a stored file and its columnar copy (missing ones are fine)."""
        path = self.path(key)
        path.unlink(missing_ok=True)
        self.columnar_path(key).unlink(missing_ok=True)
        with contextlib.suppress(OSError):  # still holds other files
            path.parent.rmdir()

    def leftovers(self) -> list[Path]:
        """Temporary files not yet committed or aborted (empty when nothing is in flight)."""
        return sorted(self.tmp_dir.iterdir())


def _valid_key(key: str) -> bool:
    head, _, digest = key.partition("/")
    return len(digest) == 64 and head == digest[:2] and all(c in "0123456789abcdef" for c in digest)


def file_store(settings: Settings) -> FileStore:
    """The deployment's file store, under the settings' data folder."""
    return FileStore(settings.data_dir, limit_bytes=settings.upload_limit_bytes)
