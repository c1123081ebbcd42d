"""Flags: the findings a reviewer must see, one small function per flag code.

Each function is pure: it reads the profile sections it needs (or the rule
results, or the drift document) and the thresholds, and returns a list of
flags in the profile document's shape. ``PROFILE_FLAGS`` maps every code
computed from a profile alone to its function; ``raise_flags`` runs them all.
The codes are the ones of the design notes (dimension.finding).
"""

from __future__ import annotations

from collections.abc import Callable, Iterator
from typing import Any

from worker.profiling.judgement.tables import contingency_table
from worker.profiling.judgement.thresholds import FlagThresholds
from worker.profiling.judgement.wording import (
    linear,
    make_flag,
    number,
    percent,
    plural,
    quoted,
)

Flag = dict[str, Any]
ProfileFlagger = Callable[[dict[str, Any], FlagThresholds], list[Flag]]

PROFILE_FLAGS: dict[str, ProfileFlagger] = {}
"""Flag code -> the function that raises it from a profile."""

SEVERITY_ORDER = {"critical": 0, "warning": 1, "info": 2}

LABEL_KINDS = ("categorical", "boolean")


def _registers(code: str) -> Callable[[ProfileFlagger], ProfileFlagger]:
    def register(function: ProfileFlagger) -> ProfileFlagger:
        PROFILE_FLAGS[code] = function
        return function

    return register


def _rows(profile: dict[str, Any]) -> int:
    return int((profile.get("dataset") or {}).get("rows") or 0)


def _columns(profile: dict[str, Any]) -> Iterator[dict[str, Any]]:
    yield from profile.get("columns") or []


def _column_rows(profile: dict[str, Any], column: dict[str, Any]) -> int:
    return _rows(profile) or int(column.get("count") or 0) + int(column.get("missing") or 0)


# ---------------------------------------------------------------------------
# completeness


@_registers("completeness.missing-share")
def missing_share(profile: dict[str, Any], t: FlagThresholds) -> list[Flag]:
    """Columns with a large share of missing cells (null, blank or a missing token).

    A file with columns but no rows at all is one critical flag for the file.
    """
    dataset = profile.get("dataset") or {}
    if dataset.get("rows") == 0 and profile.get("columns"):
        return [
            make_flag(
                "completeness.missing-share",
                "critical",
                [],
                "The file has a header but no rows: every column is empty.",
                {"rows": 0, "columns": len(profile["columns"])},
            )
        ]
    flags = []
    for column in _columns(profile):
        rows = _column_rows(profile, column)
        missing = int(column.get("missing") or 0)
        if rows == 0 or missing == 0:
            continue
        share = missing / rows
        if share < t.missing_share_warning:
            continue
        severity = "critical" if share >= t.missing_share_critical else "warning"
        name = column["name"]
        if missing == rows:
            message = f"'{name}' is empty: none of its {number(rows)} rows holds a value."
        else:
            message = (
                f"{percent(share)} of '{name}' is missing ({number(missing)} of "
                f"{number(rows)} rows)."
            )
        flags.append(
            make_flag(
                "completeness.missing-share",
                severity,
                [name],
                message,
                {
                    "missing": missing,
                    "rows": rows,
                    "share": share,
                    "detail": column.get("missing_detail"),
                    "threshold": t.missing_share_critical
                    if severity == "critical"
                    else t.missing_share_warning,
                },
            )
        )
    return flags


