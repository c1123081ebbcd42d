"""The judgement of a profile: flags, scorecard, supplier rules and drift against a baseline.

Pure functions over profile documents (no database, no web): ``assess`` for
one intake, ``compare_profiles`` for two.
"""

from worker.profiling.judgement.assessment import assess
from worker.profiling.judgement.drift import compare_profiles
from worker.profiling.judgement.flags import PROFILE_FLAGS, STABILITY_FLAGS, raise_flags
from worker.profiling.judgement.rules import (
    RulesError,
    SupplierRules,
    check_rules,
    draft_rules,
    parse_rules,
)
from worker.profiling.judgement.score import scorecard, suggest_verdict
from worker.profiling.judgement.thresholds import FlagThresholds

__all__ = [
    "PROFILE_FLAGS",
    "STABILITY_FLAGS",
    "FlagThresholds",
    "RulesError",
    "SupplierRules",
    "assess",
    "check_rules",
    "compare_profiles",
    "draft_rules",
    "parse_rules",
    "raise_flags",
    "scorecard",
    "suggest_verdict",
]
