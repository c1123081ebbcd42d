"""``tidewaiter compare``: two profile files in, the drift document out."""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest

from server.cli import main
from tests.worker.profiling.judgement.planted import label_column, numeric_column, profile_of


def _write(path: Path, profile: dict) -> Path:
    path.write_text(json.dumps(profile), encoding="utf-8")
    return path


@pytest.fixture
def profiles(tmp_path: Path) -> tuple[Path, Path]:
    rng = np.random.default_rng(12)
    base = profile_of(
        [numeric_column("weight_kg", rng.normal(18, 2, 500).tolist()),
         label_column("grade", ["A", "B"] * 250)],
        name="march.csv",
    )  # fmt: skip
    target = profile_of(
        [numeric_column("weight_kg", rng.normal(22, 2, 500).tolist()),
         label_column("dock", ["n", "s"] * 250)],
        name="april.csv",
    )  # fmt: skip
    return _write(tmp_path / "base.json", base), _write(tmp_path / "target.json", target)


def test_prints_the_drift_and_writes_the_document(
    profiles: tuple[Path, Path], tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    out = tmp_path / "drift.json"
    assert main(["compare", str(profiles[0]), str(profiles[1]), "--json", str(out)]) == 0
    text = capsys.readouterr().out
    assert "baseline march.csv (500 rows) -> target april.csv (500 rows" in text
    assert "columns added: dock" in text and "columns removed: grade" in text
    assert "[critical] stability.schema-change" in text
    drift = json.loads(out.read_text())
    assert drift["schema"]["removed"] == ["grade"]
    assert drift["columns"][0]["name"] == "weight_kg" and drift["columns"][0]["psi"] > 0.25


def test_json_to_standard_output(
    profiles: tuple[Path, Path], capsys: pytest.CaptureFixture[str]
) -> None:
    assert main(["compare", str(profiles[0]), str(profiles[1]), "--json", "-"]) == 0
    drift = json.loads(capsys.readouterr().out)
    assert drift["volume"]["ratio"] == 1.0


def test_a_file_that_is_not_a_profile(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    bad = tmp_path / "bad.json"
    bad.write_text("{not json", encoding="utf-8")
    assert main(["compare", str(bad), str(bad)]) == 2
    assert "not JSON (line 1" in capsys.readouterr().err
    (tmp_path / "list.json").write_text("[1, 2]", encoding="utf-8")
    assert main(["compare", str(tmp_path / "list.json"), str(tmp_path / "nowhere.json")]) == 2
    assert "not a profile document" in capsys.readouterr().err


def test_compares_the_profiles_that_tidewaiter_profile_writes(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    rng = np.random.default_rng(3)
    paths = []
    for name, mean, rows in (("march", 18.0, 400), ("april", 21.0, 150)):
        lines = ["crate_id,weight_kg,grade"]
        lines += [f"C{i},{w:.2f},{'ABC'[i % 3]}" for i, w in enumerate(rng.normal(mean, 2, rows))]
        csv = tmp_path / f"{name}.csv"
        csv.write_text("\n".join(lines) + "\n", encoding="utf-8")
        out = tmp_path / f"{name}.json"
        assert main(["profile", str(csv), "--json", str(out), "--quiet"]) == 0
        paths.append(out)
    capsys.readouterr()
    assert main(["compare", str(paths[0]), str(paths[1]), "--json", "-"]) == 0
    drift = json.loads(capsys.readouterr().out)
    assert drift["volume"]["ratio"] == pytest.approx(150 / 400)
    codes = {f["code"] for f in drift["flags"]}
    assert codes == {"stability.volume-change", "stability.distribution-shift"}