@_registers("completeness.disguised-missing")
def disguised_missing(profile: dict[str, Any], t: FlagThresholds) -> list[Flag]:
    """Values that stand for 'unknown': stand-in numbers such as -999, or tokens such as 'N/A'.

    Suspected stand-ins are still counted as values in the profile, so they
    distort the mean and range: a warning. Missing tokens are already counted
    as missing; they are reported as information so the reviewer knows.
    """
    flags = []
    for column in _columns(profile):
        rows = _column_rows(profile, column)
        if rows == 0:
            continue
        name = column["name"]
        stand_ins = [
            s
            for s in column.get("suspected_sentinels") or []
            if int(s.get("count") or 0) / rows >= t.disguised_missing_share
        ]
        if stand_ins:
            total = sum(int(s["count"]) for s in stand_ins)
            first = stand_ins[0]
            values = ", ".join(number(s["value"]) for s in stand_ins)
            message = (
                f"{percent(int(first['count']) / rows)} of '{name}' is {number(first['value'])}, "
                "which looks like a code for 'unknown'"
                + (f" (stand-ins found: {values})." if len(stand_ins) > 1 else ".")
            )
            flags.append(
                make_flag(
                    "completeness.disguised-missing",
                    "warning",
                    [name],
                    message,
                    {
                        "values": [{"value": s["value"], "count": s["count"]} for s in stand_ins],
                        "count": total,
                        "rows": rows,
                        "share": total / rows,
                        "threshold": t.disguised_missing_share,
                    },
                )
            )
            continue
        tokens = ((column.get("missing_detail") or {}).get("tokens")) or {}
        token_count = sum(int(n) for n in tokens.values())
        if token_count and token_count / rows >= t.disguised_missing_share:
            shown = ", ".join(f"'{token}'" for token in list(tokens)[:4])
            flags.append(
                make_flag(
                    "completeness.disguised-missing",
                    "info",
                    [name],
                    f"{percent(token_count / rows)} of '{name}' holds texts such as {shown} that "
                    "mean 'unknown'; they are counted as missing.",
                    {
                        "tokens": dict(tokens),
                        "count": token_count,
                        "rows": rows,
                        "share": token_count / rows,
                        "threshold": t.disguised_missing_share,
                    },
                )
            )
    return flags


# ---------------------------------------------------------------------------
# validity


def off_kind_count(column: dict[str, Any]) -> int:
    """How many non-missing values of a column do not fit its kind.

    Read from the engine's ``kind_evidence.mixed_kinds.other_share`` (times the
    non-missing count), or from ``off_kind`` (a count) or ``kind_counts`` (kind ->
    values that look like that kind), whichever the profile gives.
    """
    mixed = (column.get("kind_evidence") or {}).get("mixed_kinds") or {}
    if mixed.get("other_share") is not None:
        return round(float(mixed["other_share"]) * int(column.get("count") or 0))
    if column.get("off_kind") is not None:
        return int(column["off_kind"])
    counts = column.get("kind_counts") or {}
    if not counts:
        return 0
    kind = column.get("kind")
    return int(sum(n for k, n in counts.items() if k != kind and k != "missing"))


@_registers("validity.mixed-kinds")
def mixed_kinds(profile: dict[str, Any], t: FlagThresholds) -> list[Flag]:
    """Columns where some values do not fit the column's kind (text among numbers...)."""
    flags = []
    for column in _columns(profile):
        count = int(column.get("count") or 0)
        stray = off_kind_count(column)
        if count == 0 or stray == 0 or stray / count < t.mixed_kinds_share:
            continue
        name, kind = column["name"], column.get("kind")
        mixed = (column.get("kind_evidence") or {}).get("mixed_kinds") or {}
        examples = mixed.get("examples") or column.get("off_kind_examples") or []
        shown = f" such as {', '.join(repr(e) for e in examples[:3])}" if examples else ""
        flags.append(
            make_flag(
                "validity.mixed-kinds",
                "warning",
                [name],
                f"{number(stray)} values of '{name}' ({percent(stray / count)}) are not {kind}"
                f"{shown}.",
                {
                    "kind": kind,
                    "off_kind": stray,
                    "count": count,
                    "share": stray / count,
                    "examples": examples[:5],
                    "threshold": t.mixed_kinds_share,
                },
            )
        )
    return flags


