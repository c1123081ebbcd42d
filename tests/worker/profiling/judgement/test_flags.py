"""Every flag code: a planted fault must raise it, a clean delivery must not.

The faults are planted in invented values, so the truth is known by
construction; the profiles are built from those values to the profile
document's shape (tests/worker/profiling/judgement/planted.py).
"""

from __future__ import annotations

import re

import numpy as np
import pytest

from tests.worker.profiling.judgement.planted import (
    crosstab_of,
    label_column,
    numeric_column,
    profile_of,
)
from worker.profiling.judgement import PROFILE_FLAGS, STABILITY_FLAGS, FlagThresholds
from worker.profiling.judgement.drift import compare_profiles
from worker.profiling.judgement.flags import raise_flags, rule_flags
from worker.profiling.judgement.rules import check_rules

T = FlagThresholds()
N = 400


def _rng() -> np.random.Generator:
    return np.random.default_rng(20261201)


def clean_columns() -> list[dict]:
    """A crate-weighing delivery with nothing wrong: weights, a grade, a crate key, a dock."""
    rng = _rng()
    weights = np.round(rng.normal(18.0, 2.0, N), 2).tolist()
    grades = [("A", "B", "C", "D")[i % 4] for i in range(N)]
    docks = [("north", "south")[(i // 4) % 2] for i in range(N)]
    return [
        numeric_column("weight_kg", weights),
        label_column("grade", grades),
        label_column("crate_id", [f"CR-{i:05d}" for i in range(N)], kind="identifier"),
        label_column("dock", docks),
    ]


def clean_profile() -> dict:
    columns = clean_columns()
    grades = [("A", "B", "C", "D")[i % 4] for i in range(N)]
    docks = [("north", "south")[(i // 4) % 2] for i in range(N)]
    return profile_of(columns, crosstabs=[crosstab_of("grade", "dock", grades, docks)])


def _replace(profile: dict, column: dict) -> dict:
    profile["columns"] = [column if c["name"] == column["name"] else c for c in profile["columns"]]
    return profile


def codes(flags: list[dict]) -> set[str]:
    return {flag["code"] for flag in flags}


def test_clean_delivery_raises_no_flag() -> None:
    flags = raise_flags(clean_profile(), T)
    assert flags == [], [f["message"] for f in flags]


def test_the_registries_cover_every_flag_code_of_the_design() -> None:
    # The codes listed in the design notes' "Flag codes" section.
    design = {
        "completeness.missing-share",
        "completeness.disguised-missing",
        "validity.mixed-kinds",
        "validity.outliers",
        "validity.rule-broken",
        "uniqueness.repeated-rows",
        "uniqueness.key-collisions",
        "consistency.label-variants",
        "redundancy.twin-columns",
        "redundancy.strong-pair",
        "balance.dominant-label",
        "balance.rare-labels",
        "balance.skewed-crosstab",
        "information.single-value",
        "information.mostly-unique",
        "privacy.personal-data",
        "stability.schema-change",
        "stability.distribution-shift",
        "stability.volume-change",
    }
    produced = set(PROFILE_FLAGS) | set(STABILITY_FLAGS) | {"validity.rule-broken"}
    assert produced == design


def only(flags: list[dict], code: str) -> dict:
    found = [f for f in flags if f["code"] == code]
    assert len(found) == 1, flags
    return found[0]


def test_missing_share_warning_and_critical() -> None:
    rng = _rng()
    weights: list[float | None] = np.round(rng.normal(18, 2, N), 2).tolist()
    for i in range(0, N, 10):  # every tenth weight missing: 10 %, above the 5 % warning
        weights[i] = None
    profile = _replace(clean_profile(), numeric_column("weight_kg", weights))
    flag = only(raise_flags(profile, T), "completeness.missing-share")
    assert flag["severity"] == "warning"
    assert flag["columns"] == ["weight_kg"]
    assert flag["evidence"]["missing"] == 40
    assert "10 % of 'weight_kg' is missing (40 of 400 rows)" in flag["message"]

    for i in range(0, N, 2):  # now 55 % missing: critical
        weights[i] = None
    profile = _replace(clean_profile(), numeric_column("weight_kg", weights))
    assert only(raise_flags(profile, T), "completeness.missing-share")["severity"] == "critical"


def test_disguised_missing_from_a_stand_in_number() -> None:
    rng = _rng()
    weights = np.round(rng.normal(18, 2, N), 2).tolist()
    weights[:17] = [-999.0] * 17  # 4.25 % of the rows hold -999
    column = numeric_column("weight_kg", weights, sentinels=[-999.0])
    flags = raise_flags(_replace(clean_profile(), column), T)
    flag = only(flags, "completeness.disguised-missing")
    assert flag["severity"] == "warning"
    assert flag["evidence"]["count"] == 17
    # -999 lies far beyond the fences, but it is a stand-in, not an outlier.
    assert column["numeric"]["outliers"]["tukey_far"] == 17
    assert "validity.outliers" not in codes(flags)
    assert flag["message"].startswith("4.2 % of 'weight_kg' is -999, which looks like a code")


def test_disguised_missing_from_missing_tokens() -> None:
    grades = [("A", "B", "C", "D")[i % 4] for i in range(N)]
    grades[:8] = ["N/A"] * 8  # 2 % written as a token for 'unknown'
    column = label_column("grade", grades)
    flag = only(raise_flags(_replace(clean_profile(), column), T), "completeness.disguised-missing")
    assert flag["severity"] == "info"
    assert flag["evidence"]["tokens"] == {"N/A": 8}


def test_mixed_kinds() -> None:
    column = clean_columns()[0]
    column["off_kind"] = 6  # six weights written as text such as "heavy"
    column["off_kind_examples"] = ["heavy", "n.a.", "18,5kg"]
    flag = only(raise_flags(_replace(clean_profile(), column), T), "validity.mixed-kinds")
    assert flag["evidence"]["off_kind"] == 6
    assert "'heavy'" in flag["message"]


def test_mixed_kinds_from_kind_counts() -> None:
    column = clean_columns()[0]
    del column["off_kind"]
    column["kind_counts"] = {"numeric": 394, "text": 6}
    flag = only(raise_flags(_replace(clean_profile(), column), T), "validity.mixed-kinds")
    assert flag["evidence"]["off_kind"] == 6


def test_outliers() -> None:
    rng = _rng()
    weights = np.round(rng.normal(18, 2, N), 2).tolist()
    weights[:6] = [180.0, 175.0, 190.0, 0.01, 200.0, 210.0]  # typed in grams or slipped keys
    column = numeric_column("weight_kg", weights)
    flag = only(raise_flags(_replace(clean_profile(), column), T), "validity.outliers")
    assert flag["evidence"]["tukey_far"] == 6
    assert flag["severity"] == "warning"  # 1.5 % beyond the outer fences, above 1 %
    assert "210" in flag["message"]


def test_rule_broken_from_rule_results() -> None:
    results = check_rules(clean_profile(), {"columns": {"weight_kg": {"max": 20}}})
    flags = rule_flags(results)
    assert len(flags) == 1
    assert flags[0]["code"] == "validity.rule-broken"
    assert flags[0]["columns"] == ["weight_kg"]
    assert flags[0]["evidence"]["rule"] == "columns.weight_kg.max"
    assert rule_flags(check_rules(clean_profile(), {"columns": {"weight_kg": {"max": 99}}})) == []


def test_repeated_rows() -> None:
    profile = clean_profile()
    profile["dataset"]["duplicate_rows"] = 12  # 3 % of the rows
    flag = only(raise_flags(profile, T), "uniqueness.repeated-rows")
    assert flag["severity"] == "warning"
    assert flag["message"] == "12 rows (3.0 %) repeat an earlier row exactly."


def test_key_collisions() -> None:
    keys = [f"CR-{i:05d}" for i in range(N)]
    keys[10:15] = ["CR-00001"] * 5  # five crates reuse an earlier key
    column = label_column("crate_id", keys, kind="identifier")
    flag = only(raise_flags(_replace(clean_profile(), column), T), "uniqueness.key-collisions")
    assert flag["evidence"]["repeats"] == 5


def test_key_collisions_within_the_sketch_error_are_not_raised() -> None:
    column = label_column("crate_id", [f"CR-{i:05d}" for i in range(N)], kind="identifier")
    count = column["count"]
    # A HyperLogLog estimate 0.5 % under the count, with 0.41 % standard error: within 3 errors.
    column.update(distinct=int(count * 0.995), distinct_exact=False, distinct_relative_error=0.0041)
    flags = raise_flags(_replace(clean_profile(), column), T)
    assert not [f for f in flags if f["code"] == "uniqueness.key-collisions"]
    column.update(distinct=int(count * 0.9))  # far beyond the sketch's error
    flag = only(raise_flags(_replace(clean_profile(), column), T), "uniqueness.key-collisions")
    assert flag["evidence"]["exact"] is False


def test_label_variants() -> None:
    grades = [("A", "B", "C", "D")[i % 4] for i in range(N)]
    grades[:5] = ["a "] * 5  # 'A' written lower-case with a trailing space
    column = label_column("grade", grades, variants=[["A", "a "]])
    flag = only(raise_flags(_replace(clean_profile(), column), T), "consistency.label-variants")
    assert flag["evidence"]["cells"] == 5
    assert "'A', 'a '" in flag["message"]


def test_twin_columns() -> None:
    profile = clean_profile()
    profile["twins"] = [
        {"a": "weight_kg", "b": "weight_lb", "slope": 2.20462, "intercept": 0.0, "r": 1.0,
         "hint": "weight_kg in kilograms, weight_lb in pounds"},
    ]  # fmt: skip
    profile["pairs"] = [{"a": "weight_kg", "b": "weight_lb", "method": "pearson", "value": 1.0}]
    flags = raise_flags(profile, T)
    flag = only(flags, "redundancy.twin-columns")
    assert flag["columns"] == ["weight_kg", "weight_lb"]
    assert "pounds" in flag["message"]
    assert flag["message"].startswith("'weight_lb' ≈ 2.205 × 'weight_kg' (r = 1.00000)")
    assert "redundancy.strong-pair" not in codes(flags)  # the twin says it already


def test_strong_pair() -> None:
    profile = clean_profile()
    profile["pairs"] = [
        {"a": "weight_kg", "b": "volume_l", "method": "spearman", "value": 0.985, "n": 400},
        {"a": "weight_kg", "b": "grade", "method": "eta", "value": 0.2, "n": 400},
    ]
    flag = only(raise_flags(profile, T), "redundancy.strong-pair")
    assert flag["columns"] == ["weight_kg", "volume_l"]
    assert flag["evidence"]["value"] == 0.985


def test_dominant_label() -> None:
    docks = ["north"] * 380 + ["south"] * 20  # 95 % north
    column = label_column("dock", docks)
    profile = _replace(clean_profile(), column)
    profile["crosstabs"] = []
    flag = only(raise_flags(profile, T), "balance.dominant-label")
    assert flag["evidence"]["share"] == 0.95
    assert flag["message"].startswith("95 % of 'dock' is 'north'")


def test_rare_labels() -> None:
    grades = [("A", "B", "C", "D")[i % 4] for i in range(N - 3)] + ["E", "E", "F"]
    column = label_column("grade", grades)
    profile = _replace(clean_profile(), column)
    profile["crosstabs"] = []
    flag = only(raise_flags(profile, T), "balance.rare-labels")
    assert [item["value"] for item in flag["evidence"]["labels"]] == ["F", "E"]


def test_skewed_crosstab() -> None:
    # Grade A crates all went to the north dock, grade D to the south one.
    grades = [("A", "B", "C", "D")[i % 4] for i in range(N)]
    docks = [
        "north" if g == "A" else "south" if g == "D" else ("north", "south")[(i // 4) % 2]
        for i, g in enumerate(grades)
    ]
    profile = clean_profile()
    profile["crosstabs"] = [crosstab_of("grade", "dock", grades, docks)]
    flag = only(raise_flags(profile, T), "balance.skewed-crosstab")
    assert flag["columns"] == ["grade", "dock"]
    cells = {(c["a"], c["b"]) for c in flag["evidence"]["cells"]}
    assert ("A", "north") in cells and ("D", "south") in cells
    assert "'A' with 'north'" in flag["message"]


def test_skewed_crosstab_not_judged_when_cochran_rule_fails() -> None:
    # 6 rows: every expected count is below 5, so the chi-square test is not trusted.
    tab = crosstab_of("grade", "dock", list("AAABBB"), ["n", "n", "n", "s", "s", "s"])
    tab["p_value"] = 1e-9  # even with a tiny p-value
    profile = clean_profile()
    profile["crosstabs"] = [tab]
    assert "balance.skewed-crosstab" not in codes(raise_flags(profile, T))


def test_single_value() -> None:
    column = label_column("dock", ["north"] * N)
    profile = _replace(clean_profile(), column)
    profile["crosstabs"] = []
    flag = only(raise_flags(profile, T), "information.single-value")
    assert flag["evidence"]["value"] == "north"


def test_mostly_unique() -> None:
    column = label_column("grade", [f"note {i}" for i in range(N)], kind="text")
    profile = _replace(clean_profile(), column)
    profile["crosstabs"] = []
    flag = only(raise_flags(profile, T), "information.mostly-unique")
    assert flag["evidence"]["share"] == 1.0


def test_personal_data() -> None:
    column = label_column("contact", [f"p{i}@example.org" for i in range(N)], kind="text")
    column["personal"] = {"kind": "email", "share": 1.0, "checked": 400, "shares": {"email": 1}}
    profile = clean_profile()
    profile["columns"].append(column)
    flag = only(raise_flags(profile, T), "privacy.personal-data")
    assert "e-mail addresses" in flag["message"]
    assert "data-protection officer" in flag["message"]


def _drift(baseline: dict, target: dict) -> list[dict]:
    return compare_profiles(baseline, target, thresholds=T)["flags"]


def test_stability_flags_absent_between_equal_deliveries() -> None:
    assert _drift(clean_profile(), clean_profile()) == []


def test_schema_change() -> None:
    target = clean_profile()
    target["columns"] = [c for c in target["columns"] if c["name"] != "dock"]
    target["columns"].append(label_column("pallet", ["P1", "P2"] * (N // 2)))
    flags = _drift(clean_profile(), target)
    changes = {(f["evidence"]["change"], f["columns"][0], f["severity"]) for f in flags}
    assert ("removed", "dock", "critical") in changes
    assert ("added", "pallet", "warning") in changes
    assert codes(flags) == {"stability.schema-change"}


def test_distribution_shift() -> None:
    rng = _rng()
    heavier = np.round(rng.normal(21.0, 2.0, N), 2).tolist()  # 1.5 SD heavier crates
    target = _replace(clean_profile(), numeric_column("weight_kg", heavier))
    flag = only(_drift(clean_profile(), target), "stability.distribution-shift")
    assert flag["columns"] == ["weight_kg"]
    assert flag["severity"] == "warning"  # PSI far above 0.25
    assert re.search(r"mean moved \+1\.\d\d baseline standard deviations", flag["message"])


def test_volume_change() -> None:
    target = clean_profile()
    target["dataset"]["rows"] = 150
    flag = only(_drift(clean_profile(), target), "stability.volume-change")
    assert flag["evidence"]["ratio"] == pytest.approx(0.375)
    assert "150 rows against 400" in flag["message"]


def test_flags_are_ordered_by_severity() -> None:
    profile = clean_profile()
    weights: list[float | None] = [None] * 300 + [18.0] * 100  # critical missing share
    profile = _replace(profile, numeric_column("weight_kg", weights))
    profile["dataset"]["duplicate_rows"] = 1  # information
    severities = [f["severity"] for f in raise_flags(profile, T)]
    assert severities == sorted(severities, key=["critical", "warning", "info"].index)
    assert severities[0] == "critical"


def test_outliers_beside_stand_ins_are_still_raised() -> None:
    rng = _rng()
    weights = np.round(rng.normal(18, 2, N), 2).tolist()
    weights[:17] = [-999.0] * 17
    weights[17:23] = [180.0, 175.0, 190.0, 185.0, 200.0, 210.0]  # typed in grams
    column = numeric_column("weight_kg", weights, sentinels=[-999.0])
    flag = only(raise_flags(_replace(clean_profile(), column), T), "validity.outliers")
    assert flag["evidence"]["tukey_far"] == 6
    assert flag["evidence"]["stand_ins_left_out"]["tukey_far"] == 17
    assert flag["message"].endswith("Stand-ins for 'unknown' are not counted here.")
