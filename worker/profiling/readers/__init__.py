"""Readers: any delivered file in, a stream of Arrow record batches out.

``open_table`` looks at the file's first bytes (never its name), unwraps gzip
or a single-member zip, and returns the ``TableSource`` for its format: CSV
and other delimited text, Excel .xlsx, Parquet or JSON Lines. A file that
cannot be read at all raises ``ProfileError`` with one plain reason.
"""

from __future__ import annotations

from pathlib import Path
from typing import BinaryIO

from worker.profiling.errors import ProfileError
from worker.profiling.options import ProfileOptions
from worker.profiling.readers.compressed import open_decompressed, read_head
from worker.profiling.readers.csv import CsvSource
from worker.profiling.readers.detect import compression_of, format_of
from worker.profiling.readers.jsonl import JsonlSource
from worker.profiling.readers.parquet import ParquetSource
from worker.profiling.readers.source import SourceInfo, TableSource
from worker.profiling.readers.xlsx import XlsxSource, is_xlsx

__all__ = ["SourceInfo", "TableSource", "open_table"]


def open_table(
    path: Path | str, *, options: ProfileOptions | None = None, sheet: str | None = None
) -> TableSource:
    """Open a delivered file for reading in batches; ``sheet`` picks an Excel sheet."""
    path = Path(path)
    options = options or ProfileOptions()
    if not path.is_file():
        raise ProfileError(f"there is no file called {path.name}")
    size = path.stat().st_size
    if size == 0:
        raise ProfileError("the file is empty")
    with open(path, "rb") as file:
        start = file.read(8)
    compression = compression_of(start)
    if compression == "zip" and is_xlsx(path):
        return XlsxSource(path, options, sheet=sheet)
    if sheet is not None:
        raise ProfileError("only Excel files have sheets to choose from")
    if compression is None:
        with open(path, "rb") as file:
            head = file.read(options.sniff_sample_bytes)
            probes = _probes(file, size, options.sniff_sample_bytes)
        complete = len(head) == size
    else:
        with open_decompressed(path, compression, options) as stream:
            head = read_head(stream, options.sniff_sample_bytes + 1)
        complete = len(head) <= options.sniff_sample_bytes
        head = head[: options.sniff_sample_bytes]
        probes = ()
    kind = format_of(head)
    if kind == "parquet":
        if compression is not None:
            raise ProfileError("send a Parquet file as it is; it is compressed inside already")
        return ParquetSource(path, options)
    if kind == "jsonl":
        return JsonlSource(path, options, compression=compression)
    return CsvSource(
        path, options, head=head, complete=complete, compression=compression, probes=probes
    )


def _probes(file: BinaryIO, size: int, sample: int) -> tuple[bytes, ...]:
    """Samples from the middle and the end of a large plain file, for the encoding check."""
    if size <= 2 * sample:
        return ()
    probe = sample // 4
    found = []
    for offset in (size // 2, size - probe):
        file.seek(offset)
        found.append(file.read(probe))
    return tuple(found)