@_registers("validity.outliers")
def outliers(profile: dict[str, Any], t: FlagThresholds) -> list[Flag]:
    """Numeric columns with values beyond Tukey's outer fences or a large modified z-score.

    References: Tukey (1977), Exploratory Data Analysis; Iglewicz & Hoaglin
    (1993), How to Detect and Handle Outliers.
    """
    flags = []
    for column in _columns(profile):
        numeric = column.get("numeric") or {}
        found = numeric.get("outliers") or {}
        far_stand_ins, modified_stand_ins = stand_ins_beyond(column, t)
        far = int(found.get("tukey_far") or 0) - far_stand_ins
        modified = int(found.get("modified_z") or 0) - modified_stand_ins
        inner = int(found.get("tukey_low") or 0) + int(found.get("tukey_high") or 0)
        count = int(column.get("count") or 0)
        if count == 0 or (far <= 0 and modified <= 0):
            continue
        far, modified = max(far, 0), max(modified, 0)
        name = column["name"]
        severity = "warning" if far / count >= t.outlier_share_warning else "info"
        message = (
            f"'{name}' has {plural(far, 'value')} beyond Tukey's outer fences "
            f"({number(t.tukey_far_k)} × IQR from the quartiles) and {number(modified)} with a "
            f"modified z-score above {number(t.modified_z)}; values run from "
            f"{number(numeric.get('min'))} to {number(numeric.get('max'))} around a median of "
            f"{number(numeric.get('median'))}."
        )
        if far_stand_ins or modified_stand_ins:
            message += " Stand-ins for 'unknown' are not counted here."
        flags.append(
            make_flag(
                "validity.outliers",
                severity,
                [name],
                message,
                {
                    "tukey_low": found.get("tukey_low"),
                    "tukey_high": found.get("tukey_high"),
                    "tukey_inner": inner,
                    "tukey_far": far,
                    "modified_z": modified,
                    "stand_ins_left_out": {
                        "tukey_far": far_stand_ins,
                        "modified_z": modified_stand_ins,
                    },
                    "count": count,
                    "share_far": far / count,
                    "q1": numeric.get("q1"),
                    "q3": numeric.get("q3"),
                    "min": numeric.get("min"),
                    "max": numeric.get("max"),
                },
            )
        )
    return flags


def stand_ins_beyond(column: dict[str, Any], t: FlagThresholds) -> tuple[int, int]:
    """Rows of suspected stand-ins (such as -999) that the outlier counts include.

    A stand-in beyond Tukey's outer fences, or with a modified z-score above
    the threshold, is counted among the outliers by the engine; it is already
    reported as a disguised missing value, so it is taken out of the outliers.
    Returns (rows beyond the outer fences, rows above the modified z threshold).
    """
    numeric = column.get("numeric") or {}
    q1, q3, median, mad = (numeric.get(k) for k in ("q1", "q3", "median", "mad"))
    far = modified = 0
    for stand_in in column.get("suspected_sentinels") or []:
        value, n = stand_in.get("value"), int(stand_in.get("count") or 0)
        if not isinstance(value, int | float) or isinstance(value, bool):
            continue
        if q1 is not None and q3 is not None:
            iqr = q3 - q1
            if value < q1 - t.tukey_far_k * iqr or value > q3 + t.tukey_far_k * iqr:
                far += n
        if median is not None and mad and abs(0.6745 * (value - median) / mad) > t.modified_z:
            modified += n
    return far, modified


def rule_flags(rule_results: list[dict[str, Any]]) -> list[Flag]:
    """``validity.rule-broken``: one flag per broken rule of the supplier's rules."""
    return [
        make_flag(
            "validity.rule-broken",
            result["severity"],
            [result["column"]] if result.get("column") else [],
            result["message"],
            {"rule": result["rule"], **(result.get("evidence") or {})},
        )
        for result in rule_results
        if not result["passed"]
    ]


# ---------------------------------------------------------------------------
# uniqueness


