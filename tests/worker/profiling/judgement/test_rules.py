"""Supplier rules: validation with a path per mistake, checking, drafting."""

from __future__ import annotations

import json

import numpy as np
import pytest
import yaml

from tests.worker.profiling.judgement.planted import label_column, numeric_column, profile_of
from worker.profiling.judgement import RulesError, check_rules, draft_rules, parse_rules
from worker.profiling.judgement.rules import thresholds_for
from worker.profiling.judgement.thresholds import FlagThresholds

RULES_YAML = """
rows: {min: 100, max: 1000}
other_columns: flag
columns:
  crate_id: {kind: identifier, unique: true}
  weight_kg: {kind: numeric, min: 0, max: 40, max_missing_share: 0.02, missing_values: [-999]}
  grade: {kind: categorical, allowed_labels: [A, B, C]}
  remarks: {required: false}
thresholds: {missing_share_warning: 0.1}
"""


def delivery(weights: list[float | None] | None = None, grades: list[str] | None = None) -> dict:
    rng = np.random.default_rng(8)
    n = 200
    return profile_of(
        [
            label_column("crate_id", [f"CR-{i:04d}" for i in range(n)], kind="identifier"),
            numeric_column(
                "weight_kg",
                weights or np.round(rng.uniform(5, 35, n), 1).tolist(),
                sentinels=[-999.0] if weights and -999.0 in weights else [],
            ),
            label_column("grade", grades or [("A", "B", "C")[i % 3] for i in range(n)]),
        ]
    )


def by_rule(results: list[dict]) -> dict[str, dict]:
    return {r["rule"]: r for r in results}


def test_yaml_and_json_give_the_same_rules() -> None:
    from_yaml = parse_rules(RULES_YAML)
    from_json = parse_rules(json.dumps(yaml.safe_load(RULES_YAML)))
    assert from_yaml == from_json
    assert from_yaml.columns["weight_kg"].max == 40
    assert from_yaml.columns["remarks"].required is False


def test_every_mistake_is_reported_with_its_path() -> None:
    bad = """
rows: {min: 10, max: 5}
columns:
  weight_kg: {kind: number, min: heavy, colour: red}
  grade: {max_missing_share: 1.5}
thresholds: {psi_warnin: 0.2}
"""
    with pytest.raises(RulesError) as caught:
        parse_rules(bad)
    problems = {p["path"]: p["message"] for p in caught.value.problems}
    assert "rows" in problems and "larger than max" in problems["rows"]
    assert problems["columns.weight_kg.kind"].startswith("Input should be")
    assert problems["columns.weight_kg.min"] == "should be a number, or a date such as 2031-03-01"
    assert problems["columns.weight_kg.colour"] == "unknown setting"
    assert "less than or equal to 1" in problems["columns.grade.max_missing_share"]
    assert any(path.startswith("thresholds") for path in problems)
    assert "columns.weight_kg.min" in str(caught.value)


def test_text_that_is_neither_json_nor_yaml() -> None:
    with pytest.raises(RulesError) as caught:
        parse_rules("columns: [unclosed")
    assert caught.value.problems[0]["message"].startswith("not JSON or YAML")
    with pytest.raises(RulesError, match="mapping"):
        parse_rules("- just\n- a list\n")


def test_a_clean_delivery_keeps_every_rule() -> None:
    results = check_rules(delivery(), RULES_YAML)
    broken = [r for r in results if not r["passed"]]
    assert broken == []
    assert "rows.min" in by_rule(results) and "columns.crate_id.unique" in by_rule(results)


def test_broken_rules_carry_their_evidence() -> None:
    weights = np.round(np.random.default_rng(1).uniform(5, 35, 200), 1).tolist()
    weights[:10] = [55.0] * 10  # 5 % above the max of 40
    weights[10:16] = [-999.0] * 6  # stand-ins for 'unknown': 3 % counted as missing
    grades = [("A", "B", "C")[i % 3] for i in range(196)] + ["Z"] * 4
    profile = delivery(weights, grades)
    profile["columns"].append(label_column("pallet", ["P"] * 200))
    results = by_rule(check_rules(profile, RULES_YAML))

    high = results["columns.weight_kg.max"]
    assert not high["passed"] and high["observed"] == 55.0
    assert high["evidence"]["cells"] == pytest.approx(10, abs=2)  # from percentiles, ±1 %
    missing = results["columns.weight_kg.max_missing_share"]
    assert not missing["passed"] and missing["evidence"]["missing"] == 6
    labels = results["columns.grade.allowed_labels"]
    assert not labels["passed"] and labels["evidence"]["labels"] == [{"value": "Z", "count": 4}]
    assert not results["other_columns"]["passed"]
    assert results["other_columns"]["observed"] == ["pallet"]


