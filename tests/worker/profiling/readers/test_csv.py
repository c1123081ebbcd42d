"""Delimited text: encodings, delimiters, headers, number styles and broken rows."""

from __future__ import annotations

from pathlib import Path

import pandas as pd
import pyarrow as pa
import pytest

from worker.profiling.errors import ProfileError
from worker.profiling.options import ProfileOptions
from worker.profiling.readers import open_table

# An invented delivery from a cheese dairy's partner farms, with accented labels.
DAIRY_ROWS = [
    ("farm", "region", "wheels", "note"),
    ("Ferme Éloïse", "Franche-Comté", "12", "affiné"),
    ("Hof Jürgen", "Allgäu", "7", "süß"),
    ("Granja Peña", "Cantabria", "", "año"),
    ("Mas d'Aurèle", "Cévennes", "3", "crème"),
]


def _write(tmp_path: Path, text: str, encoding: str = "utf-8", name: str = "d.csv") -> Path:
    path = tmp_path / name
    path.write_bytes(text.encode(encoding))
    return path


def _read(path: Path, **options: object) -> tuple[object, pa.Table]:
    with open_table(path, options=ProfileOptions(**options)) as source:
        table = pa.Table.from_batches(list(source.batches()))
        return source, table


def _dairy_text(delimiter: str = ",") -> str:
    return "\n".join(delimiter.join(row) for row in DAIRY_ROWS) + "\n"


@pytest.mark.parametrize(
    ("encoding", "reported"),
    [
        ("utf-8", "utf-8"),
        ("utf-8-sig", "utf-8-sig"),
        ("utf-16", "utf-16"),
        ("utf-16-le", "utf-16-le"),
        ("cp1252", "cp1252"),
        ("latin-1", "cp1252"),  # the same bytes as cp1252 for these letters
    ],
)
def test_each_encoding_decodes_the_same_labels(
    tmp_path: Path, encoding: str, reported: str
) -> None:
    path = _write(tmp_path, _dairy_text(), encoding)
    source, table = _read(path)
    assert source.info.encoding == reported
    assert source.column_names == ["farm", "region", "wheels", "note"]
    assert table.column("region").to_pylist() == [row[1] for row in DAIRY_ROWS[1:]]
    assert table.column("note").to_pylist() == [row[3] for row in DAIRY_ROWS[1:]]


def test_values_match_pandas_reading_the_same_file(tmp_path: Path) -> None:
    path = _write(tmp_path, _dairy_text(), "cp1252")
    _, table = _read(path)
    # Reference: pandas.read_csv with the encoding named and every column as text.
    expected = pd.read_csv(path, encoding="cp1252", dtype=str, keep_default_na=False)
    for name in expected.columns:
        ours = [value or "" for value in table.column(name).to_pylist()]
        assert ours == expected[name].tolist()


@pytest.mark.parametrize("delimiter", [",", ";", "\t", "|"])
def test_each_delimiter_is_found(tmp_path: Path, delimiter: str) -> None:
    path = _write(tmp_path, _dairy_text(delimiter))
    source, table = _read(path)
    assert source.info.delimiter == delimiter
    assert table.num_columns == 4
    assert table.column("wheels").to_pylist() == ["12", "7", None, "3"]


def test_cells_keep_their_raw_text_and_empty_cells_are_null(tmp_path: Path) -> None:
    path = _write(tmp_path, 'code,label\n" A1 ",NA\n"",x\n,  \n')
    _, table = _read(path)
    assert table.schema.field("code").type == pa.string()
    assert table.column("code").to_pylist() == [" A1 ", None, None]
    assert table.column("label").to_pylist() == ["NA", "x", "  "]


def test_quoted_values_may_hold_delimiters_and_newlines(tmp_path: Path) -> None:
    path = _write(tmp_path, 'id,remark\n1,"wet, torn"\n2,"line one\nline two"\n3,"say ""hi"""\n')
    _, table = _read(path)
    assert table.column("remark").to_pylist() == ["wet, torn", "line one\nline two", 'say "hi"']


def test_headerless_file_gets_numbered_columns(tmp_path: Path) -> None:
    path = _write(tmp_path, "1,4.5,2024-01-02\n2,3.25,2024-01-03\n3,,2024-01-04\n")
    source, table = _read(path)
    assert source.info.header is False
    assert source.column_names == ["column_1", "column_2", "column_3"]
    assert table.num_rows == 3
    assert table.column("column_1").to_pylist() == ["1", "2", "3"]


