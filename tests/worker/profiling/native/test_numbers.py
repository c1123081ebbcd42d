"""The compiled number pass and HyperLogLog updates against numpy."""

from __future__ import annotations

import numpy as np
import pytest

from worker.profiling.columns.distinct import _SEED, hash_numbers
from worker.profiling.native import hll_add, hll_add_numbers, number_summary

CANDIDATES = np.array([-9999.0, -999.0, -99.0, 0.0, 0.5, 999.0, 9999.0])


def planted(seed: int) -> np.ndarray:
    """Readings with gaps, codes and zeros planted (truth by construction)."""
    rng = np.random.default_rng(seed)
    x = rng.normal(40, 12, 20_001).round(1)
    x[rng.random(x.size) < 0.04] = -999.0
    x[rng.random(x.size) < 0.02] = 0.0
    x[rng.random(x.size) < 0.01] = 0.5
    x[rng.random(x.size) < 0.05] = np.nan
    x[:3] = [np.inf, -np.inf, 9999.0]
    return x


@pytest.mark.parametrize("seed", [1, 2])
def test_summary_matches_numpy(seed) -> None:
    x = planted(seed)
    found = number_summary(x, CANDIDATES)
    kept = x[np.isfinite(x)]  # reference: numpy over the finite values
    assert (found.values == kept).all()
    assert found.n == kept.size
    assert found.total == pytest.approx(kept.sum(), rel=1e-12)
    assert (found.minimum, found.maximum) == (kept.min(), kept.max())
    assert found.mean == pytest.approx(kept.mean(), rel=1e-14)
    deviations = kept - kept.mean()
    for power, value in ((2, found.m2), (3, found.m3), (4, found.m4)):
        assert value == pytest.approx((deviations**power).sum(), rel=1e-9)
    assert found.zeros == np.count_nonzero(kept == 0)
    assert found.negatives == np.count_nonzero(kept < 0)
    assert found.integers is False
    expected = [np.count_nonzero(kept == c) for c in CANDIDATES]
    assert found.candidate_counts.tolist() == expected
    assert expected[1] > 0 and expected[3] > 0 and expected[4] > 0 and expected[6] == 1


def test_a_long_candidate_list_is_counted_as_a_short_one() -> None:
    # A few candidates are counted one pass each, a long list by binary search: both
    # must give numpy's counts (the long list holds every short one's codes).
    x = planted(3)
    kept = x[np.isfinite(x)]
    many = np.unique(np.concatenate([CANDIDATES, np.arange(-30.0, 30.0, 1.5), [-0.0]]))
    assert many.size > 16
    for candidates in (CANDIDATES, many):
        found = number_summary(x, candidates)
        expected = [np.count_nonzero(kept == c) for c in candidates]  # reference: numpy
        assert found.candidate_counts.tolist() == expected


def test_whole_numbers_empty_and_all_missing() -> None:
    whole = number_summary(np.array([3.0, -2.0, 1e300, np.nan]))
    assert whole.integers is True and whole.n == 3
    assert number_summary(np.array([2.0, 2.5])).integers is False
    for empty in (np.empty(0), np.full(5, np.nan)):
        found = number_summary(empty, CANDIDATES)
        assert found.n == 0 and found.values.size == 0
        assert found.candidate_counts.tolist() == [0] * len(CANDIDATES)


def test_candidates_must_be_sorted() -> None:
    with pytest.raises(ValueError, match="sorted"):
        number_summary(np.ones(3), np.array([5.0, 1.0]))


def numpy_registers(hashes: np.ndarray, precision: int) -> np.ndarray:
    """The register update written in numpy: top bits choose, trailing zeros + 1 rank
    (capped), the register keeps the largest (Flajolet et al. 2007)."""
    registers = np.zeros(1 << precision, dtype=np.uint8)
    index = (hashes >> np.uint64(64 - precision)).astype(np.intp)
    lowest = np.bitwise_count(hashes ^ (hashes - np.uint64(1)))
    rank = np.minimum(lowest, 64 - precision + 1).astype(np.uint8)
    np.maximum.at(registers, index, rank)
    return registers


@pytest.mark.parametrize("precision", [4, 14, 16])
def test_hll_registers_match_numpy(precision) -> None:
    rng = np.random.default_rng(precision)
    hashes = rng.integers(0, 2**64, 50_000, dtype=np.uint64)
    hashes[:4] = [0, 1, 2**63, 2**64 - 1]  # no bit set, lowest bit, top bit, every bit
    registers = np.zeros(1 << precision, dtype=np.uint8)
    hll_add(registers, precision, hashes[:20_000])
    hll_add(registers, precision, hashes[20_000:])
    assert (registers == numpy_registers(hashes, precision)).all()


def test_hll_refuses_short_registers_and_bad_precision() -> None:
    with pytest.raises(ValueError, match="registers"):
        hll_add(np.zeros(10, dtype=np.uint8), 14, np.ones(3, dtype=np.uint64))
    with pytest.raises(ValueError, match="precision"):
        hll_add(np.zeros(1 << 4, dtype=np.uint8), 2, np.ones(3, dtype=np.uint64))


def test_numbers_added_in_one_pass_hash_as_the_distinct_counts_hash_them() -> None:
    # The same registers whether the numbers are hashed in numpy first or in the pass.
    rng = np.random.default_rng(4)
    values = np.concatenate([rng.normal(0, 1e3, 30_000).round(2), [0.0, -0.0, np.nan]])
    one_pass = np.zeros(1 << 14, dtype=np.uint8)
    hll_add_numbers(one_pass, 14, values, _SEED)
    two_steps = np.zeros(1 << 14, dtype=np.uint8)
    hll_add(two_steps, 14, hash_numbers(values[~np.isnan(values)]))
    assert (one_pass == two_steps).all()
    assert one_pass.any()
