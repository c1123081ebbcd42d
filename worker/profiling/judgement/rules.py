"""A supplier's rules: what its files should look like, checked against each intake's profile.

A rules document is a small JSON or YAML mapping, for example::

    rows: {min: 500, max: 5000}
    other_columns: flag          # or allow (the default)
    columns:
      crate_id:  {kind: identifier, unique: true}
      weight_kg: {kind: numeric, min: 0, max: 40, max_missing_share: 0.02, missing_values: [-999]}
      grade:     {kind: categorical, allowed_labels: [A, B, C]}
      read_at:   {kind: datetime, min: 2031-03-01, max: 2031-03-31}
      remarks:   {required: false}
    thresholds: {missing_share_warning: 0.1}

``parse_rules`` validates it and reports every mistake with its path;
``check_rules`` checks a profile against it, one result per rule;
``draft_rules`` proposes rules from an accepted intake's profile, for a person
to edit before saving. Everything is checked from the stored profile alone.
"""

from __future__ import annotations

import json
import math
from datetime import date, datetime, time
from typing import Any, Literal

import numpy as np
import yaml
from pydantic import BaseModel, ConfigDict, Field, ValidationError, field_validator, model_validator

from worker.profiling.judgement.thresholds import FlagThresholds, with_overrides
from worker.profiling.judgement.wording import number, percent

Kind = Literal["numeric", "categorical", "boolean", "datetime", "text", "identifier", "empty"]


class RulesError(ValueError):
    """A rules document with mistakes; ``problems`` lists each as ``{"path", "message"}``."""

    def __init__(self, problems: list[dict[str, str]]):
        self.problems = problems
        super().__init__(
            "; ".join(f"{p['path'] or '(document)'}: {p['message']}" for p in problems)
        )


class ColumnRule(BaseModel):
    """What one column must look like."""

    model_config = ConfigDict(extra="forbid")

    kind: Kind | None = Field(None, description="Expected column kind.")
    required: bool = Field(True, description="The column must be present.")
    min: float | date | datetime | None = Field(
        None, description="Smallest allowed value: a number, or a date for datetime columns."
    )
    max: float | date | datetime | None = Field(
        None, description="Largest allowed value: a number, or a date for datetime columns."
    )
    allowed_labels: list[str] | None = Field(None, description="The only labels allowed.")
    max_missing_share: float | None = Field(
        None, ge=0, le=1, description="Largest share of rows allowed to be missing."
    )
    unique: bool = Field(False, description="No value may appear twice.")
    missing_values: list[str | float] = Field(
        default_factory=list, description="Values that mean 'unknown' here, such as -999."
    )
    severity: Literal["warning", "critical"] = Field(
        "warning", description="Severity of a broken value rule of this column."
    )

    @model_validator(mode="after")
    def _range_in_order(self) -> ColumnRule:
        if self.min is None or self.max is None:
            return self
        if isinstance(self.min, date) != isinstance(self.max, date):
            raise ValueError("min and max must both be numbers or both be dates")
        low, high = _as_moment(self.min, end=False), _as_moment(self.max, end=True)
        if low > high:
            raise ValueError(f"min ({self.min}) is larger than max ({self.max})")
        return self


def _as_moment(value: Any, *, end: bool) -> Any:
    """A date as the first (or, with ``end``, the last) moment of its day; others unchanged."""
    if isinstance(value, datetime):
        return value.replace(tzinfo=None)
    if isinstance(value, date):
        return datetime.combine(value, time.max if end else time.min)
    return value


class RowRule(BaseModel):
    """Expected row count range."""

    model_config = ConfigDict(extra="forbid")

    min: int | None = Field(None, ge=0)
    max: int | None = Field(None, ge=0)

    @model_validator(mode="after")
    def _range_in_order(self) -> RowRule:
        if self.min is not None and self.max is not None and self.min > self.max:
            raise ValueError(f"min ({self.min}) is larger than max ({self.max})")
        return self


class SupplierRules(BaseModel):
    """A supplier's rules document."""

    model_config = ConfigDict(extra="forbid")

    columns: dict[str, ColumnRule] = Field(default_factory=dict)
    rows: RowRule | None = None
    other_columns: Literal["allow", "flag"] = Field(
        "allow", description="Whether columns not listed are allowed or broken rules."
    )
    thresholds: dict[str, Any] = Field(
        default_factory=dict, description="Overrides of the flag thresholds for this supplier."
    )

    @field_validator("thresholds")
    @classmethod
    def _known_thresholds(cls, value: dict[str, Any]) -> dict[str, Any]:
        FlagThresholds.model_validate({**FlagThresholds().model_dump(), **value})
        return value


_UNION_MEMBERS = {"float", "date", "datetime"}
"""Tags pydantic adds to the location of each failed member of ``float | date | datetime``."""