def test_headerless_labels_recurring_below_are_data(tmp_path: Path) -> None:
    path = _write(tmp_path, "red,small\nblue,large\nred,large\nblue,small\n")
    source, table = _read(path)
    assert source.info.header is False
    assert table.num_rows == 4


def test_decimal_comma_with_dot_thousands(tmp_path: Path) -> None:
    text = "lot;weight;price\nA;1.234,5;12,50\nB;987,25;3,75\nC;2.000,0;1.100,00\n"
    source, table = _read(_write(tmp_path, text))
    assert (source.info.delimiter, source.info.decimal, source.info.thousands) == (";", ",", ".")
    assert table.column("weight").to_pylist() == ["1.234,5", "987,25", "2.000,0"]


def test_decimal_point_with_comma_thousands(tmp_path: Path) -> None:
    text = 'lot,weight\nA,"1,234.5"\nB,987.25\nC,"2,000,000.0"\n'
    source, _ = _read(_write(tmp_path, text))
    assert (source.info.decimal, source.info.thousands) == (".", ",")


def test_plain_numbers_have_no_thousands_separator(tmp_path: Path) -> None:
    source, _ = _read(_write(tmp_path, "a,b\n1.5,2\n3.25,4\n"))
    assert (source.info.decimal, source.info.thousands) == (".", None)


def test_ragged_rows_are_reported_with_their_physical_lines(tmp_path: Path) -> None:
    # Line numbers by construction: 1 header, 2 row, 3 blank, 4-5 one quoted row,
    # 6 short row, 7-8 blank, 9 long row, 10 row.
    text = 'a,b,c\n1,2,3\n\n"x\ny",1,2\n4,5\n\n\n6,7,8,9\n10,11,12\n'
    source, table = _read(_write(tmp_path, text))
    assert [error["line"] for error in source.parse_errors] == [6, 9]
    assert "2 fields where 3" in source.parse_errors[0]["message"]
    assert source.parse_error_count == 2
    assert table.column("a").to_pylist() == ["1", "x\ny", "10"]


def test_broken_rows_beyond_the_limit_are_counted_not_kept(tmp_path: Path) -> None:
    rows = ["a,b"] + [("1" if n % 10 == 0 else "1,2") for n in range(1, 201)]
    source, table = _read(_write(tmp_path, "\n".join(rows) + "\n"), parse_error_limit=5)
    assert source.parse_error_count == 20
    # By construction: row n sits on line n + 1, the short rows are n = 10, 20, ...
    assert [error["line"] for error in source.parse_errors] == [11, 21, 31, 41, 51]
    assert table.num_rows == 180


def test_broken_rows_across_many_blocks_keep_right_lines(tmp_path: Path) -> None:
    lines = ["id,x,y"] + [f"{n},a,b" for n in range(2, 30_001)]
    lines[12_345 - 1] = "oops"
    lines[29_000 - 1] = "1,2,3,4"
    source, table = _read(_write(tmp_path, "\n".join(lines) + "\n"), csv_block_bytes=64 * 1024)
    assert [error["line"] for error in source.parse_errors] == [12_345, 29_000]
    assert table.num_rows == 30_000 - 1 - 2


def test_blank_and_repeated_header_names_are_fixed_and_reported(tmp_path: Path) -> None:
    source, table = _read(_write(tmp_path, "id,,id, name \n1,2,3,4\n"))
    assert source.column_names == ["id", "column_2", "id_2", "name"]
    assert [error["line"] for error in source.parse_errors] == [1, 1]
    assert table.column("id_2").to_pylist() == ["3"]


def test_progress_reaches_the_file_size(tmp_path: Path) -> None:
    path = _write(tmp_path, "a,b\n" + "".join(f"{n},{n * 2}\n" for n in range(50_000)))
    with open_table(path, options=ProfileOptions(csv_block_bytes=64 * 1024)) as source:
        seen = []
        for _ in source.batches():
            seen.append(source.bytes_read())
        assert seen == sorted(seen)
        assert 0 < seen[0] < source.total_bytes
        assert source.bytes_read() == source.total_bytes == path.stat().st_size


