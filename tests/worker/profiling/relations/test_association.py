"""Cramér's V and eta from mergeable counts, checked against scipy."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pyarrow as pa
import pytest
from scipy.stats import f_oneway
from scipy.stats.contingency import association

from worker.profiling.native import relation_sums
from worker.profiling.relations.association import (
    GroupMoments,
    LabelCodes,
    PairCounts,
    cramers_v,
    eta,
)


@pytest.mark.parametrize("shape", [(2, 2), (3, 4), (5, 2), (6, 6)])
def test_cramers_v_matches_scipy(shape) -> None:
    rng = np.random.default_rng(sum(shape))
    table = rng.integers(1, 60, size=shape)
    # Reference: scipy.stats.contingency.association(method="cramer").
    assert cramers_v(table) == pytest.approx(association(table, method="cramer"), rel=1e-12)


def test_cramers_v_leaves_out_empty_labels() -> None:
    table = np.array([[10, 0, 5], [0, 0, 0], [3, 0, 9]])
    reference = association(np.array([[10, 5], [3, 9]]), method="cramer")  # scipy
    assert cramers_v(table) == pytest.approx(reference, rel=1e-12)
    assert cramers_v(np.array([[4, 5]])) is None


def count_pairs(a: list, b: list, batch_rows: int, bound: int = 50):
    codes = LabelCodes(["a", "b"], bound)
    counts = PairCounts(["a", "b"])
    for lo in range(0, len(a), batch_rows):
        batch = {
            "a": pa.array(a[lo : lo + batch_rows], pa.string()),
            "b": pa.array(b[lo : lo + batch_rows], pa.string()),
        }
        encoded = codes.encode(batch)
        sizes = {name: len(codes.index[name]) for name in codes.columns}
        names = list(encoded)
        sums = relation_sums([], [encoded[n] for n in names], [sizes[n] for n in names])
        counts.add(sums, names, sizes)
    return codes, counts


def test_pair_counts_match_a_direct_count_and_merge() -> None:
    rng = np.random.default_rng(3)
    a = [None if rng.random() < 0.1 else str(v) for v in rng.choice(list("pqrs"), 3000)]
    b = [None if rng.random() < 0.1 else str(v) for v in rng.choice(list("xyz"), 3000)]
    codes, counts = count_pairs(a, b, 250)
    table = counts.counts[("a", "b")]
    for i, la in enumerate(codes.index["a"].labels):
        for j, lb in enumerate(codes.index["b"].labels):
            expected = sum(1 for u, v in zip(a, b, strict=True) if u == la and v == lb)
            assert table[i, j] == expected
    # Two halves counted apart and merged give the same table (by label).
    left_codes, left = count_pairs(a[:1700], b[:1700], 300)
    right_codes, right = count_pairs(a[1700:], b[1700:], 300)
    remap = left_codes.remap(right_codes)
    sizes = {name: len(left_codes.index[name]) for name in left_codes.columns}
    merged = left.merge(right, remap, sizes).counts[("a", "b")]
    for i, la in enumerate(left_codes.index["a"].labels):
        for j, lb in enumerate(left_codes.index["b"].labels):
            ii, jj = codes.index["a"].labels.index(la), codes.index["b"].labels.index(lb)
            assert merged[i, j] == table[ii, jj]


def test_column_past_the_bound_is_dropped() -> None:
    a = [str(i) for i in range(100)]
    b = ["x", "y"] * 50
    codes, counts = count_pairs(a, b, 30, bound=40)
    assert codes.dropped == {"a"}
    counts.drop(codes.dropped)
    assert counts.counts == {}


def test_eta_matches_direct_sums_and_one_way_anova() -> None:
    rng = np.random.default_rng(11)
    groups = rng.choice(["north", "south", "east"], 2000)
    shift = {"north": 0.0, "south": 1.5, "east": -0.7}
    x = np.array([shift[g] for g in groups]) + rng.normal(1000, 1, 2000)
    codes = LabelCodes(["g"], 10)
    moments = GroupMoments(["x"])
    for lo in range(0, 2000, 300):
        encoded = codes.encode({"g": pa.array(groups[lo : lo + 300])})
        sizes = {"g": len(codes.index["g"])}
        moments.add(relation_sums([x[lo : lo + 300]], [encoded["g"]], [sizes["g"]]), ["g"], sizes)
    value, n = eta(*dict(moments.pairs())[("x", "g")])
    assert n == 2000
    # Direct computation: eta = sqrt(between-group SS / total SS) (Fisher 1925).
    grand = x.mean()
    between = sum((groups == g).sum() * (x[groups == g].mean() - grand) ** 2 for g in set(groups))
    total = ((x - grand) ** 2).sum()
    assert value == pytest.approx(np.sqrt(between / total), rel=1e-9)
    # Reference: scipy.stats.f_oneway; eta² = F(k-1) / (F(k-1) + N-k).
    f = f_oneway(*(x[groups == g] for g in ("north", "south", "east"))).statistic
    assert value**2 == pytest.approx(f * 2 / (f * 2 + 2000 - 3), rel=1e-9)


def test_eta_of_every_pair_skips_missing_numbers_and_labels() -> None:
    # Two label and two numeric columns with gaps, counted together in one pass;
    # reference: pandas groupby over the rows where both cells of a pair are present.
    rng = np.random.default_rng(12)
    rows = 2500
    frame = pd.DataFrame(
        {
            "g": rng.choice(["north", "south", "east"], rows),
            "h": rng.choice(["dry", "reefer", "bulk", "tank"], rows),
            "x": rng.normal(50, 5, rows),
            "y": rng.normal(-3, 2, rows),
        }
    )
    frame["x"] += frame["g"].map({"north": 0.0, "south": 4.0, "east": -2.0})
    frame.loc[rng.random(rows) < 0.08, "x"] = np.nan
    frame.loc[rng.random(rows) < 0.03, "y"] = np.nan
    frame.loc[rng.random(rows) < 0.05, "g"] = None
    frame.loc[rng.random(rows) < 0.10, "h"] = None
    codes = LabelCodes(["g", "h"], 10)
    moments = GroupMoments(["x", "y"])
    for lo in range(0, rows, 400):
        part = frame.iloc[lo : lo + 400]
        encoded = codes.encode({name: pa.array(part[name]) for name in ("g", "h")})
        sizes = {name: len(codes.index[name]) for name in ("g", "h")}
        sums = relation_sums(
            [part[name].to_numpy() for name in ("x", "y")],
            [encoded[name] for name in ("g", "h")],
            [sizes[name] for name in ("g", "h")],
        )
        moments.add(sums, ["g", "h"], sizes)
    found = dict(moments.pairs())
    for number in ("x", "y"):
        for label in ("g", "h"):
            both = frame[[number, label]].dropna()
            grand = both[number].mean()
            groups = both.groupby(label)[number]
            between = float((groups.count() * (groups.mean() - grand) ** 2).sum())
            total = float(((both[number] - grand) ** 2).sum())
            value, n = eta(*found[(number, label)])
            assert n == len(both)
            assert value == pytest.approx(np.sqrt(between / total), rel=1e-9)