def _problems(error: ValidationError) -> list[dict[str, str]]:
    """One problem per mistake: its dotted path and a plain message."""
    problems: dict[str, str] = {}
    for item in error.errors():
        location = [str(part) for part in item["loc"]]
        message = item["msg"].removeprefix("Value error, ")
        if item["type"] == "extra_forbidden":
            message = "unknown setting"
        if location and location[-1] in _UNION_MEMBERS:
            location = location[:-1]
            message = "should be a number, or a date such as 2031-03-01"
        problems.setdefault(".".join(location), message)
    return [{"path": path, "message": message} for path, message in problems.items()]


def parse_rules(document: str | bytes | dict[str, Any]) -> SupplierRules:
    """Validate a rules document given as JSON or YAML text, or as a mapping.

    Raises RulesError listing every mistake with its path, e.g.
    ``columns.weight_kg.min: Input should be a valid number``.
    """
    if isinstance(document, bytes):
        document = document.decode("utf-8")
    if isinstance(document, str):
        try:
            data = json.loads(document)
        except json.JSONDecodeError:
            try:
                data = yaml.safe_load(document)
            except yaml.YAMLError as exc:
                mark = getattr(exc, "problem_mark", None)
                where = f"line {mark.line + 1}" if mark is not None else ""
                problem = getattr(exc, "problem", None) or str(exc)
                raise RulesError(
                    [{"path": where, "message": f"not JSON or YAML: {problem}"}]
                ) from None
    else:
        data = document
    if data is None:
        data = {}
    if not isinstance(data, dict):
        raise RulesError([{"path": "", "message": "the rules must be a mapping of settings"}])
    try:
        rules = SupplierRules.model_validate(data)
    except ValidationError as exc:
        raise RulesError(_problems(exc)) from None
    return rules


def thresholds_for(
    rules: SupplierRules | dict[str, Any] | None, base: FlagThresholds
) -> FlagThresholds:
    """The thresholds to judge with: ``base`` with the rules' overrides applied."""
    if rules is None:
        return base
    parsed = rules if isinstance(rules, SupplierRules) else parse_rules(rules)
    return with_overrides(base, parsed.thresholds)


# ---------------------------------------------------------------------------
# checking


def _result(
    rule: str,
    column: str | None,
    check: str,
    passed: bool,
    severity: str,
    message: str,
    expected: Any = None,
    observed: Any = None,
    **evidence: Any,
) -> dict[str, Any]:
    return {
        "rule": rule,
        "column": column,
        "check": check,
        "passed": passed,
        "severity": severity,
        "message": message,
        "expected": expected,
        "observed": observed,
        "evidence": {"expected": expected, "observed": observed, **evidence},
    }


def _share_beyond(percentiles: list[float] | None, bound: float, below: bool) -> float | None:
    """Share of values below (or above) ``bound`` read off the stored percentiles (±1 %)."""
    if not percentiles:
        return None
    values = np.asarray(percentiles, dtype=float)
    steps = len(values) - 1
    if below:
        return float(np.count_nonzero(values < bound)) / steps if steps else None
    return float(np.count_nonzero(values > bound)) / steps if steps else None


def _treated_missing(column: dict[str, Any], values: list[str | float]) -> int:
    """Rows holding one of the rules' 'missing' values, from sentinels, labels and tokens."""
    if not values:
        return 0
    wanted_numbers = set()
    for value in values:
        number_value = _as_float(value)
        if number_value is not None:
            wanted_numbers.add(number_value)
    wanted_texts = {str(v).strip() for v in values}
    found = 0
    for sentinel in column.get("suspected_sentinels") or []:
        if _as_float(sentinel.get("value")) in wanted_numbers:
            found += int(sentinel.get("count") or 0)
    if found == 0:
        for item in (column.get("labels") or {}).get("top") or []:
            if str(item["value"]).strip() in wanted_texts:
                found += int(item["count"])
    return found


def _as_float(value: Any) -> float | None:
    try:
        return float(value)
    except (TypeError, ValueError):
        return None