def test_legacy_bytes_late_in_the_file_are_found_from_its_end(tmp_path: Path) -> None:
    head = "".join(f"{n},plain\n" for n in range(40_000))
    path = _write(tmp_path, "id,label\n" + head + "40000,Café crème\n", "cp1252")
    source, table = _read(path, sniff_sample_bytes=16 * 1024)
    assert source.info.encoding == "cp1252"
    assert table.column("label").to_pylist()[-1] == "Café crème"


def test_a_quote_never_closed_is_reported(tmp_path: Path) -> None:
    source, table = _read(_write(tmp_path, 'a,b\n1,"x\n2,3\n4,5\n'))
    assert table.num_rows == 1
    assert source.parse_error_count == 1
    assert "never closed" in source.parse_errors[0]["message"]


def test_crlf_lines_keep_their_numbers(tmp_path: Path) -> None:
    source, table = _read(_write(tmp_path, "a,b\r\n1,2\r\n3\r\n4,5\r\n"))
    assert [error["line"] for error in source.parse_errors] == [3]
    assert table.column("b").to_pylist() == ["2", "5"]


def test_header_only_file_has_columns_and_no_rows(tmp_path: Path) -> None:
    with open_table(_write(tmp_path, "crate,dock\n")) as source:
        assert source.column_names == ["crate", "dock"]
        assert sum(batch.num_rows for batch in source.batches()) == 0


def test_invalid_utf8_past_the_samples_is_a_plain_error(tmp_path: Path) -> None:
    body = "".join(f"{n},plain\n" for n in range(60_000))
    path = tmp_path / "d.csv"
    # The bad byte sits a quarter in: past the head, before the middle and end probes.
    path.write_bytes(b"id,label\n" + body.encode() + b"1,caf\xe9\n" + 3 * body.encode())
    with (
        pytest.raises(ProfileError, match="cannot be read past row"),
        open_table(path, options=ProfileOptions(sniff_sample_bytes=8192)) as source,
    ):
        for _ in source.batches():
            pass


def test_valid_utf8_beyond_ascii_in_later_batches_is_kept(tmp_path: Path) -> None:
    # Batches of plain ASCII pass the quick check; one with accented letters is
    # validated in full and must come through unchanged (compared with Python's decoder).
    body = "".join(f"{n},plain\n" for n in range(30_000))
    text = "id,label\n" + body + "30000,Zürich Ærø café\n" + body
    source, table = _read(_write(tmp_path, text), csv_block_bytes=64 * 1024)
    assert source.info.encoding == "utf-8"
    labels = table.column("label").to_pylist()
    assert labels[30_000] == "Zürich Ærø café"
    assert len(labels) == 60_001


def test_preamble_lines_before_the_table_are_skipped_and_reported(tmp_path: Path) -> None:
    text = "Harbour report 2026\n\nExported by desk 4\nname,city\nx,1\ny,2,3\nz,4\n"
    source, table = _read(_write(tmp_path, text))
    assert source.column_names == ["name", "city"]
    assert table.column("name").to_pylist() == ["x", "z"]
    assert "3 line(s) before the table" in source.parse_errors[0]["message"]
    assert source.parse_errors[1]["line"] == 6  # by construction: "y,2,3" is line 6


def test_legacy_bytes_only_in_the_middle_are_found(tmp_path: Path) -> None:
    plain = "".join(f"{n},plain\n" for n in range(40_000))
    text = "id,label\n" + plain + "".join(f"{n},Zürich\n" for n in range(3_000)) + plain
    source, table = _read(_write(tmp_path, text, "cp1252"), sniff_sample_bytes=16 * 1024)
    assert source.info.encoding == "cp1252"
    assert "Zürich" in table.column("label").to_pylist()


def test_a_declared_separator_line_is_honoured(tmp_path: Path) -> None:
    # "sep=;" on the first line: the convention spreadsheet programs use.
    source, table = _read(_write(tmp_path, "sep=;\nlot;kg\nA,1;2,5\nB,2;3\n"))
    assert source.info.delimiter == ";"
    assert source.column_names == ["lot", "kg"]
    assert table.column("lot").to_pylist() == ["A,1", "B,2"]
    assert source.parse_error_count == 0
