"""What the pages and the report show of a profile, prepared in plain Python.

Templates only lay things out; every choice of what to show (which facts of
a column, how flags group, which figure goes where) is made here, in pure
functions that tests can call without a browser.
"""

from __future__ import annotations

from collections import defaultdict
from dataclasses import dataclass, field
from typing import Any

from server.pages import figures
from server.pages.figures.base import Figure, finite, format_number

SEVERITY_ORDER = {"critical": 0, "warning": 1, "info": 2}
SEVERITY_MARK = {"critical": "◆", "warning": "▲", "info": "●"}
WHOLE_FILE = ""
"""Group key of flags that name no column."""


def shorten(value: object, limit: int = 40) -> str:
    """Text for a page (the template escapes it), cut with an ellipsis beyond ``limit``."""
    text = "(missing)" if value is None else str(value)
    return text if len(text) <= limit else text[: limit - 1] + "…"


def percent(share: float | None, digits: int = 1) -> str:
    """A share 0..1 as ``12.3 %``; ``–`` when unknown."""
    if share is None:
        return "–"
    return f"{100 * share:.{digits}f} %"


@dataclass
class Fact:
    """One labelled figure of a column card, e.g. ("median", "12.4")."""

    label: str
    value: str
    hint: str = ""


@dataclass
class ColumnCard:
    """Everything a column card shows."""

    name: str
    position: int
    kind: str
    anchor: str
    facts: list[Fact]
    figure: Figure | None
    flags: list[dict[str, Any]] = field(default_factory=list)
    missing_share: float | None = None
    variants: list[list[str]] = field(default_factory=list)
    sentinels: list[dict[str, Any]] = field(default_factory=list)
    lazy: bool = False
    """The figure is fetched by the page when the card scrolls into view."""

    @property
    def worst(self) -> str | None:
        """The most severe flag's severity, or None when the column has no flag."""
        if not self.flags:
            return None
        return min((f["severity"] for f in self.flags), key=lambda s: SEVERITY_ORDER.get(s, 9))


def column_anchor(position: int) -> str:
    """A fragment id for a column: by position, since names from files may be anything."""
    return f"col-{position}"


def _numeric_facts(numeric: dict[str, Any]) -> list[Fact]:
    n = format_number
    facts = [
        Fact("min", n(finite(numeric.get("min")))),
        Fact("lower quartile", n(finite(numeric.get("q1")))),
        Fact("median", n(finite(numeric.get("median")))),
        Fact("upper quartile", n(finite(numeric.get("q3")))),
        Fact("max", n(finite(numeric.get("max")))),
        Fact("mean", n(finite(numeric.get("mean")))),
        Fact("standard deviation", n(finite(numeric.get("std"))), "sample (n - 1)"),
        Fact("skewness", n(finite(numeric.get("skewness")), 3)),
        Fact("excess kurtosis", n(finite(numeric.get("kurtosis")), 3)),
        Fact("zeros", n(finite(numeric.get("zeros")))),
        Fact("negatives", n(finite(numeric.get("negatives")))),
    ]
    outliers = numeric.get("outliers") or {}
    if outliers:
        low, high = outliers.get("tukey_low"), outliers.get("tukey_high")
        facts.append(
            Fact(
                "beyond Tukey's fences",
                f"{n(finite(low))} below · {n(finite(high))} above",
                f"{n(finite(outliers.get('tukey_far')))} of them past 3 IQR",
            )
        )
    if numeric.get("exact") is False:
        facts.append(Fact("quantiles", "estimated", "from a sketch; the rank error is bounded"))
    return facts


def _label_facts(column: dict[str, Any]) -> list[Fact]:
    labels = column.get("labels") or {}
    top = labels.get("top") or []
    facts = []
    if top:
        first = top[0]
        facts.append(Fact("most frequent", shorten(first.get("value"))))
        facts.append(Fact("its share", percent(finite(first.get("share")))))
    entropy = finite(labels.get("entropy"))
    if entropy is not None:
        facts.append(Fact("entropy", f"{entropy:.3f} bits", "Shannon entropy of the labels"))
    ratio = finite(labels.get("imbalance_ratio"))
    if ratio is not None:
        facts.append(Fact("most / least frequent", f"{ratio:.1f} ×"))
    rare = labels.get("rare")
    if isinstance(rare, list):
        facts.append(Fact("rare labels", str(len(rare))))
    elif finite(rare) is not None:
        facts.append(Fact("rare labels", format_number(finite(rare))))
    return facts


