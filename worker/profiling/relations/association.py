"""Cramér's V for label pairs and the correlation ratio eta for numeric–label pairs.

Both come from exact, mergeable counts. Each batch dictionary-encodes every
label column (Arrow) and maps the batch's dictionary to a growing global label
index; one compiled pass over the codes and the numbers
(``worker.profiling.native.relation_sums``) then counts every pair of codes and
sums every numeric column per label. A column
that shows more labels than ``label_bound`` is dropped from counting: V and eta
over hundreds of labels mean little and cost much.

References: Cramér (1946), "Mathematical Methods of Statistics", §21.9;
Pearson (1903) and Fisher (1925) for the correlation ratio eta; scipy's
``scipy.stats.contingency.association`` (method "cramer") is the reference
implementation V is checked against.
"""

from __future__ import annotations

from collections.abc import Mapping

import numpy as np
import pyarrow as pa

from worker.profiling.native import RelationSums, dictionary_encode
from worker.profiling.relations.crosstab import chi_square_statistic, expected_counts


class LabelIndex:
    """Global codes for the labels of one column, in order of first appearance."""

    def __init__(self) -> None:
        self.labels: list[str] = []
        self._codes: dict[str, int] = {}

    def __len__(self) -> int:
        return len(self.labels)

    def code(self, label: str) -> int:
        found = self._codes.get(label)
        if found is None:
            found = self._codes[label] = len(self.labels)
            self.labels.append(label)
        return found

    def encode(self, array: pa.Array, bound: int) -> np.ndarray | None:
        """Global codes per row (-1 where null), or None once the column passes ``bound``.

        ``array`` is text, or text already dictionary-encoded (then used as is)."""
        encoded = array if pa.types.is_dictionary(array.type) else dictionary_encode(array)
        if isinstance(encoded, pa.ChunkedArray):
            encoded = encoded.combine_chunks()
        dictionary = encoded.dictionary.to_pylist()
        if len(dictionary) > bound:
            return None
        mapping = np.array([self.code(label) for label in dictionary] + [-1], dtype=np.int64)
        if len(self.labels) > bound:
            return None
        indices = encoded.indices
        if indices.null_count:  # nulls take the last code of the mapping, -1
            indices = indices.fill_null(len(dictionary))
        indices = indices.to_numpy(zero_copy_only=False)
        return mapping[indices]


def _grow(matrix: np.ndarray, rows: int, cols: int) -> np.ndarray:
    if matrix.shape == (rows, cols):
        return matrix
    grown = np.zeros((rows, cols), dtype=matrix.dtype)
    grown[: matrix.shape[0], : matrix.shape[1]] = matrix
    return grown


class LabelCodes:
    """The global label index of every label column, and which columns passed the bound."""

    def __init__(self, columns: list[str], bound: int) -> None:
        self.columns = list(columns)
        self.bound = bound
        self.index = {name: LabelIndex() for name in self.columns}
        self.dropped: set[str] = set()

    def encode(self, labels: Mapping[str, pa.Array]) -> dict[str, np.ndarray]:
        """Codes per row of each column still counted in this batch (-1 where missing)."""
        codes = {}
        for name in self.columns:
            if name in self.dropped:
                continue
            encoded = self.index[name].encode(labels[name], self.bound)
            if encoded is None:
                self.dropped.add(name)
            else:
                codes[name] = encoded
        return codes

    def remap(self, other: LabelCodes) -> dict[str, np.ndarray]:
        """For each column, other's codes mapped to this index (adding labels it lacks)."""
        self.dropped |= other.dropped
        out = {}
        for name in self.columns:
            mapping = [self.index[name].code(label) for label in other.index[name].labels]
            out[name] = np.array(mapping, dtype=np.int64)
            if len(self.index[name]) > self.bound:
                self.dropped.add(name)
        return out


class PairCounts:
    """Exact contingency counts of every pair of label columns (pairwise-complete rows)."""

    def __init__(self, columns: list[str]) -> None:
        self.columns = list(columns)
        self.counts: dict[tuple[str, str], np.ndarray] = {}

    def add(self, sums: RelationSums, names: list[str], sizes: Mapping[str, int]) -> None:
        """Add one batch's tables: ``sums.tables`` holds one per pair of ``names``
        (the label columns counted in this batch, in this state's order)."""
        pairs = [(a, b) for i, a in enumerate(names) for b in names[i + 1 :]]
        for (a, b), table in zip(pairs, sums.tables, strict=True):
            previous = self.counts.get((a, b), np.zeros((0, 0), dtype=np.int64))
            self.counts[(a, b)] = _grow(previous, sizes[a], sizes[b]) + table

    def merge(
        self, other: PairCounts, remap: Mapping[str, np.ndarray], sizes: Mapping[str, int]
    ) -> PairCounts:
        """Add other's tables, whose label codes ``remap`` maps onto this state's."""
        merged = PairCounts(self.columns)
        for key in [*self.counts, *(k for k in other.counts if k not in self.counts)]:
            a, b = key
            table = _grow(self.counts.get(key, np.zeros((0, 0), np.int64)), sizes[a], sizes[b])
            if key in other.counts:
                theirs = other.counts[key]
                ia = remap[a][: theirs.shape[0]]
                ib = remap[b][: theirs.shape[1]]
                np.add.at(table, (ia[:, None], ib[None, :]), theirs)
            merged.counts[key] = table
        return merged

    def drop(self, dropped: set[str]) -> None:
        for key in list(self.counts):
            if key[0] in dropped or key[1] in dropped:
                del self.counts[key]


