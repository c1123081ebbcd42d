"""Column kinds: candidates from the first values, the final kind from the counts of all batches.

Kinds are numeric, categorical, boolean, datetime, text, identifier and
empty. A column's candidate parsers (numbers, dates, labels) are chosen from
its first non-empty batch; the counts of every batch then decide its kind. A
column whose values mostly fit one kind keeps it, and the values that do not
fit are kept as mixed-kinds evidence (their share and a few examples).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

import numpy as np
import pyarrow as pa
import pyarrow.compute as pc
import pyarrow.types as pat

from worker.profiling.columns.datetime import TYPED, candidate_formats
from worker.profiling.prepared import is_text_type, parse_numbers

KINDS = ("numeric", "categorical", "boolean", "datetime", "text", "identifier", "empty")
BOOLEAN_WORDS = frozenset({"true", "false", "yes", "no", "y", "n", "t", "f"})
SAMPLE = 2_000
"""First values of a batch that candidate parsers are chosen from."""
_EXAMPLES = 5


@dataclass(frozen=True)
class Candidates:
    """Which parsers run on a column; decided from its first non-empty batch."""

    numeric: bool
    labels: bool
    date_formats: list[str]
    text: bool
    typed: str | None = None  # the Arrow type of a typed (Parquet) column, else None
    number_share: float = 0.0  # share of the first values that read as numbers
    leading_zeros: bool = False  # some first values are digits led by a zero, like "00417"


def choose_candidates(
    column: pa.Array,
    present: pa.Array,
    *,
    decimal: str = ".",
    thousands: str | None = None,
    label_candidate_max: int = 1_000,
) -> Candidates:
    """Candidate parsers for a column from its first non-missing values.

    ``present`` is the trimmed text (or typed values) of the non-missing cells.
    """
    data_type = column.type
    if not is_text_type(data_type):
        numeric = (
            pat.is_integer(data_type) or pat.is_floating(data_type) or pat.is_decimal(data_type)
        )
        temporal = pat.is_timestamp(data_type) or pat.is_date(data_type)
        labels = not numeric and not temporal
        return Candidates(
            numeric=bool(numeric),
            labels=labels,
            date_formats=[TYPED] if temporal else [],
            text=False,
            typed=str(data_type),
            number_share=1.0 if numeric else 0.0,
        )
    sample = present.slice(0, SAMPLE)
    numbers = parse_numbers(sample, decimal=decimal, thousands=thousands)
    number_share = float(np.count_nonzero(~np.isnan(numbers))) / max(len(sample), 1)
    numeric = number_share > 0.05
    # Codes such as "00417" read as numbers but lose their zeros: a sign of an identifier.
    leading_zeros = bool(numeric and pc.any(pc.match_substring_regex(sample, r"^0\d")).as_py())
    formats = [] if number_share > 0.5 else candidate_formats(sample)
    distinct = len(pc.unique(present))
    labels = number_share <= 0.5 and not formats
    labels = labels and (distinct <= label_candidate_max or distinct <= 0.5 * len(present))
    return Candidates(
        numeric=numeric,
        labels=labels,
        date_formats=formats,
        text=True,
        number_share=number_share,
        leading_zeros=leading_zeros,
    )


class KindCounts:
    """Per column: non-missing values, and how many of them fit numbers (mergeable)."""

    def __init__(self) -> None:
        self.present = 0
        self.numbers = 0
        self.not_numbers: list[str] = []

    def update(self, present_count: int, numbers: np.ndarray | None, text: pa.Array | None) -> None:
        self.present += present_count
        if numbers is None:
            return
        fits = ~np.isnan(numbers)
        fitting = int(np.count_nonzero(fits))
        self.numbers += fitting
        # Examples of values that are not numbers, looked for only when there are some.
        odd_count = (len(text) - text.null_count - fitting) if text is not None else 0
        if text is not None and odd_count > 0 and len(self.not_numbers) < _EXAMPLES:
            odd = pc.filter(
                text, pa.array(~fits & pc.is_valid(text).to_numpy(zero_copy_only=False))
            )
            for value in pc.unique(odd.slice(0, 50)).to_pylist():
                if value not in self.not_numbers and len(self.not_numbers) < _EXAMPLES:
                    self.not_numbers.append(value)

    def merge(self, other: KindCounts) -> KindCounts:
        out = KindCounts()
        out.present = self.present + other.present
        out.numbers = self.numbers + other.numbers
        out.not_numbers = (self.not_numbers + other.not_numbers)[:_EXAMPLES]
        return out


@dataclass
class KindDecision:
    kind: str
    evidence: dict[str, Any] = field(default_factory=dict)


def decide_kind(
    counts: KindCounts,
    *,
    candidates: Candidates | None,
    dates_parsed: int,
    date_examples: list[str],
    labels: set[str] | None,
    distinct: int,
    mean_length: float | None,
    has_inner_space: bool,
    majority: float = 0.5,
    identifier_share: float = 0.95,
    categorical_max: int = 1_000,
) -> KindDecision:
    """The column's kind from counts over all batches, with mixed-kinds evidence."""
    present = counts.present
    if present == 0 or candidates is None:
        return KindDecision("empty")
    if candidates.typed is not None and not candidates.text:
        if candidates.numeric:
            return KindDecision("numeric")
        if candidates.date_formats:
            return KindDecision("datetime")
        if candidates.typed == "bool":
            return KindDecision("boolean")
    number_share = counts.numbers / present
    date_share = dates_parsed / present
    distinct_share = distinct / present
    if (
        number_share >= majority
        and candidates.leading_zeros
        and distinct_share >= identifier_share
        and (mean_length or 0) <= 40
    ):
        return KindDecision("identifier", {"leading_zeros": True, "numeric_share": number_share})
    if number_share >= majority and number_share >= date_share:
        return KindDecision("numeric", _mixed(number_share, counts.not_numbers, "numeric"))
    if date_share >= majority:
        return KindDecision("datetime", _mixed(date_share, date_examples, "datetime"))
    evidence: dict[str, Any] = {}
    if number_share > 0:
        evidence = {"numeric_share": number_share}
    if labels is not None and 0 < len(labels) <= 2 and labels <= BOOLEAN_WORDS:
        return KindDecision("boolean", evidence)
    if distinct_share >= identifier_share and not has_inner_space and (mean_length or 0) <= 40:
        return KindDecision("identifier", evidence)
    if distinct > categorical_max and distinct_share > 0.5:
        return KindDecision("text", evidence)
    if labels is None and distinct > categorical_max:
        return KindDecision("text", evidence)
    return KindDecision("categorical", evidence)


def _mixed(share: float, examples: list[str], kind: str) -> dict[str, Any]:
    if share >= 1.0:
        return {}
    return {
        "mixed_kinds": {
            "kind": kind,
            "fit_share": share,
            "other_share": 1.0 - share,
            "examples": examples,
        }
    }
