"""After the last batch no Arrow thread may still hold the reader's Python objects.

Arrow's background threads keep the Python objects the CSV reader is given
(the broken-row handler, a decompressing stream) a moment after the last
batch; if the interpreter exits before they let go, the process aborts
("terminate called without an active exception"), as seen here about one run
in three of a script that read a small file and exited. The reader waits for
them, so by the end of ``batches()`` they are gone.
"""

from __future__ import annotations

import gzip
import weakref
from pathlib import Path
from typing import Any

import pyarrow.csv as pacsv
import pytest

from worker.profiling.readers import csv as csv_reader
from worker.profiling.readers import open_table


@pytest.mark.parametrize("compressed", [False, True])
def test_native_threads_let_go_of_python_objects_by_the_end(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch, compressed: bool
) -> None:
    text = b"a,b\n1,2\n3\n4,5\n"
    path = tmp_path / ("d.csv.gz" if compressed else "d.csv")
    path.write_bytes(gzip.compress(text) if compressed else text)
    handlers: list[weakref.ref[Any]] = []
    real = pacsv.ParseOptions

    def spying(**kwargs: Any) -> pacsv.ParseOptions:
        handlers.append(weakref.ref(kwargs["invalid_row_handler"]))
        return real(**kwargs)

    monkeypatch.setattr(csv_reader.pacsv, "ParseOptions", spying)
    with open_table(path) as source:
        assert sum(batch.num_rows for batch in source.batches()) == 2
        assert len(handlers) == 1
        assert handlers[0]() is None
