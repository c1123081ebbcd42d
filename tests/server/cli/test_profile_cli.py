"""`tidewaiter profile`: outputs, exit codes and the progress bar."""

from __future__ import annotations

import io
import json
import subprocess
import sys
from pathlib import Path

import numpy as np
import openpyxl
import pytest

from server.cli import main
from server.cli.engine import ProgressBar, plain

# An invented delivery: three pallets at two docks.
PALLETS = "pallet,dock,crates\nP-1,Nord,4\nP-2,Süd,5\nP-3,Nord,\n"


@pytest.fixture
def delivery(tmp_path: Path) -> Path:
    path = tmp_path / "pallets.csv"
    path.write_text(PALLETS, encoding="utf-8")
    return path


def test_profile_goes_to_stdout_without_a_bar_when_not_a_terminal(
    delivery: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    assert main(["profile", str(delivery)]) == 0
    out, err = capsys.readouterr()
    profile = json.loads(out)
    assert profile["format_version"] == 1
    assert profile["source"]["name"] == "pallets.csv"
    assert profile["dataset"]["rows"] == 3
    assert [column["name"] for column in profile["columns"]] == ["pallet", "dock", "crates"]
    assert err == ""


def test_profile_json_goes_to_the_named_file(
    delivery: Path, tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    out_path = tmp_path / "profile.json"
    assert main(["profile", str(delivery), "--json", str(out_path), "--quiet"]) == 0
    assert capsys.readouterr().out == ""
    assert json.loads(out_path.read_text(encoding="utf-8"))["dataset"]["columns"] == 3


def test_the_command_starts_without_loading_the_engine_or_the_settings(delivery: Path) -> None:
    # Commands load what they need when they run: `tidewaiter profile` starts the
    # file's digest before the engine's half second of imports, on the idle core.
    probe = (
        "import sys, server.cli\n"
        "heavy = ('pyarrow', 'numpy', 'pydantic', 'worker.profiling')\n"
        "print(','.join(m for m in heavy if m in sys.modules))\n"
        "server.cli.main(['profile', '--quiet', '--json', '/dev/null', sys.argv[1]])\n"
        "print('worker.profiling' in sys.modules)\n"
    )
    done = subprocess.run(
        [sys.executable, "-c", probe, str(delivery)], capture_output=True, text=True, check=True
    )
    assert done.stdout.split("\n")[:2] == ["", "True"]


def test_unreadable_file_exits_2_with_one_line(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    path = tmp_path / "scan.csv"
    path.write_bytes(b"%PDF-1.4\n%\xe2\xe3\xcf\xd3\n")
    assert main(["profile", str(path)]) == 2
    out, err = capsys.readouterr()
    assert out == ""
    assert err == "tidewaiter: cannot profile scan.csv: this looks like a PDF, not a table\n"


def test_the_installed_command_prints_no_traceback(tmp_path: Path) -> None:
    path = tmp_path / "empty.csv"
    path.write_bytes(b"")
    done = subprocess.run(
        [str(Path(sys.executable).with_name("tidewaiter")), "profile", str(path)],
        capture_output=True,
        text=True,
        timeout=120,
        check=False,
    )
    assert done.returncode == 2
    assert done.stderr.strip().splitlines() == [
        "tidewaiter: cannot profile empty.csv: the file is empty"
    ]


def test_html_report_is_written_when_asked(
    delivery: Path, tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    html_path = tmp_path / "report.html"
    code = main(["profile", str(delivery), "--html", str(html_path), "--quiet"])
    out, err = capsys.readouterr()
    if code == 2:  # the report module is not there: a clear message, no fake report
        assert err == "tidewaiter: the HTML report is not available yet\n"
        assert not html_path.exists()
    else:
        assert code == 0
        assert out == ""
        assert "pallets.csv" in html_path.read_text(encoding="utf-8")


def test_sheet_names_the_workbook_sheet(delivery: Path, capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["profile", str(delivery), "--sheet", "Docks"]) == 2
    assert "only Excel files have sheets" in capsys.readouterr().err


def test_progress_bar_shows_stage_and_share() -> None:
    stream = io.StringIO()
    bar = ProgressBar(stream, interval=0.0)
    bar.update("reading", 0.0)
    bar.update("reading", 0.42)
    bar.update("summarising", 1.0)
    drawn = stream.getvalue().split("\r")
    assert drawn[1].startswith("reading") and drawn[1].endswith("  0%")
    assert drawn[2].endswith(" 42%") and drawn[2].count("#") == 12  # 42 % of 30 cells
    assert drawn[3].startswith("summarising") and drawn[3].endswith("100%")
    bar.clear()
    assert stream.getvalue().endswith("\r")


def test_progress_bar_skips_redraws_within_its_interval() -> None:
    stream = io.StringIO()
    bar = ProgressBar(stream, interval=3600.0)
    for step in range(100):
        bar.update("reading", step / 100)
    assert stream.getvalue().count("\r") == 1


def test_plain_makes_strict_json() -> None:
    value = {"a": np.float64("nan"), "b": [np.int64(3), float("inf")], "c": (1.5, "x")}
    assert plain(value) == {"a": None, "b": [3, None], "c": [1.5, "x"]}
    json.dumps(plain(value), allow_nan=False)


def test_sheet_selects_a_workbook_sheet(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    path = tmp_path / "harbour.xlsx"
    book = openpyxl.Workbook()
    book.active.title = "Crates"
    book.active.append(["crate"])
    book.active.append(["C-1"])
    docks = book.create_sheet("Docks")
    docks.append(["dock", "cranes"])
    for name, cranes in (("Nord", 4), ("Süd", 2), ("Ost", 3)):
        docks.append([name, cranes])
    book.save(path)
    assert main(["profile", str(path), "--sheet", "Docks", "--quiet"]) == 0
    profile = json.loads(capsys.readouterr().out)
    assert (profile["source"]["sheet"], profile["source"]["sheets"]) == (
        "Docks",
        ["Crates", "Docks"],
    )
    assert profile["dataset"]["rows"] == 3
    assert [column["name"] for column in profile["columns"]] == ["dock", "cranes"]


def test_outputs_replace_whole_files_and_devices_are_written_directly(
    delivery: Path, tmp_path: Path
) -> None:
    out_path = tmp_path / "profile.json"
    out_path.write_text("old", encoding="utf-8")
    assert main(["profile", str(delivery), "--json", str(out_path), "--quiet"]) == 0
    assert json.loads(out_path.read_text(encoding="utf-8"))["format_version"] == 1
    assert sorted(p.name for p in tmp_path.iterdir()) == ["pallets.csv", "profile.json"]
    assert main(["profile", str(delivery), "--json", "/dev/null", "--quiet"]) == 0
