"""Delimited text (CSV, semicolon, tab or pipe separated), read in streamed batches.

pyarrow's streaming CSV reader parses in native code, block by block, with
every column read as text: an empty cell is null, every other cell keeps its
raw text (no trimming, no number parsing; the column steps do that with the
decimal mark and thousands separator found here). Rows with the wrong number
of fields are skipped and reported with their line number.
"""

from __future__ import annotations

import io
import time
import weakref
from collections.abc import Callable, Iterator
from pathlib import Path
from typing import Any

import pyarrow as pa
import pyarrow.csv as pacsv

from worker.profiling.errors import ProfileError
from worker.profiling.native import bytes_are_ascii
from worker.profiling.options import ProfileOptions
from worker.profiling.readers.compressed import GuardedStream, open_decompressed
from worker.profiling.readers.encoding import arrow_encoding, decode_sample, detect_encoding
from worker.profiling.readers.names import numbered_names, unique_names
from worker.profiling.readers.sniff import (
    declared_delimiter,
    preamble_lines,
    sniff_dialect,
    split_records,
)
from worker.profiling.readers.source import SourceInfo, TableSource

_FIXED_LINE = -1  # marker: the error's line is already a physical line number


def _check_utf8(batch: pa.RecordBatch) -> None:
    """Raise ``pa.ArrowInvalid`` when a text column of the batch is not valid UTF-8.

    A column whose bytes are all below 128 is ASCII, hence valid UTF-8: that
    check is one compiled pass (``worker.profiling.native.bytes_are_ascii``,
    without the interpreter lock), where Arrow's own UTF-8 check while reading
    cost about 5 ms for a 53,000-row batch of 12 columns, measured side by side.
    Only a column with other bytes is validated in full.
    """
    for column in batch.columns:
        buffers = column.buffers()
        data = buffers[2] if len(buffers) == 3 else None
        if data is None or not data.size:
            continue
        if not bytes_are_ascii(data):
            column.validate(full=True)