def column_facts(column: dict[str, Any], rows: int) -> list[Fact]:
    """The figures a column card lists, common ones first, then the kind's own."""
    missing = int(column.get("missing") or 0)
    facts = [
        Fact("filled", format_number(finite(column.get("count")))),
        Fact("missing", f"{format_number(missing)} ({percent(missing / rows if rows else None)})"),
    ]
    distinct = column.get("distinct")
    if distinct is not None:
        exact = column.get("distinct_exact", True)
        facts.append(Fact("distinct", ("" if exact else "≈ ") + format_number(finite(distinct))))
    kind = column.get("kind")
    if kind == "numeric" and column.get("numeric"):
        facts += _numeric_facts(column["numeric"])
    elif kind in ("categorical", "boolean"):
        facts += _label_facts(column)
    elif kind == "datetime" and column.get("datetime"):
        section = column["datetime"]
        facts += [
            Fact("earliest", str(section.get("min"))),
            Fact("latest", str(section.get("max"))),
        ]
    elif kind in ("text", "identifier") and column.get("text"):
        text = column["text"]
        facts.append(
            Fact(
                "length",
                f"{format_number(finite(text.get('min_length')))} to "
                f"{format_number(finite(text.get('max_length')))}",
                f"mean {format_number(finite(text.get('mean_length')), 3)} characters",
            )
        )
    return facts


def flags_by_column(flags: list[dict[str, Any]]) -> dict[str, list[dict[str, Any]]]:
    """Flags keyed by each column they name (a flag on two columns is under both);
    flags naming no column are under ``WHOLE_FILE``. Each list is ordered by severity."""
    grouped: dict[str, list[dict[str, Any]]] = defaultdict(list)
    for flag in flags:
        for name in flag.get("columns") or [WHOLE_FILE]:
            grouped[str(name)].append(flag)
    for items in grouped.values():
        items.sort(key=lambda f: (SEVERITY_ORDER.get(f.get("severity"), 9), f.get("code", "")))
    return dict(grouped)


@dataclass
class FlagGroup:
    """The flags of one column (or of the whole file), for the flag list."""

    column: str
    anchor: str | None
    flags: list[dict[str, Any]]

    @property
    def worst(self) -> str:
        return self.flags[0].get("severity", "info")


def flag_groups(profile: dict[str, Any]) -> list[FlagGroup]:
    """Flag groups, the whole file first, then columns by worst severity and number of flags.

    A flag on several columns is listed under its first column only.
    """
    positions = {str(c.get("name")): c.get("position", i) for i, c in enumerate(_columns(profile))}
    grouped: dict[str, list[dict[str, Any]]] = defaultdict(list)
    for flag in profile.get("flags") or []:
        names = flag.get("columns") or [WHOLE_FILE]
        grouped[str(names[0])].append(flag)
    groups = []
    for name, items in grouped.items():
        items.sort(key=lambda f: (SEVERITY_ORDER.get(f.get("severity"), 9), f.get("code", "")))
        anchor = column_anchor(positions[name]) if name in positions else None
        groups.append(FlagGroup(name, anchor, items))
    groups.sort(
        key=lambda g: (
            g.column != WHOLE_FILE,
            SEVERITY_ORDER.get(g.worst, 9),
            -len(g.flags),
            positions.get(g.column, 0),
        )
    )
    return groups


def _columns(profile: dict[str, Any]) -> list[dict[str, Any]]:
    return list(profile.get("columns") or [])


DRAWABLE_KINDS = frozenset({"numeric", "categorical", "boolean", "datetime"})


