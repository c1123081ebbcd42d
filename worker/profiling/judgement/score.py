"""The scorecard: dimension scores 0-100 from cell and row counts, and a suggested verdict.

Every dimension is 100 × (1 - bad / checked), rounded down, so 100 means
nothing was found and any finding costs at least one point:

- completeness: bad = missing cells + cells holding a suspected stand-in for
  'unknown' (such as -999); checked = rows × columns (0 for a file with a
  header and no rows).
- validity: bad = values that do not fit their column's kind + values beyond
  Tukey's outer fences (stand-ins left out: completeness counts them) + values
  a supplier rule rejects; checked = filled cells.
- uniqueness: bad = rows repeating an earlier row + repeated keys of the worst
  identifier column (at most all rows); checked = rows.
- consistency: bad = cells of label columns written in a minority spelling of
  their label; checked = filled cells of label columns.
- balance: bad = cells of the dominant label beyond the dominant share, plus
  cells of rare labels; checked = filled cells of label columns (columns whose
  values nearly all differ are keys or free text and count as balanced).
- stability (only with a baseline): bad = columns added, removed, renamed,
  changed kind or shifted in distribution; checked = columns of baseline and
  target together (each column has the same number of cells, so this is a
  share of cells).
- conformance (only with rules): bad = broken rules; checked = rules checked.

The overall score is the mean of the dimensions that could be computed.
Scores summarise evidence; a person decides.
"""

from __future__ import annotations

import math
from typing import Any

from worker.profiling.judgement.flags import (
    LABEL_KINDS,
    is_mostly_unique,
    off_kind_count,
    rare_label_items,
    stand_ins_beyond,
    variant_cells,
)
from worker.profiling.judgement.thresholds import FlagThresholds
from worker.profiling.judgement.wording import number, percent, plural

DIMENSIONS = (
    "completeness",
    "validity",
    "uniqueness",
    "consistency",
    "balance",
    "stability",
    "conformance",
)


def _score(bad: float, checked: float) -> int:
    """100 × (1 - bad / checked), rounded down and kept within 0..100; 100 when nothing checked."""
    if checked <= 0:
        return 100
    return max(0, min(100, math.floor(100.0 * (1.0 - bad / checked) + 1e-9)))


def _worst(per_column: dict[str, float]) -> str:
    name = max(per_column, key=lambda k: per_column[k])
    return f", most in '{name}'" if len(per_column) > 1 else f", all in '{name}'"


def completeness(profile: dict[str, Any]) -> tuple[int, str]:
    """Share of cells that hold a real value (not missing, not a stand-in for 'unknown')."""
    rows = int(profile["dataset"].get("rows") or 0)
    columns = profile.get("columns") or []
    cells = rows * len(columns)
    if rows == 0 and columns:
        return 0, "completeness 0: the file has no rows"
    per_column = {}
    for column in columns:
        stand_ins = sum(int(s.get("count") or 0) for s in column.get("suspected_sentinels") or [])
        bad = int(column.get("missing") or 0) + stand_ins
        if bad:
            per_column[column["name"]] = bad
    bad = sum(per_column.values())
    score = _score(bad, cells)
    if not bad:
        return score, f"completeness {score}: every cell holds a value"
    return score, (
        f"completeness {score}: {percent(bad / cells)} of cells missing or a stand-in for "
        f"'unknown'{_worst(per_column)}"
    )


def validity(
    profile: dict[str, Any],
    rule_results: list[dict[str, Any]] | None,
    thresholds: FlagThresholds,
) -> tuple[int, str]:
    """Share of filled cells that fit their column's kind, fences and rules."""
    filled = sum(int(c.get("count") or 0) for c in profile.get("columns") or [])
    per_column: dict[str, float] = {}
    for column in profile.get("columns") or []:
        far = int(((column.get("numeric") or {}).get("outliers") or {}).get("tukey_far") or 0)
        far = max(0, far - stand_ins_beyond(column, thresholds)[0])  # counted as missing
        bad = off_kind_count(column) + far
        if bad:
            per_column[column["name"]] = bad
    for result in rule_results or []:
        cells = (result.get("evidence") or {}).get("cells")
        if not result["passed"] and cells and result.get("column"):
            per_column[result["column"]] = per_column.get(result["column"], 0) + int(cells)
    bad = min(sum(per_column.values()), filled)
    score = _score(bad, filled)
    if not bad:
        return score, f"validity {score}: every value fits its column"
    return score, (
        f"validity {score}: {percent(bad / filled)} of values off-kind, far out or against "
        f"a rule{_worst(per_column)}"
    )


