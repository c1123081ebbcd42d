"""``assess``: flags, scorecard, rule results and a suggested verdict for one profile."""

from __future__ import annotations

from typing import Any

from worker.profiling.judgement.flags import raise_flags, rule_flags, sort_flags
from worker.profiling.judgement.rules import SupplierRules, check_rules, thresholds_for
from worker.profiling.judgement.score import scorecard, suggest_verdict
from worker.profiling.judgement.thresholds import FlagThresholds


def assess(
    profile: dict[str, Any],
    *,
    thresholds: FlagThresholds,
    rules: SupplierRules | dict[str, Any] | None = None,
    drift: dict[str, Any] | None = None,
) -> dict[str, Any]:
    """Judge a profile: ``{"flags", "score", "rule_results", "verdict", "verdict_reasons"}``.

    ``rules`` (a supplier's rules document) adds the rule results, the
    validity.rule-broken flags and the conformance score, and may override
    thresholds. ``drift`` (from ``compare_profiles``) adds its stability.*
    flags and the stability score. The verdict is a suggestion for the person
    who decides; it is never applied on its own.
    """
    thresholds = thresholds_for(rules, thresholds)
    rule_results = check_rules(profile, rules) if rules is not None else []
    flags = raise_flags(profile, thresholds)
    flags += rule_flags(rule_results)
    if drift is not None:
        flags += drift.get("flags") or []
    flags = sort_flags(flags)
    verdict, reasons = suggest_verdict(flags, rule_results if rules is not None else None)
    return {
        "flags": flags,
        "score": scorecard(
            profile,
            thresholds=thresholds,
            rule_results=rule_results if rules is not None else None,
            drift=drift,
        ),
        "rule_results": rule_results,
        "verdict": verdict,
        "verdict_reasons": reasons,
    }
