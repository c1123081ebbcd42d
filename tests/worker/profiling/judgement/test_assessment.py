"""assess(): flags, scorecard, rule results and verdict together."""

from __future__ import annotations

import json

import numpy as np

from tests.worker.profiling.judgement.planted import label_column, numeric_column, profile_of
from worker.profiling.judgement import FlagThresholds, assess, compare_profiles

T = FlagThresholds()


def _delivery(shift: float = 0.0, missing: int = 0) -> dict:
    rng = np.random.default_rng(9)
    weights: list[float | None] = np.round(rng.normal(18 + shift, 2, 300), 2).tolist()
    weights[:missing] = [None] * missing
    return profile_of(
        [numeric_column("weight_kg", weights), label_column("grade", ["A", "B", "C"] * 100)]
    )


def test_assess_without_rules_or_baseline() -> None:
    result = assess(_delivery(), thresholds=T)
    assert set(result) == {"flags", "score", "rule_results", "verdict", "verdict_reasons"}
    assert result["flags"] == [] and result["rule_results"] == []
    assert result["verdict"] == "review"  # never accepted without rules
    json.dumps(result)  # stored as JSON


def test_assess_with_rules_and_drift() -> None:
    baseline, target = _delivery(), _delivery(shift=3.0, missing=30)
    drift = compare_profiles(baseline, target, thresholds=T)
    rules = {"columns": {"weight_kg": {"max_missing_share": 0.05}, "grade": {}}}
    result = assess(target, thresholds=T, rules=rules, drift=drift)
    codes = {f["code"] for f in result["flags"]}
    assert {"validity.rule-broken", "stability.distribution-shift"} <= codes
    assert "completeness.missing-share" in codes  # 10 % missing
    assert result["score"]["dimensions"]["conformance"] is not None
    assert result["score"]["dimensions"]["stability"] == 50  # weight moved, grade did not
    assert result["verdict"] == "review"


def test_rules_override_thresholds() -> None:
    target = _delivery(missing=30)  # 10 % missing
    plain = assess(target, thresholds=T)
    rules = {
        "columns": {"grade": {"kind": "categorical"}},
        "thresholds": {"missing_share_warning": 0.2},
    }
    relaxed = assess(target, thresholds=T, rules=rules)
    assert "completeness.missing-share" in {f["code"] for f in plain["flags"]}
    assert "completeness.missing-share" not in {f["code"] for f in relaxed["flags"]}
    assert relaxed["verdict"] == "accept"  # rules kept, nothing above information


def test_rules_that_check_nothing_do_not_make_an_acceptance() -> None:
    result = assess(_delivery(), thresholds=T, rules={"thresholds": {"psi_warning": 0.2}})
    assert result["rule_results"] == []
    assert result["verdict"] == "review"