class GroupMoments:
    """Per label, the n, mean and squared deviations of each numeric column (for eta).

    For each label column: three (labels × numeric columns) matrices. Kept as
    mean and M2 rather than raw sums of squares and merged with Chan's update,
    so large offsets do not cancel.
    """

    def __init__(self, numeric: list[str]) -> None:
        self.numeric = list(numeric)
        self.stats: dict[str, tuple[np.ndarray, np.ndarray, np.ndarray]] = {}

    def add(self, sums: RelationSums, names: list[str], sizes: Mapping[str, int]) -> None:
        """Add one batch's per-label sums: ``sums.group_*`` hold the labels of every
        column of ``names`` one after another (values shifted by ``sums.shift``, so the
        squares do not swamp the spread)."""
        if not self.numeric or not names:
            return
        n = sums.group_counts
        with np.errstate(invalid="ignore", divide="ignore"):
            inner = np.where(n > 0, sums.group_sums / n, 0.0)
        m2 = np.maximum(sums.group_squares - sums.group_sums * inner, 0.0)
        mean = np.where(n > 0, inner + sums.shift, 0.0)
        start = 0
        for label_name in names:
            block = slice(start, start + sizes[label_name])
            start = block.stop
            self._absorb(label_name, (n[block], mean[block], m2[block]), sizes[label_name])

    def _absorb(self, label_name: str, batch, size: int, remap: np.ndarray | None = None):
        n_b, mean_b, m2_b = batch
        if remap is not None:
            n_b, mean_b, m2_b = (_scatter(v, remap, size) for v in (n_b, mean_b, m2_b))
        width = len(self.numeric)
        old = self.stats.get(label_name)
        if old is None:
            old = (np.zeros((size, width)),) * 3
        n_a, mean_a, m2_a = (_pad(v, size) for v in old)
        n_b, mean_b, m2_b = (_pad(v, size) for v in (n_b, mean_b, m2_b))
        n = n_a + n_b
        delta = mean_b - mean_a
        with np.errstate(invalid="ignore", divide="ignore"):
            mean = np.where(n > 0, mean_a + delta * np.where(n > 0, n_b / n, 0.0), 0.0)
            m2 = m2_a + m2_b + np.where(n > 0, delta * delta * n_a * n_b / n, 0.0)
        self.stats[label_name] = (n, mean, m2)

    def merge(
        self, other: GroupMoments, remap: Mapping[str, np.ndarray], sizes: Mapping[str, int]
    ) -> GroupMoments:
        """Chan-merge other's per-label moments, whose codes ``remap`` maps onto this state's."""
        merged = GroupMoments(self.numeric)
        merged.stats = dict(self.stats)
        for label_name, value in other.stats.items():
            merged._absorb(label_name, value, sizes[label_name], remap[label_name])
        return merged

    def drop(self, dropped: set[str]) -> None:
        for label_name in list(self.stats):
            if label_name in dropped:
                del self.stats[label_name]

    def pairs(self):
        """((numeric column, label column), (n, mean, m2) per label) for every pair."""
        for label_name, (n, mean, m2) in self.stats.items():
            for j, num_name in enumerate(self.numeric):
                yield (num_name, label_name), (n[:, j], mean[:, j], m2[:, j])


def _pad(values: np.ndarray, size: int) -> np.ndarray:
    if len(values) >= size:
        return values
    return np.concatenate([values, np.zeros((size - len(values), *values.shape[1:]))])


def _scatter(values: np.ndarray, remap: np.ndarray, size: int) -> np.ndarray:
    out = np.zeros((size, *values.shape[1:]))
    out[remap[: len(values)]] = values
    return out


def eta(n: np.ndarray, mean: np.ndarray, m2: np.ndarray) -> tuple[float | None, int]:
    """Correlation ratio from per-group n, mean and M2: sqrt(between SS / total SS), and n.

    References: Fisher (1925), "Statistical Methods for Research Workers", §45.
    """
    total_n = float(n.sum())
    if total_n < 2 or np.count_nonzero(n) < 2:
        return None, int(total_n)
    grand = float((n * mean).sum() / total_n)
    between = float((n * (mean - grand) ** 2).sum())
    total = between + float(m2.sum())
    if total <= 0:
        return None, int(total_n)
    return float(np.sqrt(min(between / total, 1.0))), int(total_n)


def cramers_v(table: np.ndarray) -> float | None:
    """Cramér's V of a contingency table, as scipy.stats.contingency.association gives.

    Labels never seen with the other column (empty rows or columns) are left
    out first; V is undefined (None) when fewer than two rows or columns remain.
    """
    table = np.asarray(table, dtype=np.float64)
    table = table[table.sum(axis=1) > 0][:, table.sum(axis=0) > 0]
    if min(table.shape) < 2:
        return None
    chi2 = chi_square_statistic(table, expected_counts(table), yates=False)
    return float(np.sqrt(chi2 / (table.sum() * (min(table.shape) - 1))))