@_registers("uniqueness.repeated-rows")
def repeated_rows(profile: dict[str, Any], t: FlagThresholds) -> list[Flag]:
    """Rows that repeat an earlier row in every column."""
    dataset = profile.get("dataset") or {}
    repeated = int(dataset.get("duplicate_rows") or 0)
    rows = _rows(profile)
    if repeated == 0 or rows == 0:
        return []
    share = repeated / rows
    severity = "warning" if share >= t.repeated_rows_share_warning else "info"
    return [
        make_flag(
            "uniqueness.repeated-rows",
            severity,
            [],
            f"{plural(repeated, 'row')} ({percent(share)}) "
            f"{'repeats' if repeated == 1 else 'repeat'} an earlier row exactly.",
            {
                "duplicate_rows": repeated,
                "rows": rows,
                "share": share,
                "examples": (dataset.get("duplicate_examples") or [])[:5],
                "threshold": t.repeated_rows_share_warning,
            },
        )
    ]


@_registers("uniqueness.key-collisions")
def key_collisions(profile: dict[str, Any], t: FlagThresholds) -> list[Flag]:
    """Identifier columns in which a key appears more than once."""
    flags = []
    for column in _columns(profile):
        if column.get("kind") != "identifier":
            continue
        count, distinct = int(column.get("count") or 0), column.get("distinct")
        if distinct is None or count == 0 or int(distinct) >= count:
            continue
        repeats = count - int(distinct)
        exact = bool(column.get("distinct_exact", True))
        error = float(column.get("distinct_relative_error") or 0.0)
        if not exact and repeats <= 3 * error * count:
            continue  # within three standard errors of the distinct-count sketch
        name = column["name"]
        flags.append(
            make_flag(
                "uniqueness.key-collisions",
                "warning",
                [name],
                f"'{name}' looks like a key, but {'' if exact else 'about '}{number(repeats)} of "
                f"its {number(count)} values repeat an earlier one.",
                {"count": count, "distinct": int(distinct), "repeats": repeats, "exact": exact},
            )
        )
    return flags


# ---------------------------------------------------------------------------
# consistency


@_registers("consistency.label-variants")
def label_variants(profile: dict[str, Any], t: FlagThresholds) -> list[Flag]:
    """Labels written in several ways ('Active', 'active ', 'ACTIVE') that fold together."""
    flags = []
    for column in _columns(profile):
        variants = (column.get("labels") or {}).get("variants") or []
        groups = [list(group) for group in variants if len(group) > 1]
        if not groups:
            continue
        name = column["name"]
        shown = "; ".join(", ".join(repr(v) for v in group[:4]) for group in groups[:3])
        flags.append(
            make_flag(
                "consistency.label-variants",
                "warning",
                [name],
                f"'{name}' writes the same label in different ways: {shown}.",
                {"variants": groups, "groups": len(groups), "cells": variant_cells(column)},
            )
        )
    return flags


def variant_cells(column: dict[str, Any]) -> int:
    """Cells holding a minority spelling of a label (the most frequent spelling is kept)."""
    counts = {str(item["value"]): int(item["count"]) for item in _top(column)}
    cells = 0
    for group in (column.get("labels") or {}).get("variants") or []:
        known = sorted((counts.get(str(v), 0) for v in group), reverse=True)
        cells += sum(known[1:])
    return cells


# ---------------------------------------------------------------------------
# redundancy


def _median_of(profile: dict[str, Any], name: str) -> float:
    for column in _columns(profile):
        if column["name"] == name:
            median = (column.get("numeric") or {}).get("median")
            return float(median) if median is not None else 1.0
    return 1.0


@_registers("redundancy.twin-columns")
def twin_columns(profile: dict[str, Any], t: FlagThresholds) -> list[Flag]:
    """Two columns that are one measure: b = slope·a + intercept almost exactly."""
    flags = []
    for twin in profile.get("twins") or []:
        r = twin.get("r")
        if r is None or abs(float(r)) < t.twin_r:
            continue
        a, b = twin["a"], twin["b"]
        hint = twin.get("hint")
        typical = _median_of(profile, a) * float(twin.get("slope") or 0)
        relation = f"'{b}' ≈ {linear(twin.get('slope'), a, twin.get('intercept'), typical)}"
        flags.append(
            make_flag(
                "redundancy.twin-columns",
                "warning",
                [a, b],
                f"{relation} (r = {float(r):.5f})"
                + (f": the same measure, {hint}." if hint else ": the same measure twice."),
                {
                    "slope": twin.get("slope"),
                    "intercept": twin.get("intercept"),
                    "r": r,
                    "hint": hint,
                    "threshold": t.twin_r,
                },
            )
        )
    return flags


