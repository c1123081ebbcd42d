"""Small helpers that turn numbers into the words of a flag's message."""

from __future__ import annotations

from typing import Any


def percent(share: float) -> str:
    """A share as a percentage a reviewer reads at a glance: 0.042 -> '4.2 %'."""
    value = 100.0 * share
    if value == 0:
        return "0 %"
    if abs(value) >= 10:
        return f"{value:.0f} %"
    if abs(value) >= 0.1:
        return f"{value:.1f} %"
    return f"{value:.2g} %"


def number(value: Any) -> str:
    """A number as short text: integers without decimals, others with 4 significant digits."""
    if isinstance(value, bool) or not isinstance(value, int | float):
        return repr(value) if isinstance(value, str) else str(value)
    if float(value).is_integer() and abs(value) < 1e15:
        return f"{int(value):,}"
    return f"{value:.4g}"


def plural(count: int, word: str) -> str:
    """'1 row', '2 rows': a count with its noun."""
    return f"{number(count)} {word}{'' if count == 1 else 's'}"


def linear(slope: Any, name: str, intercept: Any, scale: float = 1.0) -> str:
    """A linear relation in words, e.g. 2.205 × 'weight_kg' + 3.

    The intercept is left out when it is below 0.1 % of ``scale`` (the typical
    size of the result), where it is rounding, not a real offset.
    """
    text = f"{number(slope)} × '{name}'"
    if isinstance(intercept, int | float) and abs(intercept) >= 1e-3 * max(abs(scale), 1.0):
        text += f" {'+' if intercept > 0 else '-'} {number(abs(intercept))}"
    return text


def quoted(names: list[str] | tuple[str, ...]) -> str:
    """Column names in quotes, joined with commas and a final 'and'."""
    parts = [f"'{name}'" for name in names]
    if len(parts) <= 1:
        return "".join(parts)
    return ", ".join(parts[:-1]) + " and " + parts[-1]


def make_flag(
    code: str,
    severity: str,
    columns: list[str],
    message: str,
    evidence: dict[str, Any],
) -> dict[str, Any]:
    """One flag in the profile document's shape (code, severity, columns, message, evidence)."""
    if severity not in ("info", "warning", "critical"):
        raise ValueError(f"unknown severity {severity!r}")
    return {
        "code": code,
        "severity": severity,
        "columns": list(columns),
        "message": message,
        "evidence": evidence,
    }
