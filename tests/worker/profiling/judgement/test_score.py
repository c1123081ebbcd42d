"""The scorecard's formulas on counts known by construction, and the suggested verdict."""

from __future__ import annotations

import numpy as np

from tests.worker.profiling.judgement.planted import label_column, numeric_column, profile_of
from worker.profiling.judgement import FlagThresholds, compare_profiles, scorecard, suggest_verdict
from worker.profiling.judgement.rules import check_rules

T = FlagThresholds()


def test_a_clean_file_scores_100_everywhere() -> None:
    profile = profile_of(
        [
            numeric_column("a", [float(i % 10) for i in range(100)]),
            label_column("b", [("x", "y")[i % 2] for i in range(100)]),
        ]
    )
    card = scorecard(profile, thresholds=T)
    assert card["overall"] == 100
    assert card["dimensions"]["completeness"] == 100
    assert card["dimensions"]["stability"] is None  # no baseline
    assert card["dimensions"]["conformance"] is None  # no rules
    assert set(card["reasons"]) == {
        "completeness",
        "validity",
        "uniqueness",
        "consistency",
        "balance",
    }


def test_completeness_counts_missing_and_stand_in_cells() -> None:
    # 100 rows × 2 columns = 200 cells; 12 missing in 'a', 6 stand-ins -999 in 'a'.
    values: list[float | None] = [float(i) for i in range(82)] + [-999.0] * 6 + [None] * 12
    profile = profile_of(
        [
            numeric_column("a", values, sentinels=[-999.0]),
            label_column("b", [("x", "y")[i % 2] for i in range(100)]),
        ]
    )
    card = scorecard(profile, thresholds=T)
    assert card["dimensions"]["completeness"] == 91  # floor(100 × (1 - 18/200)) = 91
    assert card["reasons"]["completeness"] == (
        "completeness 91: 9.0 % of cells missing or a stand-in for 'unknown', all in 'a'"
    )


def test_uniqueness_counts_repeated_rows_and_keys() -> None:
    keys = [f"K{i}" for i in range(95)] + ["K1"] * 5  # 5 repeated keys
    profile = profile_of([label_column("key", keys, kind="identifier")], duplicate_rows=3)
    card = scorecard(profile, thresholds=T)
    assert card["dimensions"]["uniqueness"] == 92  # floor(100 × (1 - (3 + 5)/100))


def test_consistency_and_balance_from_label_cells() -> None:
    # 200 label cells: 'Active' 150, 'active' 20 (a variant), 'Closed' 29, 'closed?' 1 (rare).
    values = ["Active"] * 150 + ["active"] * 20 + ["Closed"] * 29 + ["closed?"] * 1
    column = label_column("status", values, variants=[["Active", "active"]])
    card = scorecard(profile_of([column]), thresholds=T)
    assert card["dimensions"]["consistency"] == 90  # floor(100 × (1 - 20/200))
    # balance: no label above 90 %; one rare label (1 cell, 0.5 % < 1 %): floor(100 × 199/200)
    assert card["dimensions"]["balance"] == 99


def test_validity_counts_off_kind_far_out_and_rule_cells() -> None:
    values = [float(i % 10) for i in range(96)] + [500.0, 600.0, 700.0, 800.0]
    column = numeric_column("a", values, off_kind=2)
    profile = profile_of([column])
    assert column["numeric"]["outliers"]["tukey_far"] == 4
    card = scorecard(profile, thresholds=T)
    # 98 filled cells (100 - 2 text values counted as values here), bad = 2 + 4
    assert card["dimensions"]["validity"] == int(100 * (1 - 6 / 100))


def test_conformance_and_stability() -> None:
    rng = np.random.default_rng(4)
    base = profile_of(
        [
            numeric_column("a", rng.normal(0, 1, 300).tolist()),
            numeric_column("b", rng.normal(0, 1, 300).tolist()),
            numeric_column("c", rng.normal(0, 1, 300).tolist()),
            numeric_column("d", rng.normal(0, 1, 300).tolist()),
        ]
    )
    target = profile_of(
        [
            numeric_column("a", rng.normal(3, 1, 300).tolist()),  # moved
            numeric_column("b", rng.normal(0, 1, 300).tolist()),
            numeric_column("c", rng.normal(0, 1, 300).tolist()),
            numeric_column("d", rng.normal(0, 1, 300).tolist()),
        ]
    )
    drift = compare_profiles(base, target, thresholds=T)
    results = check_rules(target, {"columns": {"a": {"max": 1}, "b": {"kind": "numeric"}}})
    card = scorecard(target, thresholds=T, rule_results=results, drift=drift)
    assert card["dimensions"]["stability"] == 75  # 1 of 4 columns moved
    # rules: a.required, a.max (broken), b.required, b.kind -> 3 of 4 kept
    assert card["dimensions"]["conformance"] == 75
    assert card["reasons"]["conformance"].startswith("conformance 75: 1 of 4 rules broken")
    dims = [v for v in card["dimensions"].values() if v is not None]
    assert card["overall"] == sum(dims) // len(dims)


def _flag(severity: str) -> dict:
    return {"code": "x.y", "severity": severity, "columns": [], "message": "m", "evidence": {}}


def test_verdict_is_never_an_acceptance_without_rules() -> None:
    assert suggest_verdict([], None)[0] == "review"
    assert suggest_verdict([_flag("info")], None)[0] == "review"


def test_verdict_from_rules_and_flags() -> None:
    kept = [{"rule": "rows.min", "passed": True, "severity": "warning"}]
    broken = [{"rule": "rows.min", "passed": False, "severity": "warning"}]
    assert suggest_verdict([_flag("info")], kept)[0] == "accept"
    assert suggest_verdict([_flag("warning")], kept)[0] == "review"
    assert suggest_verdict([], broken)[0] == "review"
    verdict, reasons = suggest_verdict([_flag("critical"), _flag("warning")], kept)
    assert verdict == "reject" and reasons[0].startswith("1 critical flag, first: m")