@_registers("redundancy.strong-pair")
def strong_pair(profile: dict[str, Any], t: FlagThresholds) -> list[Flag]:
    """Pairs of columns whose association is so strong that one nearly predicts the other."""
    twins = {
        frozenset((tw["a"], tw["b"]))
        for tw in profile.get("twins") or []
        if tw.get("r") is not None and abs(float(tw["r"])) >= t.twin_r
    }
    best: dict[frozenset[str], dict[str, Any]] = {}
    for pair in profile.get("pairs") or []:
        value = pair.get("value")
        key = frozenset((pair["a"], pair["b"]))
        if value is None or abs(float(value)) < t.strong_pair_r or key in twins:
            continue
        if key not in best or abs(float(value)) > abs(float(best[key]["value"])):
            best[key] = pair
    flags = []
    for pair in best.values():
        a, b, method, value = pair["a"], pair["b"], pair.get("method"), float(pair["value"])
        flags.append(
            make_flag(
                "redundancy.strong-pair",
                "info",
                [a, b],
                f"'{a}' and '{b}' move together ({method} {value:.3f}); one may be redundant.",
                {
                    "method": method,
                    "value": value,
                    "n": pair.get("n"),
                    "threshold": t.strong_pair_r,
                },
            )
        )
    return flags


# ---------------------------------------------------------------------------
# balance


def _top(column: dict[str, Any]) -> list[dict[str, Any]]:
    return list((column.get("labels") or {}).get("top") or [])


def _is_label_column(column: dict[str, Any]) -> bool:
    return column.get("kind") in LABEL_KINDS and bool(_top(column))


def is_mostly_unique(column: dict[str, Any], t: FlagThresholds) -> bool:
    """Nearly every value differs (a key or free text): label balance means nothing there."""
    count, distinct = int(column.get("count") or 0), column.get("distinct")
    return bool(count and distinct is not None and int(distinct) / count >= t.mostly_unique_share)


def rare_label_items(column: dict[str, Any], share: float) -> list[dict[str, Any]]:
    """Labels of a column below ``share`` of its values, from its rare list and its top list."""
    count = int(column.get("count") or 0)
    if count == 0:
        return []
    labels = column.get("labels") or {}
    seen: dict[Any, dict[str, Any]] = {}
    for item in [*(labels.get("rare") or []), *(labels.get("top") or [])]:
        if int(item["count"]) / count < share:
            seen.setdefault(item["value"], item)
    return sorted(seen.values(), key=lambda item: (item["count"], str(item["value"])))


@_registers("balance.dominant-label")
def dominant_label(profile: dict[str, Any], t: FlagThresholds) -> list[Flag]:
    """Label columns in which one label takes nearly every row."""
    flags = []
    for column in _columns(profile):
        top = _top(column)
        distinct = int(column.get("distinct") or len(top))
        if not _is_label_column(column) or distinct < 2:
            continue
        first = max(top, key=lambda item: item["count"])
        count = int(column.get("count") or 0)
        share = float(first.get("share") or (first["count"] / count if count else 0))
        if share < t.dominant_label_share:
            continue
        name = column["name"]
        flags.append(
            make_flag(
                "balance.dominant-label",
                "warning",
                [name],
                f"{percent(share)} of '{name}' is {first['value']!r}; the other "
                f"{number(distinct - 1)} labels share the rest.",
                {
                    "label": first["value"],
                    "count": first["count"],
                    "share": share,
                    "distinct": distinct,
                    "imbalance_ratio": (column.get("labels") or {}).get("imbalance_ratio"),
                    "threshold": t.dominant_label_share,
                },
            )
        )
    return flags


