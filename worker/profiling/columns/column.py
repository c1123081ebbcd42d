"""All the states of one column, fed from prepared batches and turned into its profile entry."""

from __future__ import annotations

import dataclasses
from typing import Any

import numpy as np
import pyarrow as pa
import pyarrow.compute as pc

from worker.profiling.columns.datetime import DatetimeState
from worker.profiling.columns.distinct import DistinctState
from worker.profiling.columns.kinds import (
    SAMPLE,
    Candidates,
    KindCounts,
    choose_candidates,
    decide_kind,
)
from worker.profiling.columns.labels import LabelState
from worker.profiling.columns.missing import MissingState
from worker.profiling.columns.numeric import NumericState
from worker.profiling.columns.text import TextState
from worker.profiling.native import number_leads
from worker.profiling.options import ProfileOptions
from worker.profiling.personal import PersonalSample
from worker.profiling.prepared import PreparedColumn, is_text_type, parse_numbers

_NUMBER_START = r"^\s*[-+]?[.,]?[0-9]"


class ColumnState:
    """The mergeable states of one column; parsers start once its candidates are known."""

    def __init__(self, name: str, position: int, options: ProfileOptions, *, now: float) -> None:
        self.name = name
        self.position = position
        self.options = options
        self.now = now
        self.candidates: Candidates | None = None
        self.physical_type: str | None = None
        self.missing = MissingState()
        self.kinds = KindCounts()
        self.distinct = DistinctState(options.distinct_exact_bound, options.hll_precision)
        self.numeric: NumericState | None = None
        self.labels: LabelState | None = None
        self.dates: DatetimeState | None = None
        self.text: TextState | None = None
        self.personal = PersonalSample(options.personal_sample)

    def choose(self, column: pa.Array, present: pa.Array, decimal: str, thousands: str | None):
        """Decide the candidate parsers from the column's first non-missing values."""
        candidates = choose_candidates(
            column,
            present,
            decimal=decimal,
            thousands=thousands,
            label_candidate_max=self.options.label_candidate_max,
        )
        self.start(candidates)

    def reconsider(self, column: pa.Array, decimal: str, thousands: str | None) -> bool:
        """Start parsing numbers when a later batch of a text column shows them.

        Candidates come from the first non-empty batch; a column that showed no
        numbers there (say "pending" until the measurements begin) would otherwise
        never have them parsed. The first values of each later batch are checked
        (as cheap as the first choice); when more than 5 % read as numbers the
        column becomes a numeric candidate from this batch on, and its kind is then
        decided on the share of numbers over all its values. Numbers in the batches
        before, fewer than 5 % of their first values, are not in its figures.
        Returns True when the candidates changed.
        """
        candidates = self.candidates
        if candidates is None or candidates.numeric or not candidates.text:
            return False
        if candidates.date_formats:  # dates lead with digits too; they keep their parser
            return False
        if not is_text_type(column.type):
            return False
        head = column.slice(0, SAMPLE)
        # A number starts with a digit, after a sign or a decimal mark: counting such
        # starts rules most batches out at a fraction of the cost of parsing.
        leads = number_leads(head)
        if leads is None:  # text the compiled count does not read (string views)
            leads = pc.sum(pc.match_substring_regex(head, _NUMBER_START)).as_py() or 0
        if leads <= 0.05 * (len(head) - head.null_count):
            return False
        sample = pc.ascii_trim_whitespace(head).drop_null()
        numbers = parse_numbers(sample, decimal=decimal, thousands=thousands)
        if np.count_nonzero(~np.isnan(numbers)) <= 0.05 * len(sample):
            return False
        self.candidates = dataclasses.replace(candidates, numeric=True)
        self.numeric = NumericState(self.options)
        return True

    def start(self, candidates: Candidates) -> None:
        """Start the parsers of the given candidates (chosen here or by another worker)."""
        options = self.options
        self.candidates = candidates
        if self.candidates.numeric:
            self.numeric = NumericState(options)
        if self.candidates.labels:
            self.labels = LabelState(options.label_exact_bound, options.label_summary_size)
        if self.candidates.date_formats:
            self.dates = DatetimeState(
                self.candidates.date_formats,
                now=self.now,
                exact_bound=options.exact_bound,
                sample_size=options.sample_size,
            )
        # Lengths and shapes describe text; numbers or dates written as text skip them.
        if candidates.text and candidates.number_share <= 0.5 and not candidates.date_formats:
            self.text = TextState(options.pattern_sample)

    def update(self, raw: pa.Array, prepared: PreparedColumn) -> None:
        """Add one batch of this column: the reader's array and its prepared form."""
        if self.physical_type is None:
            self.physical_type = str(raw.type)
        missing = prepared.missing
        self.missing.update(prepared.counts, len(raw))
        self.personal.update(raw, missing)
        present_count = len(raw) - prepared.counts.total
        if self.candidates is None:
            self.kinds.update(present_count, None, None)
            return
        text, numbers = prepared.text, prepared.numbers
        self.kinds.update(present_count, numbers, text)
        if present_count == 0:
            return
        # Dates repeat: their distinct values are parsed and counted once (see encode).
        encoded = None
        if self.dates is not None and text is not None:
            encoded = prepared.encoded or self.dates.encode(text)
        if self.numeric is not None and numbers is not None:
            self.numeric.update(numbers)
        labels = self.labels
        if labels is not None:
            was_exact = labels.exact
            if prepared.label_counts is not None:
                overflow = labels.update_counts(prepared.label_counts)
            elif self.candidates.text:
                # Labels are counted as written, so "active " and "Active" stay apart
                # and show up as variants.
                written = raw
                if prepared.counts.total:
                    written = pc.if_else(pa.array(missing), pa.scalar(None, raw.type), raw)
                overflow = labels.update(written)
            else:
                overflow = labels.update(prepared.labels)
            if overflow is not None:
                # The label counts just became a summary: from here on the distinct
                # count needs hashes, starting with every label seen so far.
                self.distinct.update(pa.array(overflow, type=pa.string()))
            if not was_exact or overflow is not None:
                self._hash(raw, text, numbers)
        elif encoded is not None and (numbers is None or self.candidates.number_share <= 0.5):
            # The distinct values of the batch are its dictionary (a sketch of them
            # is the sketch of every row: repeats do not change it).
            self._hash(raw, encoded.dictionary, None)
        else:
            self._hash(raw, text, numbers)
        if self.dates is not None:
            self.dates.update(text if text is not None else raw, encoded)
        if self.text is not None:
            self.text.update(raw, missing, prepared.padded)

    def _hash(self, raw: pa.Array, text: pa.Array | None, numbers: np.ndarray | None) -> None:
        if numbers is not None and (not self.candidates.text or self.candidates.number_share > 0.5):
            self.distinct.update(numbers)
        elif text is not None:
            self.distinct.update(text)
        else:
            self.distinct.update(pc.cast(raw, pa.string()))

    def merge(self, other: ColumnState) -> ColumnState:
        """Combine with the same column's state over other rows."""
        out = ColumnState(self.name, self.position, self.options, now=self.now)
        out.candidates = self.candidates or other.candidates
        out.physical_type = self.physical_type or other.physical_type
        out.missing = self.missing.merge(other.missing)
        out.kinds = self.kinds.merge(other.kinds)
        out.distinct = self.distinct.merge(other.distinct)
        out.personal = self.personal.merge(other.personal)
        for attr in ("numeric", "labels", "dates", "text"):
            mine, theirs = getattr(self, attr), getattr(other, attr)
            if mine is not None and theirs is not None:
                setattr(out, attr, mine.merge(theirs))
            else:
                setattr(out, attr, mine if mine is not None else theirs)
        return out

    def finalize(self) -> dict[str, Any]:
        """The column's entry of the profile document."""
        options = self.options
        missing = self.missing.finalize()
        distinct = self.distinct.finalize()
        if self.labels is not None and self.labels.exact:
            distinct = {"distinct": len(self.labels.counts), "distinct_exact": True}
        text = self.text.finalize() if self.text is not None else None
        dates = self.dates.finalize() if self.dates is not None else None
        inner_space = bool(
            text and sum(p["share"] for p in text["patterns"] if " " in p["pattern"].strip()) > 0.2
        )
        decision = decide_kind(
            self.kinds,
            candidates=self.candidates,
            dates_parsed=dates["parsed"] if dates else 0,
            date_examples=(dates or {}).get("unparsed_examples", []),
            labels=self.labels.folded_values() if self.labels is not None else None,
            distinct=distinct["distinct"],
            mean_length=text["mean_length"] if text else None,
            has_inner_space=inner_space,
            majority=options.kind_majority_share,
            identifier_share=options.identifier_distinct_share,
            categorical_max=options.categorical_max_distinct,
        )
        kind = decision.kind
        numeric = sentinels = None
        if kind == "numeric" and self.numeric is not None:
            numeric, sentinels = self.numeric.finalize()
        labels = None
        if kind in ("categorical", "boolean") and self.labels is not None:
            labels = self.labels.finalize(
                top=options.top_labels,
                rare_share=options.rare_label_share,
                synonyms=options.label_synonyms,
            )
        evidence = dict(decision.evidence)
        if kind == "numeric" and self.candidates is not None and self.candidates.text:
            evidence["numbers_stored_as_text"] = True
        if dates and dates.get("ambiguous"):
            evidence["ambiguous_dates"] = {
                "format": dates["format"],
                "alternative_format": dates["alternative_format"],
            }
        return {
            "name": self.name,
            "position": self.position,
            "kind": kind,
            "physical_type": self.physical_type,
            **missing,
            "suspected_sentinels": sentinels or [],
            **distinct,
            "kind_evidence": evidence,
            "numeric": numeric,
            "labels": labels,
            "datetime": dates if kind == "datetime" else None,
            "text": text,
            "personal": self.personal.finalize(options.personal_min_share),
        }