class CsvSource(TableSource):
    """A delimited text file, plain or compressed, in any detected encoding."""

    def __init__(
        self,
        path: Path,
        options: ProfileOptions,
        *,
        head: bytes,
        complete: bool,
        compression: str | None = None,
        probes: tuple[bytes, ...] = (),
    ) -> None:
        super().__init__(path, options.parse_error_limit)
        self._options = options
        self._compression = compression
        self._stream: GuardedStream | None = None
        self._rows_read = 0
        self._pending: list[tuple[int | None, str, str]] = []
        self._overflow: list[int] = []
        encoding = _encoding_of(head, probes)
        text = decode_sample(head, encoding).lstrip("\ufeff")
        # Bytes on disk per byte of decoded text, for the progress estimate.
        decoded = len(text.encode("utf-8")) or 1
        self._bytes_per_text_byte = len(head) / decoded if encoding != "utf-8" else 1.0
        declared = declared_delimiter(text)
        if declared:
            text = text.split("\n", 1)[1] if "\n" in text else ""
        dialect = sniff_dialect(text, complete=complete, delimiter=declared)
        self._skip = preamble_lines(text, dialect)
        if self._skip:
            skipped = [line for line in text.splitlines()[: self._skip] if line.strip()]
            self._errors.add(
                2 if declared else 1,
                f"the {self._skip} line(s) before the table were skipped, "
                f"starting {skipped[0][:60]!r}",
            )
            text = "\n".join(text.splitlines()[self._skip :])
            dialect = sniff_dialect(text, complete=complete, delimiter=declared)
        physical = text.splitlines()
        if not complete and len(physical) > 1:
            physical = physical[:-1]  # it may be cut off
        lines = [line for line in physical if line.strip()][:50]
        self._skip += 1 if declared else 0
        records = split_records(lines, dialect.delimiter, dialect.quotechar)
        if not records:
            raise ProfileError("no line of the file holds a row of the table")
        if dialect.header:
            self.column_names, fixes = unique_names(records[0])
            for fix in fixes:
                self._errors.add(self._skip + 1, fix)
        else:
            widths = [len(row) for row in records]
            self.column_names = numbered_names(max(set(widths), key=widths.count))
        self.info = SourceInfo(
            format="csv",
            encoding=encoding,
            delimiter=dialect.delimiter,
            quotechar=dialect.quotechar,
            header=dialect.header,
            decimal=dialect.decimal,
            thousands=dialect.thousands,
            compression=compression,
        )

    def _open(self) -> Any:
        """What pyarrow reads: the path itself, or a guarded decompressing stream."""
        if self._compression is None:
            return str(self.path)
        self._stream = open_decompressed(self.path, self._compression, self._options)
        return pa.PythonFile(self._stream, mode="r")

    def _invalid_row_handler(self) -> Callable[[pacsv.InvalidRow], str]:
        """A handler that notes broken rows and skips them.

        It closes over plain lists, not over this source: the native reader
        (and its threads) hold only the handler and those lists.
        """
        pending = self._pending
        overflow = self._overflow
        limit = self._errors.limit

        def note(row: pacsv.InvalidRow) -> str:
            fields = "field" if row.actual_columns == 1 else "fields"
            message = (
                f"the row has {row.actual_columns} {fields} where {row.expected_columns} belong"
            )
            if len(pending) < limit:
                pending.append((row.number, row.text, message))
            else:
                overflow.append(1)
            return "skip"

        return note

    def batches(self) -> Iterator[pa.RecordBatch]:
        names = self.column_names
        read_options = pacsv.ReadOptions(
            use_threads=False,
            block_size=self._options.csv_block_bytes,
            skip_rows=self._skip + (1 if self.info.header else 0),
            column_names=names,
            encoding=arrow_encoding(self.info.encoding or "utf-8"),
        )
        parse_options = pacsv.ParseOptions(
            delimiter=self.info.delimiter or ",",
            quote_char=self.info.quotechar or False,
            double_quote=True,
            newlines_in_values=True,
            invalid_row_handler=self._invalid_row_handler(),
        )
        # UTF-8 input is checked here, batch by batch, rather than by Arrow: most
        # delivered text is ASCII, which one pass over the bytes shows (see _check_utf8).
        utf8_input = arrow_encoding(self.info.encoding or "utf-8") == "utf8"
        convert_options = pacsv.ConvertOptions(
            column_types={name: pa.string() for name in names},
            strings_can_be_null=True,
            quoted_strings_can_be_null=True,
            null_values=[""],
            check_utf8=not utf8_input,
        )
        reader = None
        source = self._open()
        # Arrow's background threads let go of these Python objects a moment
        # after the last batch; the wait below makes sure they have.
        held = [weakref.ref(parse_options.invalid_row_handler)]
        if not isinstance(source, str):
            held.append(weakref.ref(source))
        try:
            reader = pacsv.open_csv(
                source,
                read_options=read_options,
                parse_options=parse_options,
                convert_options=convert_options,
            )
            last: pa.RecordBatch | None = None
            for batch in reader:
                if utf8_input:
                    _check_utf8(batch)
                self._rows_read += batch.num_rows
                self._count_consumed(batch)
                last = batch if batch.num_rows else last
                yield batch
        except ProfileError:
            raise
        except (pa.ArrowException, OSError, UnicodeDecodeError) as exc:
            raise self._fatal(exc) from exc
        finally:
            # Closed and awaited here: an Arrow thread that still holds a
            # Python object when the interpreter exits aborts the process.
            if reader is not None:
                reader.close()
            del reader, parse_options, source
            _wait_until_released(held)
            self.close()
        self._consumed = self.total_bytes
        self._settle_errors()
        if last is not None:
            self._check_unclosed_quote(last)

    def _check_unclosed_quote(self, last: pa.RecordBatch) -> None:
        """Report a quote never closed: it swallows the file's end into one value.

        Only a value in the last column can run to the end of the file
        unnoticed (elsewhere the row lacks fields and is reported as broken).
        Such a value keeps the file's final line break, and the file does not
        end with a closing quote, as it would if the value were closed.
        """
        value = last.column(last.num_columns - 1)[last.num_rows - 1].as_py()
        if not value or "\n" not in value or not value.endswith("\n"):
            return
        ending = self._file_ending()
        if ending is None:  # compressed: judge from the value alone
            swallowed_rows = any(self.info.delimiter in line for line in value.split("\n")[1:])
            if not swallowed_rows:
                return
        elif ending.rstrip("\r\n").endswith(self.info.quotechar or '"'):
            return
        start = value.split("\n")[0][:40]
        self._errors.add(
            None,
            f"a quote opened in column {self.column_names[-1]} of the last row (data row "
            f"{self._rows_read}) is never closed; "
            f"the rest of the file, from {start!r}, was read as one value",
        )

    def _file_ending(self) -> str | None:
        """The last few characters of a plain file, or None for a compressed one."""
        if self._compression is not None:
            return None
        with open(self.path, "rb") as file:
            file.seek(max(0, self.total_bytes - 16))
            return file.read().decode(self.info.encoding or "utf-8", errors="ignore")

    def _count_consumed(self, batch: pa.RecordBatch) -> None:
        """Estimate the file bytes behind the rows handed out so far (for progress)."""
        # A string column's buffers hold its text plus 4 offset bytes per row.
        text_bytes = batch.num_rows * batch.num_columns
        text_bytes += sum(column.nbytes - 4 * len(column) for column in batch.columns)
        scale = self._bytes_per_text_byte
        if self._stream is not None and self._stream.produced:
            scale *= self._stream.compressed_bytes_read() / self._stream.produced
        self._consumed += int(text_bytes * scale)

    def _fatal(self, exc: BaseException) -> ProfileError:
        """The plain reason why reading cannot go on, with the stream's own refusal first."""
        if self._stream is not None and self._stream.refusal is not None:
            return self._stream.refusal
        cause: BaseException | None = exc
        while cause is not None:
            if isinstance(cause, ProfileError):
                return cause
            cause = cause.__cause__ or cause.__context__
        reason = str(exc).split("\n")[0]
        if "straddling" in reason:
            reason = (
                f"a row is longer than {self._options.csv_block_bytes:,} bytes "
                "(a quote that is never closed?)"
            )
        elif "invalid utf8" in reason.lower() or isinstance(exc, UnicodeDecodeError):
            reason = (
                f"its text is not valid {self.info.encoding} throughout "
                "(the encoding changes inside the file; save it as UTF-8 and send it again)"
            )
        return ProfileError(f"the file cannot be read past row {self._rows_read + 1}: {reason}")

    def _settle_errors(self) -> None:
        """Turn pyarrow's record numbers into physical line numbers and keep the errors.

        pyarrow numbers a broken row by counting records, skipping empty lines
        and counting a quoted value over several lines once, so its number can
        be lower than the line an editor shows. The physical line is found by
        reading the decoded text up to the last kept error, only when there are
        errors to place.
        """
        pending = sorted(self._pending, key=lambda item: item[0] or 0)
        if pending and all(number is not None for number, _, _ in pending):
            located = self._physical_lines(pending)
        else:
            located = [number for number, _, _ in pending]
        for line, (_, _, message) in zip(located, pending, strict=True):
            self._errors.add(line, message)
        self._errors.count += len(self._overflow)

    def _physical_lines(self, pending: list[tuple[int | None, str, str]]) -> list[int | None]:
        lines: list[int | None] = [number for number, _, _ in pending]
        if self._compression:
            stream: Any = io.BufferedReader(
                open_decompressed(self.path, self._compression, self._options)
            )
        else:
            stream = open(self.path, "rb")  # noqa: SIM115 (closed below)
        encoding = self.info.encoding or "utf-8"
        try:
            text = io.TextIOWrapper(stream, encoding=encoding, errors="replace", newline=None)
            wanted = 0
            for line_number, line in enumerate(text, start=1):
                number, row_text, _ = pending[wanted]
                first_line = row_text.split("\n")[0].rstrip("\r")
                if line_number >= (number or 0) and line.rstrip("\n").lstrip("\ufeff") == (
                    first_line
                ):
                    lines[wanted] = line_number
                    wanted += 1
                    if wanted == len(pending):
                        break
        except (ProfileError, OSError, UnicodeDecodeError):
            pass
        finally:
            stream.close()
        return lines

    def close(self) -> None:
        if self._stream is not None:
            self._stream.close()
            self._stream = None


def _wait_until_released(held: list[weakref.ref[Any]], timeout: float = 2.0) -> None:
    """Wait (briefly) until native threads have dropped the Python objects given to them."""
    deadline = time.monotonic() + timeout
    while any(ref() is not None for ref in held) and time.monotonic() < deadline:
        time.sleep(0.001)


def _encoding_of(head: bytes, probes: tuple[bytes, ...]) -> str:
    """The encoding from the head, unless a probe from further in shows UTF-8 was only a start.

    ``probes`` are samples from the middle and the end of a plain file; they
    may begin and end inside a character.
    """
    encoding = detect_encoding(head)
    if encoding != "utf-8":
        return encoding
    for probe in probes:
        probe = probe.lstrip(bytes(range(0x80, 0xC0)))
        if probe and detect_encoding(probe) != "utf-8":
            return detect_encoding(head + b"\n" + probe)
    return encoding
