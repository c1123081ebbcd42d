"""What the job stores besides the profile document: JSON-safe values and column rows."""

from __future__ import annotations

import math
from typing import Any


def json_safe(value: Any) -> Any:
    """``value`` with NaN and infinities as None and numpy scalars as Python numbers.

    PostgreSQL's JSONB (and strict JSON) has no NaN or infinity, so a profile
    must be cleaned before it is stored.
    """
    if isinstance(value, dict):
        return {str(k): json_safe(v) for k, v in value.items()}
    if isinstance(value, list | tuple):
        return [json_safe(v) for v in value]
    if hasattr(value, "item") and callable(value.item) and not isinstance(value, str | bytes):
        value = value.item()
    if isinstance(value, float) and not math.isfinite(value):
        return None
    return value


def _number(value: Any) -> float | None:
    if isinstance(value, bool) or not isinstance(value, int | float):
        return None
    return float(value) if math.isfinite(value) else None


def column_rows(profile: dict[str, Any]) -> list[dict[str, Any]]:
    """One flat row per column of a profile document, for the ``column_summary`` table.

    Reads only the fields of DESIGN.md's profile document; a field the engine
    does not (yet) fill stays None.
    """
    rows_total = (profile.get("dataset") or {}).get("rows")
    out = []
    for column in profile.get("columns") or []:
        count = column.get("count")
        missing = column.get("missing")
        denominator = (count or 0) + (missing or 0) if count is not None else rows_total
        numeric = column.get("numeric") or {}
        top = ((column.get("labels") or {}).get("top") or [None])[0] or {}
        top_value = top.get("value")
        out.append(
            {
                "name": str(column["name"]),
                "position": int(column["position"]),
                "kind": column.get("kind"),
                "missing_share": (missing / denominator)
                if missing is not None and denominator
                else None,
                "distinct": column.get("distinct"),
                "mean": _number(numeric.get("mean")),
                "median": _number(numeric.get("median")),
                "std": _number(numeric.get("std")),
                "min": _number(numeric.get("min")),
                "max": _number(numeric.get("max")),
                "top_label": None if top_value is None else str(top_value),
                "top_label_share": _number(top.get("share")),
            }
        )
    return out


def overall_score(profile: dict[str, Any]) -> float | None:
    """The scorecard's overall score, when the profile has one."""
    score = profile.get("score")
    return _number(score.get("overall")) if isinstance(score, dict) else None
