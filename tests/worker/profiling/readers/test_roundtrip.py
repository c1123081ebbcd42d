"""Tables written by Python's csv module read back cell for cell (property test).

Reference: the standard library's ``csv.writer`` decides the quoting (cells
holding the delimiter, quotes or line breaks are quoted, quotes doubled);
the reader must sniff the delimiter and return every cell's text unchanged,
with an empty cell as null.
"""

from __future__ import annotations

import csv
import io
from pathlib import Path

import pyarrow as pa
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from worker.profiling.readers import open_table

# Cells may hold the file's own delimiter, quotes and line breaks; other
# candidate delimiters are left out so the intended one is the consistent one.
BASE_ALPHABET = 'abcxyzéßø019 .-_"\n'


@st.composite
def delimited_tables(draw: st.DrawFn) -> tuple[str, str, list[list[str]]]:
    encoding = draw(st.sampled_from(["utf-8", "utf-8-sig", "utf-16"]))
    delimiter = draw(st.sampled_from([",", ";", "\t", "|"]))
    width = draw(st.integers(2, 5))
    height = draw(st.integers(2, 15))
    cell = st.text(alphabet=BASE_ALPHABET + delimiter, max_size=8)
    rows = draw(
        st.lists(st.lists(cell, min_size=width, max_size=width), min_size=height, max_size=height)
    )
    return encoding, delimiter, rows


@settings(
    max_examples=100, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture]
)
@given(table=delimited_tables())
def test_written_cells_read_back_unchanged(
    tmp_path: Path, table: tuple[str, str, list[list[str]]]
) -> None:
    encoding, delimiter, rows = table
    header = [f"field_{chr(ord('a') + index)}" for index in range(len(rows[0]))]
    buffer = io.StringIO()
    writer = csv.writer(buffer, delimiter=delimiter, lineterminator="\n")
    writer.writerow(header)
    writer.writerows(rows)
    path = tmp_path / "roundtrip.csv"
    path.write_bytes(buffer.getvalue().encode(encoding))

    with open_table(path) as source:
        batches = list(source.batches())
        assert (source.info.encoding, source.info.delimiter) == (encoding, delimiter)
        assert source.column_names == header
        assert source.parse_error_count == 0
    read = pa.Table.from_batches(batches).to_pylist()
    expected = [
        {name: (value or None) for name, value in zip(header, row, strict=True)} for row in rows
    ]
    assert read == expected


@settings(
    max_examples=60, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture]
)
@given(kinds=st.lists(st.sampled_from(["row", "multiline", "blank", "short", "long"]), max_size=60))
def test_broken_rows_are_reported_at_the_lines_they_were_planted(
    tmp_path: Path, kinds: list[str]
) -> None:
    # Truth by construction: each kind adds known physical lines.
    lines = ["a,b,c"]
    planted = []
    for number, kind in enumerate(kinds):
        if kind == "row":
            lines.append(f"{number},x,y")
        elif kind == "multiline":
            lines.extend([f'{number},"first', 'second",y'])
        elif kind == "blank":
            lines.append("")
        else:
            lines.append(f"{number},x" if kind == "short" else f"{number},x,y,z")
            planted.append(len(lines))
    path = tmp_path / "planted.csv"
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    with open_table(path) as source:
        rows = sum(batch.num_rows for batch in source.batches())
        assert [error["line"] for error in source.parse_errors] == planted
    assert rows == kinds.count("row") + kinds.count("multiline")