def _check_column(name: str, rule: ColumnRule, column: dict[str, Any] | None, rows: int):
    base = f"columns.{name}"
    if column is None:
        yield _result(
            f"{base}.required",
            name,
            "required",
            not rule.required,
            "critical",
            f"'{name}' is missing from the file." if rule.required else f"'{name}' is absent.",
            expected="present" if rule.required else "optional",
            observed="absent",
        )
        return
    if rule.required:
        yield _result(
            f"{base}.required",
            name,
            "required",
            True,
            "critical",
            f"'{name}' is present.",
            expected="present",
            observed="present",
        )
    kind = column.get("kind")
    if rule.kind is not None:
        yield _result(
            f"{base}.kind",
            name,
            "kind",
            kind == rule.kind,
            "critical",
            f"'{name}' is {kind}" + ("." if kind == rule.kind else f", not {rule.kind}."),
            expected=rule.kind,
            observed=kind,
        )
    numeric = column.get("numeric") or {}
    count = int(column.get("count") or 0)
    for check, bound in (("min", rule.min), ("max", rule.max)):
        if bound is None:
            continue
        if isinstance(bound, date):
            yield _date_bound(base, name, check, bound, column, rule)
            continue
        observed = numeric.get(check)
        if observed is None:
            yield _result(
                f"{base}.{check}",
                name,
                check,
                False,
                rule.severity,
                f"'{name}' has no numbers to compare with its {check} of {number(bound)}.",
                expected=bound,
                observed=None,
            )
            continue
        below = check == "min"
        passed = observed >= bound if below else observed <= bound
        share = _share_beyond(numeric.get("percentiles"), bound, below)
        cells = None if share is None else max(1, round(share * count)) if not passed else 0
        side = "below" if below else "above"
        message = (
            f"'{name}' stays within its {check} of {number(bound)}."
            if passed
            else f"'{name}' goes {side} its {check} of {number(bound)}: "
            f"{'smallest' if below else 'largest'} value {number(observed)}"
            + (f", about {percent(share)} of values" if share else "")
            + "."
        )
        yield _result(
            f"{base}.{check}",
            name,
            check,
            passed,
            rule.severity,
            message,
            expected=bound,
            observed=observed,
            cells=cells,
            share_approx=share,
        )
    if rule.allowed_labels is not None:
        allowed = {label.strip() for label in rule.allowed_labels}
        labels = column.get("labels") or {}
        unexpected = [
            item for item in labels.get("top") or [] if str(item["value"]).strip() not in allowed
        ]
        unexpected = [i for i in unexpected if str(i["value"]).strip() not in _texts(rule)]
        other = int(labels.get("other_count") or 0)
        cells = sum(int(i["count"]) for i in unexpected)
        passed = not unexpected and other == 0
        shown = ", ".join(f"{i['value']!r} ({number(i['count'])})" for i in unexpected[:5])
        message = (
            f"'{name}' uses only allowed labels."
            if passed
            else f"'{name}' has labels outside the allowed ones: {shown}"
            + (f"; {number(other)} more rows in labels not listed" if other else "")
            + "."
        )
        yield _result(
            f"{base}.allowed_labels",
            name,
            "allowed_labels",
            passed,
            rule.severity,
            message,
            expected=sorted(allowed),
            observed=[i["value"] for i in unexpected],
            cells=cells + other,
            labels=[{"value": i["value"], "count": i["count"]} for i in unexpected],
        )
    if rule.max_missing_share is not None and rows:
        missing = int(column.get("missing") or 0) + _treated_missing(column, rule.missing_values)
        share = missing / rows
        passed = share <= rule.max_missing_share
        yield _result(
            f"{base}.max_missing_share",
            name,
            "max_missing_share",
            passed,
            rule.severity,
            f"{percent(share)} of '{name}' is missing"
            + (
                f", within the allowed {percent(rule.max_missing_share)}."
                if passed
                else f", more than the allowed {percent(rule.max_missing_share)}."
            ),
            expected=rule.max_missing_share,
            observed=share,
            missing=missing,
            rows=rows,
        )
    if rule.unique:
        distinct = column.get("distinct")
        repeats = None if distinct is None else max(0, count - int(distinct))
        passed = repeats == 0
        message = (
            f"'{name}' has no repeated value."
            if passed
            else f"'{name}' should be unique but {number(repeats)} values repeat an earlier one."
            if repeats is not None
            else f"'{name}' has no distinct count to check uniqueness."
        )
        yield _result(
            f"{base}.unique",
            name,
            "unique",
            passed,
            rule.severity,
            message,
            expected=True,
            observed=repeats,
            cells=repeats,
            exact=column.get("distinct_exact", True),
        )


def _date_bound(
    base: str, name: str, check: str, bound: date, column: dict[str, Any], rule: ColumnRule
) -> dict[str, Any]:
    """A min or max date rule, checked on the column's stored earliest or latest moment."""
    observed = ((column.get("datetime") or {}) if column.get("kind") == "datetime" else {}).get(
        check
    )
    shown = bound.isoformat()
    if observed is None:
        return _result(
            f"{base}.{check}", name, check, False, rule.severity,
            f"'{name}' has no dates to compare with its {check} of {shown}.",
            expected=shown, observed=None,
        )  # fmt: skip
    moment = datetime.fromisoformat(str(observed)).replace(tzinfo=None)
    below = check == "min"
    limit = _as_moment(bound, end=not below)
    passed = moment >= limit if below else moment <= limit
    side = "before" if below else "after"
    message = (
        f"'{name}' stays within its {check} of {shown}."
        if passed
        else f"'{name}' goes {side} its {check} of {shown}: "
        f"{'earliest' if below else 'latest'} {observed}."
    )
    return _result(
        f"{base}.{check}", name, check, passed, rule.severity, message,
        expected=shown, observed=observed,
    )  # fmt: skip