def test_missing_column_and_wrong_kind_are_critical() -> None:
    profile = delivery()
    profile["columns"] = [c for c in profile["columns"] if c["name"] != "crate_id"]
    profile["columns"][1]["kind"] = "text"  # grade
    results = by_rule(check_rules(profile, RULES_YAML))
    assert results["columns.crate_id.required"]["passed"] is False
    assert results["columns.crate_id.required"]["severity"] == "critical"
    assert results["columns.grade.kind"]["passed"] is False
    assert results["columns.grade.kind"]["message"] == "'grade' is text, not categorical."
    assert "columns.remarks.required" in results and results["columns.remarks.required"]["passed"]


def test_row_count_range() -> None:
    results = by_rule(check_rules(delivery(), {"rows": {"min": 500}}))
    assert results["rows.min"]["passed"] is False
    assert results["rows.min"]["message"] == "The file has 200 rows; the rules expect at least 500."


def test_uniqueness_rule() -> None:
    profile = delivery()
    keys = profile["columns"][0]
    keys["distinct"] = 190
    result = by_rule(check_rules(profile, {"columns": {"crate_id": {"unique": True}}}))
    assert result["columns.crate_id.unique"]["observed"] == 10


def test_draft_rules_from_an_accepted_intake_are_kept_by_it() -> None:
    profile = delivery()
    draft = draft_rules(profile)
    assert draft["columns"]["weight_kg"]["kind"] == "numeric"
    assert draft["columns"]["grade"]["allowed_labels"] == ["A", "B", "C"]
    assert draft["columns"]["crate_id"]["unique"] is True
    assert draft["rows"] == {"min": 100, "max": 400}
    parse_rules(yaml.safe_dump(draft))  # round-trips through YAML
    assert all(r["passed"] for r in check_rules(profile, draft))


def test_draft_rules_with_stand_ins_are_kept_by_the_same_file() -> None:
    weights = np.round(np.random.default_rng(2).uniform(5, 35, 200), 1).tolist()
    weights[:9] = [-999.0] * 9
    profile = delivery(weights)
    draft = draft_rules(profile)
    assert draft["columns"]["weight_kg"]["missing_values"] == [-999.0]
    assert draft["columns"]["weight_kg"]["max_missing_share"] == 0.05  # 4.5 % rounded up
    assert all(r["passed"] for r in check_rules(profile, draft))


def test_threshold_overrides() -> None:
    base = FlagThresholds()
    overridden = thresholds_for(parse_rules(RULES_YAML), base)
    assert overridden.missing_share_warning == 0.1
    assert overridden.psi_warning == base.psi_warning
    assert thresholds_for(None, base) is base


def test_date_ranges_for_datetime_columns() -> None:
    column = {
        "name": "read_at",
        "kind": "datetime",
        "count": 10,
        "missing": 0,
        "datetime": {"min": "2031-02-27T23:50:00", "max": "2031-03-31T23:50:00"},
    }
    profile = profile_of([column])
    rules = "columns: {read_at: {kind: datetime, min: 2031-03-01, max: 2031-03-31}}"
    results = by_rule(check_rules(profile, rules))
    early = results["columns.read_at.min"]
    assert not early["passed"]
    assert early["message"] == (
        "'read_at' goes before its min of 2031-03-01: earliest 2031-02-27T23:50:00."
    )
    assert results["columns.read_at.max"]["passed"]  # the max date covers its whole day
    with pytest.raises(RulesError, match="both be numbers or both be dates"):
        parse_rules({"columns": {"read_at": {"min": 0, "max": "2031-03-31"}}})
