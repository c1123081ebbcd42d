"""Dates and times of a column: formats tried, ambiguity, range, granularity and a histogram.

Text is parsed with Arrow's vectorised ``strptime`` in formats chosen from a
sample of the column's first values: ISO 8601 forms, and the common day-first
and month-first forms. When both a day-first and a month-first form read every
value (no day above 12 was seen), the column's dates are ambiguous and the
profile says so. Every batch is parsed with each candidate format and the
counts of all batches choose the format, so a later "25/03/2024" settles it.
"""

from __future__ import annotations

import datetime as dt
from typing import Any

import numpy as np
import pyarrow as pa
import pyarrow.compute as pc

from worker.profiling.columns.quantiles import QuantileState
from worker.profiling.native import dictionary_encode
from worker.profiling.prepared import is_text_type, null_mask

# (format, "day" or "month" first when the form is ambiguous, else None)
DATE_FORMATS: tuple[tuple[str, str | None], ...] = (
    ("%Y-%m-%d", None),
    ("%Y-%m-%dT%H:%M:%S", None),
    ("%Y-%m-%d %H:%M:%S", None),
    ("%Y-%m-%dT%H:%M", None),
    ("%Y-%m-%d %H:%M", None),
    ("%Y/%m/%d", None),
    ("%d/%m/%Y", "day"),
    ("%m/%d/%Y", "month"),
    ("%d.%m.%Y", "day"),
    ("%d-%m-%Y", "day"),
    ("%m-%d-%Y", "month"),
    ("%d/%m/%Y %H:%M", "day"),
    ("%m/%d/%Y %H:%M", "month"),
    ("%d/%m/%Y %H:%M:%S", "day"),
    ("%m/%d/%Y %H:%M:%S", "month"),
    ("%d/%m/%y", "day"),
    ("%m/%d/%y", "month"),
    ("%d %b %Y", None),
    ("%b %d, %Y", None),
    ("%d-%b-%Y", None),
)
_COUNTERPART = {
    "%d/%m/%Y": "%m/%d/%Y",
    "%m/%d/%Y": "%d/%m/%Y",
    "%d-%m-%Y": "%m-%d-%Y",
    "%m-%d-%Y": "%d-%m-%Y",
    "%d/%m/%Y %H:%M": "%m/%d/%Y %H:%M",
    "%m/%d/%Y %H:%M": "%d/%m/%Y %H:%M",
    "%d/%m/%Y %H:%M:%S": "%m/%d/%Y %H:%M:%S",
    "%m/%d/%Y %H:%M:%S": "%d/%m/%Y %H:%M:%S",
    "%d/%m/%y": "%m/%d/%y",
    "%m/%d/%y": "%d/%m/%y",
}
_ISO_TAIL = r"(\.\d+)?(Z|[+-]\d\d:?\d\d)?$"
TYPED = "typed"
_GRAINS = ("year", "month", "day", "hour", "minute", "second")


def parse_dates(text: pa.Array, fmt: str) -> pa.Array:
    """Parse text in one format; null where it does not fit (seconds resolution)."""
    return _strptime(text, fmt)


def _strptime(text: pa.Array, fmt: str) -> pa.Array:
    if fmt == "%Y-%m-%d":
        fast = _iso_dates(text)
        if fast is not None:
            return fast
    if "T%H" in fmt or ("%H:%M:%S" in fmt and fmt.startswith("%Y")):
        text = pc.replace_substring_regex(text, _ISO_TAIL, "")
    return pc.strptime(text, format=fmt, unit="s", error_is_null=True)


def candidate_formats(sample: pa.Array, min_share: float = 0.05) -> list[str]:
    """The formats that read the most of a sample of non-missing text (best first)."""
    if len(sample) == 0:
        return []
    shares = []
    for fmt, _order in DATE_FORMATS:
        parsed = _strptime(sample, fmt)
        shares.append((1.0 - parsed.null_count / len(sample), fmt))
    shares.sort(key=lambda item: -item[0])
    best_share, best = shares[0]
    if best_share < min_share:
        return []
    chosen = [fmt for share, fmt in shares if share >= best_share - 1e-9 and share > 0][:3]
    partner = _COUNTERPART.get(best)
    if partner and partner not in chosen and any(s > 0 and f == partner for s, f in shares):
        chosen.append(partner)
    return chosen


