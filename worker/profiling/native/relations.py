"""The across-column sums of one batch, from the compiled pass in ``relations.c``."""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from worker.profiling.native import _kernels


@dataclass(frozen=True)
class RelationSums:
    """One batch's sums over values shifted by a center of each column (``shift``: the
    mean of its present values in the first 2,048 rows, see ``relations.c``).

    Numeric columns i, j: ``counts[i, j]`` rows where both are present, and over
    those rows ``sums[i, j]`` = Σ zᵢ, ``squares[i, j]`` = Σ zᵢ², ``cross[i, j]`` =
    Σ zᵢ zⱼ. Labels (one row per label of every label column, the columns one
    after another): ``group_counts``, ``group_sums`` and ``group_squares`` of each
    numeric column over the rows with that label where it is present.
    ``tables``: the label-pair counts, (labels of a) × (labels of b), for each pair
    of label columns a before b.
    """

    shift: np.ndarray
    counts: np.ndarray
    sums: np.ndarray
    squares: np.ndarray
    cross: np.ndarray
    group_counts: np.ndarray
    group_sums: np.ndarray
    group_squares: np.ndarray
    tables: list[np.ndarray]


def relation_sums(
    values: Sequence[np.ndarray], codes: Sequence[np.ndarray], sizes: Sequence[int]
) -> RelationSums:
    """Sums of one batch: ``values`` are the numeric columns (NaN where missing),
    ``codes`` each label column's codes (-1 where missing, below its entry in ``sizes``).
    """
    rows = len(values[0]) if values else len(codes[0]) if codes else 0
    x = [np.ascontiguousarray(column, dtype=np.float64) for column in values]
    c = [np.ascontiguousarray(column, dtype=np.int64) for column in codes]
    if any(len(column) != rows for column in [*x, *c]):
        raise ValueError("every column of a batch must have the same rows")
    p, k = len(x), len(c)
    size = np.asarray(sizes, dtype=np.int64).reshape(k)
    bases = np.concatenate([[0], np.cumsum(size)]).astype(np.int64)
    pairs = [(a, b) for a in range(k) for b in range(a + 1, k)]
    cells = np.array([size[a] * size[b] for a, b in pairs], dtype=np.int64)
    pair_offsets = np.concatenate([[0], np.cumsum(cells)])[:-1].astype(np.int64)
    labels = int(bases[-1])
    outputs = [
        np.zeros(p),  # shift
        np.zeros(p, dtype=np.int64),  # n
        np.zeros(p),  # s
        np.zeros(p),  # q
        np.zeros((p, p)),  # cross, i < j
        np.zeros((p, p), dtype=np.int64),  # lost n
        np.zeros((p, p)),  # lost s
        np.zeros((p, p)),  # lost q
        np.zeros((labels, p), dtype=np.int64),  # gn
        np.zeros((labels, p)),  # gs
        np.zeros((labels, p)),  # gq
        np.zeros(int(cells.sum()), dtype=np.int64),  # tables
    ]
    _kernels.relation_sums(rows, x, c, bases[:k], size, pair_offsets, outputs)
    shift, n, s, q, upper, lost_n, lost_s, lost_q, gn, gs, gq, tables = outputs
    squares = q[:, None] - lost_q
    cross = upper + upper.T
    np.fill_diagonal(cross, np.diagonal(squares))
    return RelationSums(
        shift=shift,
        counts=n[:, None] - lost_n,
        sums=s[:, None] - lost_s,
        squares=squares,
        cross=cross,
        group_counts=gn,
        group_sums=gs,
        group_squares=gq,
        tables=[
            tables[offset : offset + size[a] * size[b]].reshape(size[a], size[b])
            for (a, b), offset in zip(pairs, pair_offsets, strict=True)
        ],
    )