@_registers("balance.rare-labels")
def rare_labels(profile: dict[str, Any], t: FlagThresholds) -> list[Flag]:
    """Label columns with labels so rare that any statistic about them is shaky."""
    flags = []
    for column in _columns(profile):
        if not _is_label_column(column) or is_mostly_unique(column, t):
            continue
        count = int(column.get("count") or 0)
        if count == 0:
            continue
        rare = rare_label_items(column, t.rare_label_share)
        if len(rare) < t.rare_labels_min:
            continue
        name = column["name"]
        shown = ", ".join(f"{item['value']!r} ({number(item['count'])})" for item in rare[:5])
        flags.append(
            make_flag(
                "balance.rare-labels",
                "info",
                [name],
                f"{plural(len(rare), 'label')} of '{name}' "
                f"{'holds' if len(rare) == 1 else 'each hold'} less than "
                f"{percent(t.rare_label_share)} of its rows: {shown}.",
                {
                    "labels": [{"value": i["value"], "count": i["count"]} for i in rare],
                    "rare": len(rare),
                    "rare_count": (column.get("labels") or {}).get("rare_count"),
                    "count": count,
                    "threshold": t.rare_label_share,
                },
            )
        )
    return flags


@_registers("balance.skewed-crosstab")
def skewed_crosstab(profile: dict[str, Any], t: FlagThresholds) -> list[Flag]:
    """Label combinations of two columns that are over- or under-represented.

    Only crosstabs whose chi-square test can be trusted by Cochran's rule
    (no expected count below 1, at most 20 % below 5) and whose p-value is
    below the threshold; the cells named are those whose adjusted
    standardised residual exceeds the threshold.

    References: Cochran (1954), Some methods for strengthening the common
    chi-square tests, Biometrics 10:417-451; Agresti (2002), Categorical Data
    Analysis, section 2.4.5 (adjusted residuals).
    """
    flags = []
    for crosstab in profile.get("crosstabs") or []:
        table = contingency_table(crosstab)
        if table is None:
            continue
        p_value = crosstab.get("p_value")
        if p_value is None or float(p_value) >= t.crosstab_p_value:
            continue
        if not table.cochran_ok(t.cochran_min_expected, t.cochran_low_share):
            continue
        cells = table.extreme_cells(t.crosstab_residual)
        if not cells:
            continue
        a, b = crosstab["a"], crosstab["b"]
        over = [c for c in cells if c["residual"] > 0][:3]
        under = [c for c in cells if c["residual"] < 0][:3]
        parts = []
        if over:
            parts.append(
                "more often than expected: "
                + ", ".join(f"{c['a']!r} with {c['b']!r}" for c in over)
            )
        if under:
            parts.append("less often: " + ", ".join(f"{c['a']!r} with {c['b']!r}" for c in under))
        flags.append(
            make_flag(
                "balance.skewed-crosstab",
                "info",
                [a, b],
                f"Labels of {quoted([b])} are not spread alike across {quoted([a])}; "
                + "; ".join(parts)
                + ".",
                {
                    "chi2": crosstab.get("chi2"),
                    "dof": crosstab.get("dof"),
                    "p_value": p_value,
                    "cells": cells[:10],
                    "threshold": t.crosstab_residual,
                },
            )
        )
    return flags


# ---------------------------------------------------------------------------
# information


@_registers("information.single-value")
def single_value(profile: dict[str, Any], t: FlagThresholds) -> list[Flag]:
    """Columns that hold one value in every filled row: they tell nothing apart."""
    flags = []
    for column in _columns(profile):
        count = int(column.get("count") or 0)
        if count == 0 or column.get("distinct") != 1:
            continue
        name = column["name"]
        top = _top(column)
        numeric = column.get("numeric") or {}
        value = top[0]["value"] if top else numeric.get("min")
        shown = f" ({number(value)})" if value is not None else ""
        flags.append(
            make_flag(
                "information.single-value",
                "warning",
                [name],
                f"'{name}' holds the same value{shown} in all {number(count)} filled rows.",
                {"value": value, "count": count, "missing": column.get("missing")},
            )
        )
    return flags


