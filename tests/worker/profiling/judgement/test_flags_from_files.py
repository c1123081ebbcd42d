"""Each flag code from a planted file run through the real engine; a clean file raises none.

The files are invented crate-weighing deliveries written by the test, so the
truth of every planted fault is known by construction. ``profile_file`` runs
the judgement at its end, so the flags are read from the profile itself.
"""

from __future__ import annotations

import csv
from collections.abc import Callable
from pathlib import Path

import numpy as np
import pytest

from worker.profiling import profile_file
from worker.profiling.judgement import FlagThresholds, compare_profiles

N = 400
Rows = list[dict[str, object]]


def clean_rows(seed: int = 1) -> Rows:
    """Crates: a key, a weight, a grade, a dock that does not depend on the grade."""
    rng = np.random.default_rng(seed)
    weights = np.round(rng.normal(18.0, 2.0, N), 2)
    docks = rng.permutation(["north", "south"] * (N // 2))
    return [
        {
            "crate_id": f"CR-{i:05d}",
            "weight_kg": f"{weights[i]:.2f}",
            "grade": "ABCD"[i % 4],
            "dock": docks[i],
            "length_cm": f"{40 + (i * 37) % 23}",
        }
        for i in range(N)
    ]


def write(path: Path, rows: Rows) -> Path:
    with path.open("w", newline="", encoding="utf-8") as handle:
        writer = csv.DictWriter(handle, fieldnames=list(rows[0]))
        writer.writeheader()
        writer.writerows(rows)
    return path


def flags_of(path: Path) -> list[dict]:
    return profile_file(path)["flags"]


def _missing(rows: Rows) -> Rows:
    for i in range(0, N, 8):  # 12.5 % of the weights left empty
        rows[i]["weight_kg"] = ""
    return rows


def _stand_in(rows: Rows) -> Rows:
    for i in range(0, N, 20):  # 5 % written as -999
        rows[i]["weight_kg"] = "-999"
    return rows


def _mixed(rows: Rows) -> Rows:
    for i in range(0, N, 50):  # 8 weights written as words
        rows[i]["weight_kg"] = "heavy"
    return rows


def _outliers(rows: Rows) -> Rows:
    for i in range(0, N, 40):  # 10 weights typed in grams
        rows[i]["weight_kg"] = f"{float(rows[i]['weight_kg']) * 1000:.0f}"
    return rows


def _repeated(rows: Rows) -> Rows:
    return rows + [dict(rows[i]) for i in range(10)]


def _key_collisions(rows: Rows) -> Rows:
    for i in range(1, 6):
        rows[i * 50]["crate_id"] = rows[0]["crate_id"]
    return rows


def _variants(rows: Rows) -> Rows:
    for i in range(0, N, 4):  # every grade 'A' is written one of three ways
        rows[i]["grade"] = ("A", "a", "A ")[(i // 4) % 3]
    return rows


def _twins(rows: Rows) -> Rows:
    for row in rows:
        row["weight_lb"] = f"{float(row['weight_kg']) * 2.20462:.4f}"
    return rows


def _strong_pair(rows: Rows) -> Rows:
    rng = np.random.default_rng(5)
    for row in rows:  # volume follows weight closely, but not exactly linearly
        weight = float(row["weight_kg"])
        row["volume_l"] = f"{weight**1.5 + rng.normal(0, 0.3):.3f}"
    return rows


def _dominant(rows: Rows) -> Rows:
    for i, row in enumerate(rows):
        row["dock"] = "south" if i % 20 == 0 else "north"  # 95 % north
    return rows


def _rare(rows: Rows) -> Rows:
    rows[7]["grade"] = "E"
    rows[9]["grade"] = "F"
    return rows


def _skewed(rows: Rows) -> Rows:
    for row in rows:  # grade A crates all go north, grade D all south
        if row["grade"] == "A":
            row["dock"] = "north"
        elif row["grade"] == "D":
            row["dock"] = "south"
    return rows


def _single(rows: Rows) -> Rows:
    for row in rows:
        row["site"] = "Quay 4"
    return rows


def _mostly_unique(rows: Rows) -> Rows:
    for i, row in enumerate(rows):
        row["remark"] = f"stacked by team {i} near bay {i * 7 % 101}"
    return rows


def _personal(rows: Rows) -> Rows:
    for i, row in enumerate(rows):
        row["contact"] = f"handler{i}@harbour.example"
    return rows


PLANTED: dict[str, Callable[[Rows], Rows]] = {
    "completeness.missing-share": _missing,
    "completeness.disguised-missing": _stand_in,
    "validity.mixed-kinds": _mixed,
    "validity.outliers": _outliers,
    "uniqueness.repeated-rows": _repeated,
    "uniqueness.key-collisions": _key_collisions,
    "consistency.label-variants": _variants,
    "redundancy.twin-columns": _twins,
    "redundancy.strong-pair": _strong_pair,
    "balance.dominant-label": _dominant,
    "balance.rare-labels": _rare,
    "balance.skewed-crosstab": _skewed,
    "information.single-value": _single,
    "information.mostly-unique": _mostly_unique,
    "privacy.personal-data": _personal,
}


@pytest.fixture(scope="module")
def clean_flags(tmp_path_factory: pytest.TempPathFactory) -> list[dict]:
    return flags_of(write(tmp_path_factory.mktemp("clean") / "clean.csv", clean_rows()))


def test_the_clean_file_raises_no_flag(clean_flags: list[dict]) -> None:
    assert clean_flags == [], [f["message"] for f in clean_flags]


@pytest.mark.parametrize("code", sorted(PLANTED))
def test_planted_file_raises_its_flag(code: str, tmp_path: Path, clean_flags: list) -> None:
    path = write(tmp_path / "planted.csv", PLANTED[code](clean_rows()))
    raised = [f for f in flags_of(path) if f["code"] == code]
    assert raised, f"{code} not raised"
    assert all(f["message"] and f["evidence"] for f in raised)
    assert code not in {f["code"] for f in clean_flags}


def test_planted_stand_in_message(tmp_path: Path) -> None:
    flags = flags_of(write(tmp_path / "planted.csv", _stand_in(clean_rows())))
    (flag,) = [f for f in flags if f["code"] == "completeness.disguised-missing"]
    assert flag["message"].startswith("5.0 % of 'weight_kg' is -999")
    assert flag["evidence"]["count"] == 20


def test_stability_flags_between_real_deliveries(tmp_path: Path) -> None:
    t = FlagThresholds()
    march = profile_file(write(tmp_path / "march.csv", clean_rows(seed=1)))
    april_rows = clean_rows(seed=2)
    assert compare_profiles(march, profile_file(write(tmp_path / "a.csv", april_rows)),
                            thresholds=t)["flags"] == []  # fmt: skip
    for row in april_rows:  # heavier crates, no dock column, a new pallet column
        row["weight_kg"] = f"{float(row['weight_kg']) + 3:.2f}"
        del row["dock"]
        row["pallet"] = "P" + row["crate_id"][-1]
    april = profile_file(write(tmp_path / "april.csv", april_rows[: N // 3]))
    codes = {f["code"] for f in compare_profiles(march, april, thresholds=t)["flags"]}
    assert codes == {
        "stability.schema-change",
        "stability.distribution-shift",
        "stability.volume-change",
    }


def test_a_file_with_a_header_and_no_rows(tmp_path: Path) -> None:
    path = tmp_path / "empty.csv"
    path.write_text("crate_id,weight_kg\n", encoding="utf-8")
    profile = profile_file(path)
    (flag,) = profile["flags"]
    assert (flag["code"], flag["severity"]) == ("completeness.missing-share", "critical")
    assert profile["score"]["dimensions"]["completeness"] == 0
    assert profile["verdict"] == "reject"
