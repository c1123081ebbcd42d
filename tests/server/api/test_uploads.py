"""Receiving an upload: streamed to disk as it arrives, stopped as soon as it is too large."""

from __future__ import annotations

import asyncio
from pathlib import Path

import pytest
from starlette.requests import Request

from server.api.errors import ApiError
from server.api.uploads import clean_filename, receive_upload
from server.store import FileStore

BOUNDARY = "tw-test-boundary"
CHUNK = 64 * 1024


def _body(file_bytes: bytes, supplier: str = "1") -> bytes:
    return (
        (
            f"--{BOUNDARY}\r\n"
            'Content-Disposition: form-data; name="supplier"\r\n\r\n'
            f"{supplier}\r\n"
            f"--{BOUNDARY}\r\n"
            'Content-Disposition: form-data; name="file"; filename="levels.csv"\r\n'
            "Content-Type: text/csv\r\n\r\n"
        ).encode()
        + file_bytes
        + f"\r\n--{BOUNDARY}--\r\n".encode()
    )


class ChunkedClient:
    """An ASGI ``receive`` that sends a body in chunks and watches the store between them."""

    def __init__(self, body: bytes, store: FileStore) -> None:
        self.chunks = [body[i : i + CHUNK] for i in range(0, len(body), CHUNK)]
        self.store = store
        self.calls = 0
        self.partial_sizes: list[int] = []

    async def receive(self) -> dict:
        self.partial_sizes.append(sum(p.stat().st_size for p in self.store.leftovers()))
        index = self.calls
        self.calls += 1
        return {
            "type": "http.request",
            "body": self.chunks[index],
            "more_body": index < len(self.chunks) - 1,
        }


def _request(client: ChunkedClient, content_length: int | None = None) -> Request:
    headers = [(b"content-type", f"multipart/form-data; boundary={BOUNDARY}".encode())]
    if content_length is not None:
        headers.append((b"content-length", str(content_length).encode()))
    scope = {"type": "http", "method": "POST", "path": "/", "headers": headers}
    return Request(scope, client.receive)


def test_the_file_reaches_the_disk_while_the_body_is_still_arriving(tmp_path: Path) -> None:
    store = FileStore(tmp_path, limit_bytes=10 * 1024 * 1024)
    content = b"2031-03-01 00:00,2.10\n" * 40_000  # about 880 kB, 14 chunks
    client = ChunkedClient(_body(content), store)
    upload = asyncio.run(receive_upload(_request(client), store))
    assert upload.stored.bytes == len(content)
    assert upload.fields == {"supplier": "1"}
    assert upload.filename == "levels.csv"
    # Before the last chunk was even sent, most of the file was already written.
    assert client.partial_sizes[-1] > len(content) // 2
    assert store.leftovers() == []


def test_over_the_limit_stops_reading_and_removes_the_partial_file(tmp_path: Path) -> None:
    store = FileStore(tmp_path, limit_bytes=3 * CHUNK)
    client = ChunkedClient(_body(b"x" * (20 * CHUNK)), store)
    with pytest.raises(ApiError) as raised:
        asyncio.run(receive_upload(_request(client), store))
    assert raised.value.status == 413
    assert client.calls <= 5 < len(client.chunks)  # the rest of the body was never read
    assert store.leftovers() == []
    assert list(store.files_dir.iterdir()) == []


def test_a_declared_length_over_the_limit_is_refused_before_reading(tmp_path: Path) -> None:
    store = FileStore(tmp_path, limit_bytes=1000)
    client = ChunkedClient(_body(b"x" * 10), store)
    with pytest.raises(ApiError) as raised:
        asyncio.run(receive_upload(_request(client, content_length=50 * 1024 * 1024), store))
    assert raised.value.status == 413
    assert client.calls == 0


def test_a_body_cut_short_is_refused_and_discarded(tmp_path: Path) -> None:
    store = FileStore(tmp_path, limit_bytes=10 * 1024 * 1024)
    body = _body(b"a,b\n" * 50_000)
    client = ChunkedClient(body[: len(body) // 2], store)
    with pytest.raises(ApiError) as raised:
        asyncio.run(receive_upload(_request(client), store))
    assert raised.value.status == 422
    assert store.leftovers() == []
    assert list(store.files_dir.iterdir()) == []


@pytest.mark.parametrize(
    ("raw", "clean"),
    [
        ("levels.csv", "levels.csv"),
        ("C:\\exports\\march\\levels.csv", "levels.csv"),
        ("../../etc/passwd", "passwd"),
        ("..", "upload"),
        ("", "upload"),
        ("tide\x00\x07 levels.csv", "tide levels.csv"),
        ("x" * 300 + ".csv", "x" * 255),
    ],
)
def test_clean_filename(raw: str, clean: str) -> None:
    assert clean_filename(raw) == clean