@_registers("information.mostly-unique")
def mostly_unique(profile: dict[str, Any], t: FlagThresholds) -> list[Flag]:
    """Label or text columns where nearly every value differs: a key or free text."""
    flags = []
    for column in _columns(profile):
        if column.get("kind") not in ("categorical", "text"):
            continue
        count, distinct = int(column.get("count") or 0), column.get("distinct")
        if distinct is None or count < t.mostly_unique_min_count:
            continue
        share = int(distinct) / count
        if share < t.mostly_unique_share:
            continue
        name = column["name"]
        flags.append(
            make_flag(
                "information.mostly-unique",
                "info",
                [name],
                f"{percent(share)} of the values of '{name}' differ from each other "
                f"({number(distinct)} distinct in {number(count)}): a key or free text rather "
                "than a category.",
                {
                    "distinct": int(distinct),
                    "count": count,
                    "share": share,
                    "threshold": t.mostly_unique_share,
                },
            )
        )
    return flags


# ---------------------------------------------------------------------------
# privacy


@_registers("privacy.personal-data")
def personal_data(profile: dict[str, Any], t: FlagThresholds) -> list[Flag]:
    """Columns that look like personal data (e-mail, phone, IBAN, card, network address)."""
    flags = []
    for column in _columns(profile):
        found = column.get("personal")
        if not found:
            continue
        name, kind = column["name"], found.get("kind")
        flags.append(
            make_flag(
                "privacy.personal-data",
                "warning",
                [name],
                f"'{name}' looks like {_PERSONAL_WORDS.get(kind, kind)} "
                f"({percent(float(found.get('share') or 0))} of {number(found.get('checked'))} "
                "values checked). Its sample values are masked; ask your data-protection "
                "officer whether the file may be kept.",
                dict(found),
            )
        )
    return flags


_PERSONAL_WORDS = {
    "email": "e-mail addresses",
    "phone": "phone numbers",
    "iban": "bank account numbers (IBAN)",
    "card": "payment card numbers",
    "ip": "network (IP) addresses",
}


# ---------------------------------------------------------------------------
# stability (from the drift document)


def _schema_change(drift: dict[str, Any], t: FlagThresholds) -> list[Flag]:
    schema = drift.get("schema") or {}
    flags = []
    for name in schema.get("removed") or []:
        flags.append(
            make_flag(
                "stability.schema-change",
                "critical",
                [name],
                f"'{name}' was in the baseline but is missing from this delivery.",
                {"change": "removed"},
            )
        )
    for change in schema.get("kind_changed") or []:
        name = change["name"]
        flags.append(
            make_flag(
                "stability.schema-change",
                "critical",
                [name],
                f"'{name}' was {change['from']} in the baseline and is {change['to']} now.",
                {"change": "kind", "from": change["from"], "to": change["to"]},
            )
        )
    for rename in schema.get("renamed") or []:
        flags.append(
            make_flag(
                "stability.schema-change",
                "warning",
                [rename["to"]],
                f"'{rename['from']}' seems to be called '{rename['to']}' now: the column is "
                "gone and a new one has the same distribution.",
                {"change": "renamed", "from": rename["from"], **rename["evidence"]},
            )
        )
    for name in schema.get("added") or []:
        flags.append(
            make_flag(
                "stability.schema-change",
                "warning",
                [name],
                f"'{name}' is new: the baseline had no such column.",
                {"change": "added"},
            )
        )
    return flags


