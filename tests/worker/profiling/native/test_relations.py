"""The compiled across-column sums against direct numpy and pandas computations."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

from worker.profiling.native import _kernels, relation_sums


def planted(rows: int, seed: int) -> tuple[list[np.ndarray], list[np.ndarray], list[int]]:
    """Three numeric columns with gaps and two label columns with missing codes."""
    rng = np.random.default_rng(seed)
    x = [rng.normal(1e6, 3, rows), rng.normal(-2, 1, rows), rng.exponential(5, rows)]
    for column, share in zip(x, (0.05, 0.0, 0.2), strict=True):
        column[rng.random(rows) < share] = np.nan
    x[2][rng.random(rows) < 0.01] = np.inf  # not finite: missing, as the parser gives NaN
    codes = [rng.integers(-1, 4, rows), rng.integers(-1, 3, rows)]
    return x, codes, [4, 3]


@pytest.mark.parametrize("rows", [1, 777, 2048, 5000])
def test_pair_sums_match_numpy_over_pairwise_complete_rows(rows) -> None:
    # The block length of the pass is 2048 rows: sizes below, at and above it.
    x, codes, sizes = planted(rows, rows)
    found = relation_sums(x, codes, sizes)
    present = [np.isfinite(column) for column in x]
    for i, xi in enumerate(x):
        # The center: the mean of the present values in the first 2,048 rows (the
        # pass's first block), or of all rows when fewer than 32 are present there.
        first = present[i][:2048]
        centered_on_first = first.sum() >= 32 or rows <= 2048
        values = xi[:2048][first] if centered_on_first else xi[present[i]]
        center = values.mean() if values.size else 0.0
        assert found.shift[i] == pytest.approx(center)
        z_i = np.where(present[i], xi - found.shift[i], 0.0)
        for j in range(len(x)):
            both = present[i] & present[j]
            z_j = np.where(present[j], x[j] - found.shift[j], 0.0)
            assert found.counts[i, j] == both.sum()
            assert found.sums[i, j] == pytest.approx(z_i[both].sum(), abs=1e-9 * rows)
            assert found.squares[i, j] == pytest.approx((z_i[both] ** 2).sum(), rel=1e-12)
            assert found.cross[i, j] == pytest.approx((z_i * z_j).sum(), rel=1e-9, abs=1e-9)


def test_group_sums_and_tables_match_pandas() -> None:
    x, codes, sizes = planted(6000, 3)
    found = relation_sums(x, codes, sizes)
    frame = pd.DataFrame({f"x{i}": column for i, column in enumerate(x)})
    frame = frame.replace([np.inf], np.nan)
    start = 0
    for label, size in zip(codes, sizes, strict=True):
        for j in range(len(x)):
            shifted = frame[f"x{j}"] - found.shift[j]
            groups = shifted.groupby(label)  # reference: pandas groupby, missing skipped
            for code in range(size):
                assert found.group_counts[start + code, j] == groups.count().get(code, 0)
                assert found.group_sums[start + code, j] == pytest.approx(
                    groups.sum().get(code, 0.0), abs=1e-9
                )
                assert found.group_squares[start + code, j] == pytest.approx(
                    (shifted**2).groupby(label).sum().get(code, 0.0), rel=1e-12
                )
        start += size
    both = (codes[0] >= 0) & (codes[1] >= 0)
    expected = pd.crosstab(codes[0][both], codes[1][both]).to_numpy()  # pandas
    assert (found.tables[0] == expected).all()


def test_codes_past_their_size_are_skipped() -> None:
    found = relation_sums([np.ones(4)], [np.array([0, 1, 7, -1]), np.array([2, 0, 0, 9])], [2, 3])
    # First column: labels 0 and 1 (row 2's 7 skipped); second: 0 twice, 2 once (9 skipped).
    assert found.group_counts[:, 0].tolist() == [1, 1, 2, 0, 1]
    assert found.tables[0].tolist() == [[0, 0, 1], [1, 0, 0]]


def test_only_labels_or_no_columns() -> None:
    found = relation_sums([], [np.array([0, 0, 1])], [2])
    assert found.counts.shape == (0, 0)
    assert found.group_counts.shape == (2, 0)
    empty = relation_sums([], [], [])
    assert empty.tables == []


def test_columns_of_different_lengths_or_short_buffers_raise() -> None:
    with pytest.raises(ValueError, match="same rows"):
        relation_sums([np.ones(3), np.ones(4)], [], [])
    outputs = [np.zeros(8) for _ in range(12)]
    with pytest.raises(ValueError, match="numeric column"):
        _kernels.relation_sums(
            10,
            [np.ones(3)],
            [],
            np.zeros(0, np.int64),
            np.zeros(0, np.int64),
            np.zeros(0, np.int64),
            outputs,
        )
    with pytest.raises(ValueError, match="outputs"):
        _kernels.relation_sums(
            3,
            [np.ones(3)],
            [],
            np.zeros(0, np.int64),
            np.zeros(0, np.int64),
            np.zeros(0, np.int64),
            outputs[:5],
        )


def test_spread_stays_exact_when_the_first_block_is_far_from_the_mean() -> None:
    # A sorted column (a ramp on a large offset: its first block's mean lies far from the
    # batch mean) and one missing throughout the first block (centered on all its values):
    # the spread from the shifted sums must match numpy's two-pass sum of squares.
    rows = 50_000
    ramp = 1e9 + np.arange(rows, dtype=float)
    late = np.full(rows, np.nan)
    late[3000:] = 5e8 + np.random.default_rng(2).normal(0, 1, rows - 3000)
    found = relation_sums([ramp, late], [], [])
    assert found.shift[1] == pytest.approx(np.nanmean(late), rel=1e-12)
    for i, column in enumerate((ramp, late)):
        kept = column[np.isfinite(column)]
        m2 = found.squares[i, i] - found.sums[i, i] ** 2 / found.counts[i, i]
        assert m2 == pytest.approx(((kept - kept.mean()) ** 2).sum(), rel=1e-12)  # numpy