def uniqueness(profile: dict[str, Any]) -> tuple[int, str]:
    """Share of rows that neither repeat an earlier row nor reuse a key."""
    rows = int(profile["dataset"].get("rows") or 0)
    repeated = int(profile["dataset"].get("duplicate_rows") or 0)
    key_repeats = {
        c["name"]: int(c.get("count") or 0) - int(c["distinct"])
        for c in profile.get("columns") or []
        if c.get("kind") == "identifier"
        and c.get("distinct") is not None
        and int(c["distinct"]) < int(c.get("count") or 0)
    }
    worst_key = max(key_repeats.values(), default=0)
    bad = min(rows, repeated + worst_key)
    score = _score(bad, rows)
    parts = []
    if repeated:
        parts.append(f"{number(repeated)} repeated rows")
    if worst_key:
        name = max(key_repeats, key=lambda k: key_repeats[k])
        parts.append(f"{number(worst_key)} repeated keys in '{name}'")
    if not parts:
        return score, f"uniqueness {score}: no repeated rows or keys"
    return score, f"uniqueness {score}: " + " and ".join(parts) + f" in {number(rows)} rows"


def _label_columns(profile: dict[str, Any]) -> list[dict[str, Any]]:
    return [
        c
        for c in profile.get("columns") or []
        if c.get("kind") in LABEL_KINDS and (c.get("labels") or {}).get("top")
    ]


def consistency(profile: dict[str, Any]) -> tuple[int, str]:
    """Share of label cells written in their label's main spelling."""
    columns = _label_columns(profile)
    filled = sum(int(c.get("count") or 0) for c in columns)
    per_column = {c["name"]: variant_cells(c) for c in columns if variant_cells(c)}
    bad = sum(per_column.values())
    score = _score(bad, filled)
    if not columns:
        return score, f"consistency {score}: no label columns to check"
    if not bad:
        return score, f"consistency {score}: every label is written one way"
    return score, (
        f"consistency {score}: {percent(bad / filled)} of label cells in a variant spelling"
        f"{_worst(per_column)}"
    )


def balance(profile: dict[str, Any], thresholds: FlagThresholds) -> tuple[int, str]:
    """Share of label cells not in excess of a dominant label and not in rare labels."""
    columns = _label_columns(profile)
    filled = sum(int(c.get("count") or 0) for c in columns)
    per_column = {}
    for column in columns:
        count = int(column.get("count") or 0)
        if count == 0 or int(column.get("distinct") or 0) < 2:
            continue
        if is_mostly_unique(column, thresholds):
            continue
        top = column["labels"]["top"]
        biggest = max(int(item["count"]) for item in top)
        excess = max(0.0, biggest - thresholds.dominant_label_share * count)
        rare = sum(
            int(item["count"]) for item in rare_label_items(column, thresholds.rare_label_share)
        )
        if excess + rare > 0:
            per_column[column["name"]] = excess + rare
    bad = sum(per_column.values())
    score = _score(bad, filled)
    if not columns:
        return score, f"balance {score}: no label columns to check"
    if not bad:
        return score, f"balance {score}: no dominant or rare labels"
    return score, (
        f"balance {score}: {percent(bad / filled)} of label cells in a dominant label's excess "
        f"or in rare labels{_worst(per_column)}"
    )