class _FormatState:
    def __init__(self, exact_bound: int, sample_size: int) -> None:
        self.parsed = 0
        self.future = 0
        self.seconds = QuantileState(exact_bound, sample_size)
        self.finest = 0  # index into _GRAINS of the finest unit seen varying

    def update(self, parsed: pa.Array, now: float) -> None:
        present = parsed.drop_null() if parsed.null_count else parsed
        if len(present) == 0:
            return
        seconds = pc.cast(present, pa.int64()).to_numpy(zero_copy_only=False)
        self.parsed += int(seconds.size)
        self.future += int(np.count_nonzero(seconds > now))
        self.seconds.update(seconds.astype(np.float64))
        if self.finest < 5:
            self.finest = max(self.finest, _finest_grain(seconds, present, self.finest))

    def update_labels(self, parsed: pa.Array, codes: np.ndarray, now: float) -> None:
        """Add a batch given as its distinct values parsed (``parsed``, null where a value
        does not fit) and each row's code into them (``len(parsed)`` where missing).

        The same figures as ``update`` over the rows: the granularity depends only on
        which values occur, every distinct value occurring at least once.
        """
        fits = parsed.drop_null() if parsed.null_count else parsed
        if len(fits) == 0:
            return
        label_seconds = np.full(len(parsed) + 1, np.nan)
        fitting = ~null_mask(parsed)
        label_seconds[: len(parsed)][fitting] = pc.cast(fits, pa.int64()).to_numpy(
            zero_copy_only=False
        )
        rows = label_seconds[codes]
        seconds = rows[~np.isnan(rows)]
        self.parsed += int(seconds.size)
        self.future += int(np.count_nonzero(seconds > now))
        self.seconds.update(seconds)
        if self.finest < 5:
            distinct = label_seconds[: len(parsed)][fitting].astype(np.int64)
            self.finest = max(self.finest, _finest_grain(distinct, fits, self.finest))

    def merge(self, other: _FormatState) -> _FormatState:
        out = _FormatState(self.seconds.exact_bound, self.seconds.sample_size)
        out.parsed = self.parsed + other.parsed
        out.future = self.future + other.future
        out.seconds = self.seconds.merge(other.seconds)
        out.finest = max(self.finest, other.finest)
        return out


def _finest_grain(seconds: np.ndarray, parsed: pa.Array, known: int) -> int:
    """The finest unit in which the values vary (an index into ``_GRAINS``), checking only
    units finer than the ``known`` one already seen."""
    if np.any(seconds % 60):
        return 5
    if known >= 4:
        return known
    if np.any(seconds % 3600):
        return 4
    if known >= 3:
        return known
    if np.any(seconds % 86400):
        return 3
    if known >= 2:
        return known
    if pc.any(pc.not_equal(pc.day(parsed), 1)).as_py():
        return 2
    if known >= 1:
        return known
    if pc.any(pc.not_equal(pc.month(parsed), 1)).as_py():
        return 1
    return 0


