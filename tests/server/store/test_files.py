"""The content-addressed file store: streamed writes, hashing, limits, nothing half-written."""

from __future__ import annotations

import hashlib
from pathlib import Path

import pytest

from server.store import EmptyFile, FileStore, FileTooLarge


@pytest.fixture
def store(tmp_path: Path) -> FileStore:
    return FileStore(tmp_path, limit_bytes=1000)


def test_chunks_are_stored_under_their_sha256(store: FileStore) -> None:
    chunks = [b"tide,level\n", b"2031-03-01,2.4\n" * 20, b"2031-03-02,1.9\n"]
    stored = store.store_chunks(chunks)
    whole = b"".join(chunks)
    # Reference: hashlib's sha256 of the whole content.
    assert stored.sha256 == hashlib.sha256(whole).hexdigest()
    assert stored.bytes == len(whole)
    assert stored.key == f"{stored.sha256[:2]}/{stored.sha256}"
    assert store.path(stored.key).read_bytes() == whole
    assert store.leftovers() == []


def test_identical_content_is_stored_once(store: FileStore) -> None:
    first = store.store_chunks([b"a,b\n1,2\n"])
    second = store.store_chunks([b"a,b\n", b"1,2\n"])
    assert first == second
    assert len(list(store.files_dir.rglob("*"))) == 2  # one folder, one file
    assert store.leftovers() == []


def test_over_the_limit_raises_and_leaves_nothing(store: FileStore) -> None:
    pending = store.begin()
    pending.write(b"x" * 600)
    with pytest.raises(FileTooLarge, match="1,000 bytes"):
        pending.write(b"x" * 600)
    assert store.leftovers() == []
    assert list(store.files_dir.iterdir()) == []


def test_exactly_the_limit_is_accepted(store: FileStore) -> None:
    stored = store.store_chunks([b"y" * 1000])
    assert stored.bytes == 1000


def test_empty_file_raises_and_leaves_nothing(store: FileStore) -> None:
    with pytest.raises(EmptyFile):
        store.store_chunks([b"", b""])
    assert store.leftovers() == []
    assert list(store.files_dir.iterdir()) == []


def test_an_error_mid_stream_discards_the_partial_file(store: FileStore) -> None:
    def chunks():
        yield b"first part"
        raise ConnectionError("client went away")

    with pytest.raises(ConnectionError):
        store.store_chunks(chunks())
    assert store.leftovers() == []


def test_delete_removes_file_and_columnar_copy(store: FileStore) -> None:
    stored = store.store_chunks([b"a\n1\n"])
    store.columnar_path(stored.key).write_bytes(b"PAR1")
    store.delete(stored.key)
    assert not store.exists(stored.key)
    assert not store.columnar_path(stored.key).exists()
    assert list(store.files_dir.iterdir()) == []


@pytest.mark.parametrize(
    "key", ["../etc/passwd", "ab/../../x", "zz/" + "0" * 64, "00/" + "0" * 63, "/abs"]
)
def test_keys_that_are_not_sha256_names_are_refused(store: FileStore, key: str) -> None:
    with pytest.raises(ValueError, match="not a file key"):
        store.path(key)