def column_cards(profile: dict[str, Any], inline_figures: int | None = None) -> list[ColumnCard]:
    """One card per column, in file order, with its facts, figure and flags.

    With ``inline_figures``, only the first that many cards carry their figure;
    the others are marked ``lazy`` when their kind has a figure, for the page to
    fetch as they scroll into view (a 300-column page stays light).
    """
    rows = int((profile.get("dataset") or {}).get("rows") or 0)
    by_column = flags_by_column(profile.get("flags") or [])
    cards = []
    for index, column in enumerate(_columns(profile)):
        position = int(column.get("position", index))
        name = str(column.get("name"))
        labels = column.get("labels") or {}
        cards.append(
            ColumnCard(
                name=name,
                position=position,
                kind=str(column.get("kind") or "unknown"),
                anchor=column_anchor(position),
                facts=column_facts(column, rows),
                figure=figures.column_figure(column)
                if inline_figures is None or index < inline_figures
                else None,
                lazy=inline_figures is not None
                and index >= inline_figures
                and column.get("kind") in DRAWABLE_KINDS,
                flags=by_column.get(name, []),
                missing_share=(int(column.get("missing") or 0) / rows) if rows else None,
                variants=[list(map(str, v)) for v in labels.get("variants") or []],
                sentinels=list(column.get("suspected_sentinels") or []),
            )
        )
    return cards


def column_figures(profile: dict[str, Any], start: int, count: int) -> dict[str, Figure | None]:
    """The figures of columns ``start`` to ``start + count - 1``, keyed by figure id."""
    columns = _columns(profile)[start : start + count]
    return {
        f"fig-col-{int(c.get('position', start + i))}": figures.column_figure(c)
        for i, c in enumerate(columns)
    }


def correlation_figures(profile: dict[str, Any]) -> dict[str, Figure]:
    """One heatmap per method present in the profile's pairs, in a fixed method order."""
    pairs = list(profile.get("pairs") or [])
    order = [str(c.get("name")) for c in _columns(profile)]
    result = {}
    for method in figures.correlation_methods(pairs):
        figure = figures.correlation_figure(pairs, method, order)
        if figure is not None:
            result[method] = figure
    return result


def dataset_facts(profile: dict[str, Any]) -> list[Fact]:
    """The headline numbers of the whole file."""
    dataset = profile.get("dataset") or {}
    source = profile.get("source") or {}
    rows = int(dataset.get("rows") or 0)
    columns = int(dataset.get("columns") or len(_columns(profile)))
    cells = rows * columns
    missing = int(dataset.get("missing_cells") or 0)
    repeated = dataset.get("duplicate_rows")
    parse_errors = dataset.get("parse_error_count", len(dataset.get("parse_errors") or []))
    facts = [
        Fact("rows", format_number(rows)),
        Fact("columns", format_number(columns)),
        Fact(
            "missing cells",
            f"{format_number(missing)}",
            percent(missing / cells if cells else None),
        ),
    ]
    if repeated is not None:
        facts.append(
            Fact(
                "repeated rows",
                format_number(finite(repeated)),
                percent(repeated / rows if rows else None),
            )
        )
    facts.append(Fact("unreadable lines", format_number(finite(parse_errors))))
    if source.get("bytes") is not None:
        facts.append(Fact("file size", file_size(int(source["bytes"]))))
    return facts


def file_size(size: int) -> str:
    """Bytes in a human unit (binary multiples, as file managers show them)."""
    value = float(size)
    for unit in ("bytes", "KiB", "MiB", "GiB"):
        if value < 1024 or unit == "GiB":
            return f"{int(value)} {unit}" if unit == "bytes" else f"{value:.1f} {unit}"
        value /= 1024
    return f"{size} bytes"


def score_rows(score: dict[str, Any] | None) -> list[dict[str, Any]]:
    """Dimension scores with their reasons, lowest first, for the scorecard."""
    if not score:
        return []
    reasons = score.get("reasons") or {}
    rows = [
        {
            "name": name,
            "value": value,
            "reason": _without_prefix(reasons.get(name, ""), name, value),
        }
        for name, value in (score.get("dimensions") or {}).items()
        if value is not None
    ]
    rows.sort(key=lambda r: (r["value"], r["name"]))
    return rows


def _without_prefix(reason: str, name: str, value: object) -> str:
    """A reason without its leading "completeness 98: " (the scorecard shows both already)."""
    prefix = f"{name} {value}: "
    return reason[len(prefix) :] if reason.startswith(prefix) else reason


def score_band(value: float | None) -> str:
    """good (90 and over), fair (70 to 89) or poor, for the badge colour; our own bands."""
    if value is None:
        return "unknown"
    if value >= 90:
        return "good"
    if value >= 70:
        return "fair"
    return "poor"