def _texts(rule: ColumnRule) -> set[str]:
    return {str(v).strip() for v in rule.missing_values}


def check_rules(
    profile: dict[str, Any], rules: SupplierRules | dict[str, Any] | str
) -> list[dict[str, Any]]:
    """Check a profile against a supplier's rules: one result per rule, passed or broken.

    Each result: ``rule`` (its path in the rules document), ``column``,
    ``check``, ``passed``, ``severity`` (of the flag when broken), a plain
    ``message``, and ``evidence`` (expected, observed and the counts behind
    them). Ranges are checked on the stored minimum and maximum; how many
    values lie beyond a bound is estimated from the stored percentiles.
    """
    parsed = rules if isinstance(rules, SupplierRules) else parse_rules(rules)
    rows = int((profile.get("dataset") or {}).get("rows") or 0)
    by_name = {c["name"]: c for c in profile.get("columns") or []}
    results: list[dict[str, Any]] = []
    if parsed.rows is not None:
        for check, bound in (("min", parsed.rows.min), ("max", parsed.rows.max)):
            if bound is None:
                continue
            passed = rows >= bound if check == "min" else rows <= bound
            word = "at least" if check == "min" else "at most"
            results.append(
                _result(
                    f"rows.{check}",
                    None,
                    f"rows_{check}",
                    passed,
                    "warning",
                    f"The file has {number(rows)} rows; the rules expect {word} {number(bound)}.",
                    expected=bound,
                    observed=rows,
                )
            )
    for name, rule in parsed.columns.items():
        results.extend(_check_column(name, rule, by_name.get(name), rows))
    if parsed.other_columns == "flag":
        extra = [name for name in by_name if name not in parsed.columns]
        results.append(
            _result(
                "other_columns",
                None,
                "other_columns",
                not extra,
                "warning",
                "Every column is one the rules list."
                if not extra
                else f"Columns not in the rules: {', '.join(repr(n) for n in extra)}.",
                expected=sorted(parsed.columns),
                observed=extra,
            )
        )
    return results


# ---------------------------------------------------------------------------
# drafting

DRAFT_MAX_LABELS = 30
"""Label columns with at most this many labels get an allowed-labels list (common practice)."""


def draft_rules(profile: dict[str, Any]) -> dict[str, Any]:
    """Rules proposed from an accepted intake's profile, for a person to edit and save.

    Every present column is required with its observed kind; numeric columns
    get their observed range; label columns with at most DRAFT_MAX_LABELS
    labels (and none left uncounted) get them as the allowed labels; the
    missing share allowed is the observed one rounded up to the next whole
    percent; identifier columns without repeats are unique; suspected
    stand-ins for 'unknown' become missing values. The row count may range
    from half to twice the observed one (common practice for a first draft).
    """
    rows = int((profile.get("dataset") or {}).get("rows") or 0)
    columns: dict[str, dict[str, Any]] = {}
    for column in profile.get("columns") or []:
        rule: dict[str, Any] = {"kind": column.get("kind"), "required": True}
        numeric = column.get("numeric") or {}
        if column.get("kind") == "numeric" and numeric.get("min") is not None:
            rule["min"] = numeric["min"]
            rule["max"] = numeric["max"]
        labels = column.get("labels") or {}
        top = labels.get("top") or []
        if (
            column.get("kind") in ("categorical", "boolean")
            and top
            and len(top) <= DRAFT_MAX_LABELS
            and not labels.get("other_count")
        ):
            rule["allowed_labels"] = sorted(str(item["value"]) for item in top)
        stand_ins = [s["value"] for s in column.get("suspected_sentinels") or []]
        if stand_ins:
            rule["missing_values"] = stand_ins
        if rows:
            treated = sum(int(s.get("count") or 0) for s in column.get("suspected_sentinels") or [])
            share = (int(column.get("missing") or 0) + treated) / rows
            rule["max_missing_share"] = min(1.0, math.ceil(share * 100 - 1e-9) / 100)
        if (
            column.get("kind") == "identifier"
            and column.get("distinct") is not None
            and int(column["distinct"]) == int(column.get("count") or 0)
        ):
            rule["unique"] = True
        columns[column["name"]] = {k: v for k, v in rule.items() if v is not None}
    draft: dict[str, Any] = {"columns": columns, "other_columns": "flag"}
    if rows:
        draft["rows"] = {"min": rows // 2, "max": rows * 2}
    parse_rules(draft)  # a draft is always a valid document
    return draft
