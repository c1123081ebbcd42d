"""Excel, Parquet and JSON Lines deliveries."""

from __future__ import annotations

import datetime as dt
import zipfile
from pathlib import Path

import openpyxl
import pandas as pd
import pyarrow as pa
import pyarrow.parquet as pq
import pytest

from worker.profiling.errors import ProfileError
from worker.profiling.options import ProfileOptions
from worker.profiling.readers import open_table


def _table(path: Path, **kwargs: object) -> tuple[object, pa.Table]:
    with open_table(path, options=ProfileOptions(batch_rows=2), **kwargs) as source:
        return source, pa.Table.from_batches(list(source.batches()))


def _workbook(path: Path) -> Path:
    book = openpyxl.Workbook()
    crates = book.active
    crates.title = "Crates"
    crates.append(["crate", "weight", "landed", "sealed"])
    crates.append(["C-1", 12.5, dt.datetime(2026, 3, 4), True])
    crates.append(["C-2", 7, None, False])
    crates.append([None, None, None, None])
    crates.append(["C-3", 3.0, dt.datetime(2026, 3, 5, 14, 30), None])
    crates.append(["C-4", 0.1 + 0.2, None, None])
    docks = book.create_sheet("Docks")
    docks.append(["dock", "cranes"])
    docks.append(["Nord", 4])
    book.save(path)
    return path


def test_xlsx_first_sheet_by_default_with_all_sheets_listed(tmp_path: Path) -> None:
    source, table = _table(_workbook(tmp_path / "d.xlsx"))
    assert (source.info.format, source.info.sheet) == ("xlsx", "Crates")
    assert source.info.sheets == ["Crates", "Docks"]
    assert source.column_names == ["crate", "weight", "landed", "sealed"]
    assert table.column("weight").to_pylist() == ["12.5", "7", "3", "0.3"]
    assert table.column("landed").to_pylist() == [
        "2026-03-04",
        None,
        "2026-03-05 14:30:00",
        None,
    ]
    assert table.column("sealed").to_pylist() == ["TRUE", "FALSE", None, None]


def test_xlsx_values_match_pandas(tmp_path: Path) -> None:
    path = _workbook(tmp_path / "d.xlsx")
    _, table = _table(path)
    # Reference: pandas.read_excel (openpyxl engine) on the same workbook.
    expected = pd.read_excel(path, sheet_name="Crates").dropna(how="all")
    assert table.column("crate").to_pylist() == expected["crate"].tolist()
    ours = [float(v) for v in table.column("weight").to_pylist()]
    assert ours == pytest.approx(expected["weight"].tolist(), rel=1e-14)


def test_xlsx_sheet_is_selectable(tmp_path: Path) -> None:
    source, table = _table(_workbook(tmp_path / "d.xlsx"), sheet="Docks")
    assert source.info.sheet == "Docks"
    assert table.to_pylist() == [{"dock": "Nord", "cranes": "4"}]


def test_xlsx_unknown_sheet_names_the_ones_it_has(tmp_path: Path) -> None:
    with pytest.raises(ProfileError, match="no sheet 'Quay'; it has Crates, Docks"):
        open_table(_workbook(tmp_path / "d.xlsx"), sheet="Quay")


def test_xlsx_with_an_xml_entity_attack_is_refused(tmp_path: Path) -> None:
    clean = _workbook(tmp_path / "clean.xlsx")
    attacked = tmp_path / "attacked.xlsx"
    laughs = (
        '<?xml version="1.0"?><!DOCTYPE lolz [<!ENTITY lol "lol">'
        '<!ENTITY lol2 "&lol;&lol;&lol;&lol;&lol;&lol;&lol;&lol;&lol;&lol;">]>'
    )
    with zipfile.ZipFile(clean) as source, zipfile.ZipFile(attacked, "w") as target:
        for info in source.infolist():
            data = source.read(info)
            if info.filename == "xl/worksheets/sheet1.xml":
                text = data.decode()
                body = text[text.index("<worksheet") :]
                data = (laughs + body.replace("C-1", "&lol2;")).encode()
            target.writestr(info, data)
    with pytest.raises(ProfileError, match="declares XML entities"):
        open_table(attacked)


def test_parquet_keeps_native_types(tmp_path: Path) -> None:
    path = tmp_path / "d.parquet"
    table = pa.table(
        {
            "berth": pa.array(["b1", "b2", None]).dictionary_encode(),
            "tons": pa.array([1.5, None, 3.0]),
            "landed": pa.array([dt.date(2026, 1, 1), dt.date(2026, 1, 2), None]),
            "tags": pa.array([["x"], [], None]),
        }
    )
    pq.write_table(table, path)
    source, read = _table(path)
    assert source.info.format == "parquet"
    assert read.schema.field("tons").type == pa.float64()
    assert read.schema.field("landed").type == pa.date32()
    assert read.column("berth").to_pylist() == ["b1", "b2", None]
    assert read.column("tags").to_pylist() == ['["x"]', "[]", None]
    assert source.bytes_read() == source.total_bytes