class DatetimeState:
    """Parse counts and time figures for each candidate format of a column."""

    def __init__(
        self,
        formats: list[str],
        *,
        now: float,
        exact_bound: int = 1_000_000,
        sample_size: int = 262_144,
    ) -> None:
        self.formats = list(formats)
        self.now = now
        self.states = {fmt: _FormatState(exact_bound, sample_size) for fmt in self.formats}
        self.examples: dict[str, list[str]] = {fmt: [] for fmt in self.formats}
        self._by_label = True  # parse distinct values once (see ``encode``)

    def encode(self, text: pa.Array) -> pa.DictionaryArray | None:
        """The batch's text dictionary-encoded when its dates repeat (as days do), else None.

        Parsing the distinct values once and spreading them by code costs a fraction
        of parsing every row; values that hardly repeat (timestamps to the second)
        are parsed row by row, as the first batch that shows it decides.
        """
        if not self._by_label or TYPED in self.states or not is_text_type(text.type):
            return None
        encoded = dictionary_encode(text)
        if len(encoded.dictionary) > len(text) // 2:
            self._by_label = False
        return encoded

    def update(self, values: pa.Array, encoded: pa.DictionaryArray | None = None) -> None:
        """Add a batch: trimmed text (null where missing), or typed timestamps/dates.

        ``encoded``, when given, is the same text dictionary-encoded (``encode``).
        """
        if encoded is not None:
            dictionary = encoded.dictionary
            indices = encoded.indices
            if indices.null_count:  # missing rows take the code past the dictionary
                indices = indices.fill_null(len(dictionary))
            codes = indices.to_numpy(zero_copy_only=False)
            for fmt, state in self.states.items():
                parsed = parse_dates(dictionary, fmt)
                self._keep_examples(fmt, dictionary, parsed)
                state.update_labels(parsed, codes, self.now)
            return
        for fmt, state in self.states.items():
            if fmt == TYPED:
                parsed = pc.cast(pc.cast(values, pa.timestamp("s")), pa.timestamp("s"))
            else:
                parsed = parse_dates(values, fmt)
                self._keep_examples(fmt, values, parsed)
            state.update(parsed, self.now)

    def _keep_examples(self, fmt: str, values: pa.Array, parsed: pa.Array) -> None:
        """Keep a few present values the format does not read (mixed-kinds evidence)."""
        kept = self.examples[fmt]
        if len(kept) >= 5 or parsed.null_count == values.null_count:
            return
        odd = pc.filter(values, pc.and_(pc.is_null(parsed), pc.is_valid(values)))
        for value in pc.unique(odd.slice(0, 50)).to_pylist():
            if value not in kept and len(kept) < 5:
                kept.append(value)

    def merge(self, other: DatetimeState) -> DatetimeState:
        out = DatetimeState(self.formats, now=self.now)
        for fmt in self.formats:
            out.examples[fmt] = (self.examples[fmt] + other.examples.get(fmt, []))[:5]
            mine = self.states[fmt]
            out.states[fmt] = mine.merge(other.states[fmt]) if fmt in other.states else mine
        return out

    def best(self) -> tuple[str | None, int]:
        if not self.states:
            return None, 0
        fmt = max(self.formats, key=lambda f: self.states[f].parsed)
        return fmt, self.states[fmt].parsed

    def finalize(self, bins: int = 50) -> dict[str, Any]:
        fmt, parsed = self.best()
        if fmt is None or parsed == 0:
            return {"format": fmt, "parsed": 0, "min": None, "max": None}
        state = self.states[fmt]
        partner = _COUNTERPART.get(fmt)
        ambiguous = bool(
            partner and partner in self.states and self.states[partner].parsed == parsed
        )
        order = dict(DATE_FORMATS).get(fmt)
        low, high = (float(v) for v in state.seconds.quantiles([0.0, 1.0]))
        edges = np.linspace(low, high, bins + 1) if high > low else np.array([low, low + 1.0])
        below = state.seconds.count_below(edges[1:-1], inclusive=False)
        counts = np.diff(np.concatenate([[0], below, [state.parsed]]))
        return {
            "format": fmt,
            "order": order,
            "ambiguous": ambiguous,
            "alternative_format": partner if ambiguous else None,
            "parsed": parsed,
            "unparsed_examples": self.examples.get(fmt, []),
            "min": _iso(low),
            "max": _iso(high),
            "span_days": (high - low) / 86400.0,
            "granularity": _GRAINS[state.finest],
            "future": state.future,
            "histogram": {
                "edges": [_iso(e) for e in edges],
                "counts": [int(max(c, 0)) for c in counts],
            },
            "exact": state.seconds.exact,
        }


def _iso(seconds: float) -> str:
    return dt.datetime.fromtimestamp(seconds, tz=dt.UTC).replace(tzinfo=None).isoformat()


def _iso_dates(text: pa.Array) -> pa.Array | None:
    """Plain ISO dates (every present value ten characters long) by Arrow's strict ISO 8601
    cast, three times cheaper than strptime; None when one value needs strptime's
    reading (a day past the month's end, a value of another length)."""
    lengths = pc.binary_length(text)
    if len(text) == text.null_count or pc.min_max(lengths).as_py() != {"min": 10, "max": 10}:
        return None
    try:
        return pc.cast(text, pa.timestamp("s"))
    except pa.ArrowInvalid:
        return None
