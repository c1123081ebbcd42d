"""The across-column state of one table: pairs, twins, crosstabs and missing-together.

``RelationsState`` is fed every prepared batch, merges with another state
built over other rows of the same table, and turns into the profile's
``pairs``, ``twins``, ``crosstabs`` and ``missing_together`` at the end.
"""

from __future__ import annotations

import copy
from typing import TYPE_CHECKING, Any

import numpy as np
import pyarrow as pa

from worker.profiling.native import relation_sums
from worker.profiling.relations.association import (
    GroupMoments,
    LabelCodes,
    PairCounts,
    cramers_v,
    eta,
)
from worker.profiling.relations.comoments import CoMoments
from worker.profiling.relations.crosstab import crosstab_statistics
from worker.profiling.relations.missing_together import MissingTogether
from worker.profiling.relations.sample import RowSample
from worker.profiling.relations.twins import twin

if TYPE_CHECKING:
    from worker.profiling.options import ProfileOptions
    from worker.profiling.prepared import PreparedBatch

NUMERIC_KINDS = frozenset({"numeric"})
LABEL_KINDS = frozenset({"categorical", "boolean"})


class RelationsState:
    """Mergeable across-column statistics over numeric and label candidate columns."""

    def __init__(self, numeric: list[str], labels: list[str], options: ProfileOptions) -> None:
        self.options = options
        relations = options.relations
        self.numeric = list(numeric)[: relations.pair_columns]
        self.labels = list(labels)[: relations.pair_columns]
        self.comoments = CoMoments(self.numeric)
        sample_rows = min(
            relations.rank_sample_rows, relations.rank_sample_cells // max(len(self.numeric), 1)
        )
        self.sample = RowSample(self.numeric, max(sample_rows, 10))
        self.codes = LabelCodes(self.labels, relations.label_bound)
        self.pair_counts = PairCounts(self.labels)
        self.groups = GroupMoments(self.numeric)
        self.missing: MissingTogether | None = None

    def update(self, batch: PreparedBatch) -> None:
        """Add one prepared batch."""
        if self.missing is None:
            self.missing = MissingTogether(list(batch.missing))
        self.missing.update(batch.missing)
        rows = batch.raw.num_rows
        # A column the batch did not parse (the engine's plan changed) counts as missing here.
        numbers = {
            name: batch.numbers[name] if name in batch.numbers else np.full(rows, np.nan)
            for name in self.numeric
        }
        self.sample.update(numbers, batch.offset)
        codes = self.codes.encode(
            {
                name: batch.encoded.get(name, batch.labels[name])
                if name in batch.labels
                else pa.nulls(rows, pa.string())
                for name in self.labels
            }
        )
        names = list(codes)
        sizes = {name: len(self.codes.index[name]) for name in self.labels}
        sums = relation_sums(
            [numbers[name] for name in self.numeric],
            [codes[name] for name in names],
            [sizes[name] for name in names],
        )
        self.comoments.add(sums)
        self.pair_counts.add(sums, names, sizes)
        self.groups.add(sums, names, sizes)

    def merge(self, other: RelationsState) -> RelationsState:
        """Combine with a state over other rows of the same table (neither is changed)."""
        if other.numeric != self.numeric or other.labels != self.labels:
            raise ValueError("relations states over different columns cannot be merged")
        merged = copy.deepcopy(self)
        merged.comoments = self.comoments.merge(other.comoments)
        merged.sample = self.sample.merge(other.sample)
        remap = merged.codes.remap(other.codes)
        sizes = {name: len(merged.codes.index[name]) for name in self.labels}
        merged.pair_counts = merged.pair_counts.merge(other.pair_counts, remap, sizes)
        merged.groups = merged.groups.merge(other.groups, remap, sizes)
        if self.missing is None or other.missing is None:
            merged.missing = self.missing or other.missing
        else:
            merged.missing = self.missing.merge(other.missing)
        return merged

    def finalize(
        self, kinds: dict[str, str], spearman: list[dict[str, Any]] | None = None
    ) -> dict[str, Any]:
        """The profile's "pairs", "twins", "crosstabs" and "missing_together".

        ``spearman``, when given, is ``self.spearman()`` computed beforehand (it
        needs no kinds, so it can run beside the column summaries); the pairs of
        columns whose kind is not numeric are left out here either way.
        """
        relations, thresholds = self.options.relations, self.options.thresholds
        numeric = [name for name in self.numeric if kinds.get(name) in NUMERIC_KINDS]
        labels = [
            name
            for name in self.labels
            if kinds.get(name) in LABEL_KINDS and name not in self.codes.dropped
        ]
        self.pair_counts.drop(self.codes.dropped)
        self.groups.drop(self.codes.dropped)
        pairs: list[dict[str, Any]] = []
        twins: list[dict[str, Any]] = []
        for a, b, moments in self.comoments.pairs():
            if a not in numeric or b not in numeric:
                continue
            pairs.append({"a": a, "b": b, "method": "pearson", "value": moments.r, "n": moments.n})
            found = twin(
                a, b, moments, threshold=thresholds.twin_r, tolerance=relations.unit_tolerance
            )
            if found is not None:
                twins.append(found)
        if spearman is None:
            spearman = self.spearman(numeric)
        pairs.extend(doc for doc in spearman if doc["a"] in numeric and doc["b"] in numeric)
        crosstabs = []
        for (a, b), table in self.pair_counts.counts.items():
            if a not in labels or b not in labels:
                continue
            pairs.append(
                {
                    "a": a,
                    "b": b,
                    "method": "cramers_v",
                    "value": cramers_v(table),
                    "n": int(table.sum()),
                }
            )
            if max(np.count_nonzero(table.sum(axis=1)), np.count_nonzero(table.sum(axis=0))) <= (
                relations.crosstab_max_labels
            ):
                doc = crosstab_statistics(
                    a,
                    b,
                    self.codes.index[a].labels,
                    self.codes.index[b].labels,
                    table,
                    min_expected=thresholds.cochran_min_expected,
                    low_share=thresholds.cochran_low_share,
                )
                if doc is not None:
                    crosstabs.append(doc)
        for (num_name, label_name), (n, mean, m2) in self.groups.pairs():
            if num_name not in numeric or label_name not in labels:
                continue
            value, count = eta(n, mean, m2)
            pairs.append(
                {"a": num_name, "b": label_name, "method": "eta", "value": value, "n": count}
            )
        crosstabs.sort(key=lambda doc: (-doc["cramers_v"], doc["a"], doc["b"]))
        min_phi = relations.missing_together_phi
        return {
            "pairs": [pair for pair in pairs if pair["value"] is not None],
            "twins": twins,
            "crosstabs": crosstabs[: relations.crosstab_limit],
            "missing_together": self.missing.finalize(min_phi) if self.missing else [],
        }

    def spearman(self, numeric: list[str] | None = None) -> list[dict[str, Any]]:
        """Spearman's rho of every pair of ``numeric`` (by default every numeric candidate)
        on the row sample (every row while the table fits in it).

        Each column is sorted once; a pair's ranks over its complete rows are
        then read off that order in linear time (ties get their average rank,
        as scipy.stats.rankdata gives).
        """
        numeric = self.numeric if numeric is None else numeric
        sample = self.sample
        exact = sample.exact
        values = {name: sample.column(name) for name in numeric}
        present = {name: ~np.isnan(column) for name, column in values.items()}
        order = {name: np.argsort(column, kind="stable") for name, column in values.items()}
        whole = [name for name in numeric if present[name].all()]
        # Columns without a missing value in the sample: one rank matrix, one correlation.
        matrix: dict[tuple[str, str], float] = {}
        if len(whole) >= 2 and len(values[whole[0]]) > 2:
            ranks = np.column_stack([_ranks_within(values[n], order[n], present[n]) for n in whole])
            with np.errstate(invalid="ignore", divide="ignore"):
                rho_matrix = np.corrcoef(ranks, rowvar=False)
            for i, a in enumerate(whole):
                for j in range(i + 1, len(whole)):
                    matrix[(a, whole[j])] = float(np.clip(rho_matrix[i, j], -1.0, 1.0))
        out = []
        for i, a in enumerate(numeric):
            for b in numeric[i + 1 :]:
                both = present[a] & present[b]
                n = int(both.sum())
                rho = None
                if (a, b) in matrix:
                    rho = None if np.isnan(matrix[(a, b)]) else matrix[(a, b)]
                elif n > 2:
                    ra = _ranks_within(values[a], order[a], both)
                    rb = _ranks_within(values[b], order[b], both)
                    rho = _pearson(ra, rb)
                doc: dict[str, Any] = {"a": a, "b": b, "method": "spearman", "value": rho, "n": n}
                doc["exact"] = exact
                if not exact:
                    doc["sample"] = len(values[a])
                out.append(doc)
        return out


def _ranks_within(values: np.ndarray, order: np.ndarray, keep: np.ndarray) -> np.ndarray:
    """Average ranks (1-based) of values[keep], in row order, from the sorting ``order``."""
    chosen = order[keep[order]]  # rows kept, in ascending order of value
    ordered = values[chosen]
    starts = np.flatnonzero(np.r_[True, ordered[1:] != ordered[:-1]])
    sizes = np.diff(np.r_[starts, len(ordered)])
    average = starts + (sizes + 1) / 2.0
    ranks = np.empty(len(values))
    ranks[chosen] = np.repeat(average, sizes)
    return ranks[keep]


def _pearson(x: np.ndarray, y: np.ndarray) -> float | None:
    dx, dy = x - x.mean(), y - y.mean()
    denominator = np.sqrt((dx * dx).sum() * (dy * dy).sum())
    if denominator <= 0:
        return None
    return float(np.clip((dx * dy).sum() / denominator, -1.0, 1.0))