def _shift_reasons(column: dict[str, Any], t: FlagThresholds) -> list[str]:
    reasons = []
    # PSI of small samples is noisy (about (bins - 1)·(1/n_b + 1/n_t) by chance alone), so it
    # counts only when the column's test (KS or chi-square) also says the move is not chance.
    test_p = column.get("ks_p_value", column.get("chi2_p_value"))
    alpha = t.ks_p_value if "ks_p_value" in column else t.chi2_p_value
    if (
        column.get("psi") is not None
        and column["psi"] >= t.psi_warning
        and (test_p is None or test_p < alpha)
    ):
        reasons.append(f"PSI {column['psi']:.3f}")
    ks, p = column.get("ks"), column.get("ks_p_value")
    if ks is not None and ks >= t.ks_statistic and (p is None or p < t.ks_p_value):
        reasons.append(f"Kolmogorov-Smirnov distance {ks:.3f}")
    shift = column.get("mean_shift_sd")
    if shift is not None and abs(shift) >= t.mean_shift_sd:
        reasons.append(f"mean moved {shift:+.2f} baseline standard deviations")
    js, p = column.get("js_distance"), column.get("chi2_p_value")
    if js is not None and js >= t.js_distance and (p is None or p < t.chi2_p_value):
        reasons.append(f"Jensen-Shannon distance {js:.3f}")
    change = column.get("missing_share_change")
    if change is not None and abs(change) >= t.missing_share_change:
        reasons.append(f"missing share {'up' if change > 0 else 'down'} {percent(abs(change))}")
    if column.get("new_labels"):
        shown = ", ".join(repr(v) for v in column["new_labels"][:4])
        reasons.append(f"new labels {shown}")
    if column.get("vanished_labels"):
        shown = ", ".join(repr(v) for v in column["vanished_labels"][:4])
        reasons.append(f"labels gone {shown}")
    return reasons


def _distribution_shift(drift: dict[str, Any], t: FlagThresholds) -> list[Flag]:
    flags = []
    for column in drift.get("columns") or []:
        reasons = _shift_reasons(column, t)
        if not reasons:
            continue
        major = column.get("psi") is not None and column["psi"] >= t.psi_critical
        name = column["name"]
        flags.append(
            make_flag(
                "stability.distribution-shift",
                "warning" if major else "info",
                [name],
                f"'{name}' differs from the baseline: " + "; ".join(reasons) + ".",
                {
                    key: column.get(key)
                    for key in (
                        "psi",
                        "ks",
                        "ks_p_value",
                        "mean_shift_sd",
                        "missing_share_change",
                        "js_distance",
                        "chi2_p_value",
                        "new_labels",
                        "vanished_labels",
                    )
                    if column.get(key) is not None
                },
            )
        )
    return flags


def _volume_change(drift: dict[str, Any], t: FlagThresholds) -> list[Flag]:
    volume = drift.get("volume") or {}
    ratio = volume.get("ratio")
    if ratio is None or abs(ratio - 1) < t.volume_change:
        return []
    rows_b, rows_t = volume["rows_baseline"], volume["rows_target"]
    return [
        make_flag(
            "stability.volume-change",
            "warning",
            [],
            f"This delivery has {number(rows_t)} rows against {number(rows_b)} in the baseline "
            f"({'+' if ratio > 1 else ''}{percent(ratio - 1)}).",
            {**volume, "threshold": t.volume_change},
        )
    ]


STABILITY_FLAGS = {
    "stability.schema-change": _schema_change,
    "stability.distribution-shift": _distribution_shift,
    "stability.volume-change": _volume_change,
}
"""Flag code -> the function that raises it from a drift document."""


def stability_flags(drift: dict[str, Any], thresholds: FlagThresholds) -> list[Flag]:
    """Every stability.* flag of a drift document, most severe first."""
    return sort_flags([f for fn in STABILITY_FLAGS.values() for f in fn(drift, thresholds)])


# ---------------------------------------------------------------------------
# all together


def raise_flags(profile: dict[str, Any], thresholds: FlagThresholds) -> list[Flag]:
    """Every flag computable from the profile alone, most severe first."""
    flags = [flag for function in PROFILE_FLAGS.values() for flag in function(profile, thresholds)]
    return sort_flags(flags)


def sort_flags(flags: list[Flag]) -> list[Flag]:
    """Flags ordered by severity (critical first), then code, keeping order within a code."""
    return sorted(flags, key=lambda f: (SEVERITY_ORDER[f["severity"]], f["code"]))