def test_damaged_parquet_is_a_clear_error(tmp_path: Path) -> None:
    path = tmp_path / "d.parquet"
    path.write_bytes(b"PAR1" + b"\x00" * 64)
    with pytest.raises(ProfileError, match="Parquet file is damaged"):
        open_table(path)


def test_jsonl_keys_in_order_of_first_appearance_and_broken_lines(tmp_path: Path) -> None:
    path = tmp_path / "d.jsonl"
    path.write_text(
        '{"crate": "C-1", "tons": 1.5, "sealed": true}\n'
        "\n"
        '{"crate": "C-2", "hold": {"deck": 2}}\n'
        '{"crate": "C-3", "tons": \n'
        "[1, 2]\n"
        '{"crate": "", "tons": null, "late": "yes"}\n',
        encoding="utf-8",
    )
    source, table = _table(path)
    assert source.column_names == ["crate", "tons", "sealed", "hold", "late"]
    assert table.column("crate").to_pylist() == ["C-1", "C-2", None]
    assert table.column("tons").to_pylist() == ["1.5", None, None]
    assert table.column("sealed").to_pylist() == ["true", None, None]
    assert table.column("hold").to_pylist() == [None, '{"deck": 2}', None]
    assert table.column("late").to_pylist() == [None, None, "yes"]
    assert [error["line"] for error in source.parse_errors] == [4, 5]
    assert source.parse_error_count == 2


def test_xlsx_that_inflates_like_a_bomb_is_refused(tmp_path: Path) -> None:
    clean = _workbook(tmp_path / "clean.xlsx")
    padded = tmp_path / "padded.xlsx"
    with (
        zipfile.ZipFile(clean) as source,
        zipfile.ZipFile(padded, "w", zipfile.ZIP_DEFLATED, compresslevel=9) as target,
    ):
        for info in source.infolist():
            data = source.read(info)
            if info.filename == "xl/worksheets/sheet1.xml":
                data = data.replace(b"<sheetData>", b"<sheetData>" + b" " * 40_000_000)
            target.writestr(info.filename, data)
    with pytest.raises(ProfileError, match="decompression bomb"):
        open_table(padded)


def test_xlsx_title_rows_above_the_table_are_skipped_and_reported(tmp_path: Path) -> None:
    path = tmp_path / "titled.xlsx"
    book = openpyxl.Workbook()
    sheet = book.active
    sheet.append(["Harbour office: crates landed in March"])
    sheet.append([])
    sheet.append(["crate", "dock", "weight"])
    sheet.append(["C-1", "Nord", 12])
    sheet.append(["C-2", "Süd", 7.5])
    book.save(path)
    source, table = _table(path)
    assert source.column_names == ["crate", "dock", "weight"]
    assert table.column("weight").to_pylist() == ["12", "7.5"]
    assert "2 row(s) above the table" in source.parse_errors[0]["message"]


def test_xlsx_without_header_gets_numbered_columns(tmp_path: Path) -> None:
    path = tmp_path / "bare.xlsx"
    book = openpyxl.Workbook()
    for row in ([1, 2.5, "x"], [2, 3.5, "y"], [3, 4.5]):
        book.active.append(row)
    book.save(path)
    source, table = _table(path)
    assert source.info.header is False
    assert source.column_names == ["column_1", "column_2", "column_3"]
    assert table.column("column_3").to_pylist() == ["x", "y", None]


def test_jsonl_values_the_fast_parser_refuses_are_still_read(tmp_path: Path) -> None:
    # Integers past 64 bits and NaN are refused by orjson but read by Python's json
    # module (which accepts NaN by default), so such lines are not reported as broken.
    path = tmp_path / "big.jsonl"
    path.write_text(
        '{"code": 123456789012345678901234567890, "reading": 1.25}\n'
        '{"code": 7, "reading": NaN}\n'
        '{"code": 8, "reading": 2.5e-7, "ok": false}\n',
        encoding="utf-8",
    )
    source, table = _table(path)
    assert table.column("code").to_pylist() == ["123456789012345678901234567890", "7", "8"]
    assert table.column("reading").to_pylist() == ["1.25", "NaN", "2.5e-07"]
    assert table.column("ok").to_pylist() == [None, None, "false"]
    assert source.parse_errors == []