def stability(drift: dict[str, Any]) -> tuple[int, str]:
    """Share of columns (of baseline and target together) that did not move."""
    schema = drift.get("schema") or {}
    moved = set(schema.get("added") or []) | set(schema.get("removed") or [])
    moved |= {r["to"] for r in schema.get("renamed") or []}
    moved |= {k["name"] for k in schema.get("kind_changed") or []}
    moved |= {
        column
        for flag in drift.get("flags") or []
        if flag["code"] == "stability.distribution-shift"
        for column in flag["columns"]
    }
    renamed_from = {r["from"] for r in schema.get("renamed") or []}
    all_columns = {c["name"] for c in drift.get("columns") or []}
    all_columns |= set(schema.get("added") or []) | set(schema.get("removed") or [])
    all_columns -= renamed_from
    all_columns |= {r["to"] for r in schema.get("renamed") or []}
    moved -= renamed_from
    score = _score(len(moved), len(all_columns))
    if not moved:
        return score, f"stability {score}: no column moved since the baseline"
    shown = ", ".join(f"'{name}'" for name in sorted(moved)[:5])
    return score, (
        f"stability {score}: {number(len(moved))} of {number(len(all_columns))} columns changed "
        f"since the baseline ({shown})"
    )


def conformance(rule_results: list[dict[str, Any]]) -> tuple[int, str]:
    """Share of the supplier's rules the intake keeps."""
    broken = [r for r in rule_results if not r["passed"]]
    score = _score(len(broken), len(rule_results))
    if not broken:
        return score, f"conformance {score}: all {number(len(rule_results))} rules kept"
    shown = ", ".join(r["rule"] for r in broken[:4])
    return score, (
        f"conformance {score}: {number(len(broken))} of {number(len(rule_results))} rules "
        f"broken ({shown})"
    )


def scorecard(
    profile: dict[str, Any],
    *,
    thresholds: FlagThresholds,
    rule_results: list[dict[str, Any]] | None = None,
    drift: dict[str, Any] | None = None,
) -> dict[str, Any]:
    """The scorecard: ``{"overall", "dimensions", "reasons"}``.

    ``dimensions`` holds every name of ``DIMENSIONS``; stability is None
    without a baseline and conformance None without rules. ``reasons`` maps
    each computed dimension to a sentence saying why it has its score.
    """
    computed: dict[str, tuple[int, str]] = {
        "completeness": completeness(profile),
        "validity": validity(profile, rule_results, thresholds),
        "uniqueness": uniqueness(profile),
        "consistency": consistency(profile),
        "balance": balance(profile, thresholds),
    }
    if drift is not None:
        computed["stability"] = stability(drift)
    if rule_results:
        computed["conformance"] = conformance(rule_results)
    dimensions = {name: computed[name][0] if name in computed else None for name in DIMENSIONS}
    overall = math.floor(sum(s for s, _ in computed.values()) / len(computed) + 1e-9)
    return {
        "overall": overall,
        "dimensions": dimensions,
        "reasons": {name: reason for name, (_, reason) in computed.items()},
    }


def suggest_verdict(
    flags: list[dict[str, Any]], rule_results: list[dict[str, Any]] | None
) -> tuple[str, list[str]]:
    """A suggested verdict and its reasons; a person always makes the decision.

    reject: a critical flag (a broken critical rule among them).
    review: a warning flag, a broken rule, or no supplier rules to check against.
    accept: rules were checked and kept, and no flag is above information.
    """
    critical = [f for f in flags if f["severity"] == "critical"]
    warnings = [f for f in flags if f["severity"] == "warning"]
    broken = [r for r in rule_results or [] if not r["passed"]]
    if critical:
        first = critical[0]["message"]
        return "reject", [f"{plural(len(critical), 'critical flag')}, first: {first}"]
    reasons = []
    if warnings:
        codes = sorted({f["code"] for f in warnings})
        reasons.append(f"{plural(len(warnings), 'warning')} ({', '.join(codes)})")
    if broken:
        reasons.append(f"{plural(len(broken), 'rule')} broken")
    if not rule_results:
        reasons.append("no supplier rules were checked; a person must judge the file")
    if reasons:
        return "review", reasons
    return "accept", ["every rule kept and no flag above information; confirm before accepting"]
