"""Receiving an upload: a multipart body streamed straight into the file store.

The body is parsed as it arrives (python-multipart's push parser), and the
bytes of the one file part go chunk by chunk into a ``PendingFile``, which
hashes them and enforces the size limit as they come. Nothing is buffered
whole in memory or spooled to a second temporary file. Any failure (over the
limit, client gone, malformed body) discards what was written.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field

from python_multipart import MultipartParser
from python_multipart.multipart import parse_options_header
from starlette.concurrency import run_in_threadpool
from starlette.requests import ClientDisconnect, Request

from server.api.errors import ApiError
from server.store import EmptyFile, FileStore, FileTooLarge, StoredFile

FILE_FIELD = "file"
MAX_FIELD_BYTES = 64 * 1024
"""Text fields beside the file (supplier, note) are short; more is a malformed request."""
MULTIPART_SLACK = 1024 * 1024
"""Room for part headers and text fields when judging ``Content-Length`` before reading."""


@dataclass
class ReceivedUpload:
    """A durable file and the text fields that came with it."""

    stored: StoredFile
    filename: str
    fields: dict[str, str] = field(default_factory=dict)


def clean_filename(raw: str) -> str:
    """The uploaded name reduced to a safe label: no folders, no control characters.

    It is kept as metadata only; stored files are named by their content.
    """
    name = re.split(r"[\\/]", raw)[-1]
    name = "".join(ch for ch in name if ch.isprintable()).strip().strip(".")
    return name[:255] or "upload"


class _Collector:
    """python-multipart callbacks: text fields into a dict, file bytes into a list."""

    def __init__(self) -> None:
        self.fields: dict[str, str] = {}
        self.filename: str | None = None
        self.file_chunks: list[bytes] = []
        self.file_finished = False
        self._header_name = b""
        self._header_value = b""
        self._disposition = b""
        self._name = ""
        self._is_file = False
        self._data = bytearray()
        self._field_bytes = 0

    def on_part_begin(self) -> None:
        self._disposition = b""
        self._data = bytearray()

    def on_header_field(self, data: bytes, start: int, end: int) -> None:
        self._header_name += data[start:end]

    def on_header_value(self, data: bytes, start: int, end: int) -> None:
        self._header_value += data[start:end]

    def on_header_end(self) -> None:
        if self._header_name.lower() == b"content-disposition":
            self._disposition = self._header_value
        self._header_name = b""
        self._header_value = b""

    def on_headers_finished(self) -> None:
        _, options = parse_options_header(self._disposition)
        name = options.get(b"name")
        if name is None:
            raise ApiError(422, "a part of the form has no name", code="malformed_upload")
        self._name = name.decode("utf-8", "replace")
        self._is_file = b"filename" in options
        if self._is_file:
            if self._name != FILE_FIELD or self.filename is not None:
                raise ApiError(
                    422,
                    f"send exactly one file, in the form field {FILE_FIELD!r}",
                    code="malformed_upload",
                )
            self.filename = clean_filename(options[b"filename"].decode("utf-8", "replace"))

    def on_part_data(self, data: bytes, start: int, end: int) -> None:
        if self._is_file:
            self.file_chunks.append(data[start:end])
            return
        self._field_bytes += end - start
        if self._field_bytes > MAX_FIELD_BYTES:
            raise ApiError(413, "the text fields of the form are too long", code="too_large")
        self._data.extend(data[start:end])

    def on_part_end(self) -> None:
        if self._is_file:
            self.file_finished = True
        else:
            self.fields[self._name] = self._data.decode("utf-8", "replace")
        self._is_file = False

    def callbacks(self) -> dict[str, object]:
        return {
            "on_part_begin": self.on_part_begin,
            "on_part_data": self.on_part_data,
            "on_part_end": self.on_part_end,
            "on_header_field": self.on_header_field,
            "on_header_value": self.on_header_value,
            "on_header_end": self.on_header_end,
            "on_headers_finished": self.on_headers_finished,
        }


def _too_large(store: FileStore) -> ApiError:
    return ApiError(
        413,
        f"the file is larger than the upload limit of {store.limit_bytes:,} bytes",
        code="too_large",
    )


async def receive_upload(request: Request, store: FileStore) -> ReceivedUpload:
    """Stream a ``multipart/form-data`` request with a ``file`` part into ``store``.

    Raises ApiError: 413 over the size limit (as soon as it is passed), 422 for
    an empty file, a missing file part or a malformed body, 415 when the body
    is not multipart, 400 when the client goes away mid-upload.
    """
    content_type, params = parse_options_header(request.headers.get("content-type", ""))
    if content_type != b"multipart/form-data" or b"boundary" not in params:
        raise ApiError(
            415,
            f"send the file as multipart/form-data, in a form field named {FILE_FIELD!r}",
            code="unsupported_media_type",
        )
    declared = request.headers.get("content-length")
    if declared and declared.isdigit() and int(declared) > store.limit_bytes + MULTIPART_SLACK:
        raise _too_large(store)

    collector = _Collector()
    parser = MultipartParser(params[b"boundary"], collector.callbacks())  # type: ignore[arg-type]
    pending = store.begin()
    try:
        async for chunk in request.stream():
            try:
                parser.write(chunk)
            except ApiError:
                raise
            except Exception as exc:  # python-multipart's parse errors
                raise ApiError(
                    422, f"the upload is not a well-formed form: {exc}", code="malformed_upload"
                ) from exc
            if collector.file_chunks:
                data = b"".join(collector.file_chunks)
                collector.file_chunks.clear()
                await run_in_threadpool(pending.write, data)
        parser.finalize()
        if collector.filename is None:
            raise ApiError(
                422, f"the form has no file: send it in the field {FILE_FIELD!r}", code="no_file"
            )
        if not collector.file_finished:
            raise ApiError(422, "the upload ended before the file did", code="malformed_upload")
        stored = await run_in_threadpool(pending.commit)
    except FileTooLarge as exc:
        raise _too_large(store) from exc
    except EmptyFile as exc:
        raise ApiError(
            422, "the file is empty (0 bytes): nothing to profile", code="empty_file"
        ) from exc
    except ClientDisconnect as exc:
        raise ApiError(400, "the upload was interrupted", code="upload_interrupted") from exc
    finally:
        pending.abort()  # no-op once committed
    return ReceivedUpload(stored=stored, filename=collector.filename, fields=collector.fields)
