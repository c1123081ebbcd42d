"""Pairs of columns missing in the same rows, checked against pandas."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

from worker.profiling.relations.missing_together import MissingTogether


def planted() -> pd.DataFrame:
    # A planted fault: "depth" and "salinity" come from the same probe and fail together.
    rng = np.random.default_rng(8)
    n = 4000
    probe_down = rng.random(n) < 0.15
    return pd.DataFrame(
        {
            "depth": probe_down | (rng.random(n) < 0.01),
            "salinity": probe_down,
            "site": rng.random(n) < 0.2,
            "notes": np.zeros(n, dtype=bool),
        }
    )


def test_planted_pair_is_listed_with_phi_and_jaccard() -> None:
    masks = planted()
    state = MissingTogether(list(masks.columns))
    for lo in range(0, len(masks), 512):
        state.update({name: masks[name].to_numpy()[lo : lo + 512] for name in masks.columns})
    found = state.finalize(0.5)
    assert [(item["a"], item["b"]) for item in found] == [("depth", "salinity")]
    item = found[0]
    both = int((masks["depth"] & masks["salinity"]).sum())
    either = int((masks["depth"] | masks["salinity"]).sum())
    assert item["both"] == both
    assert item["jaccard"] == pytest.approx(both / either)
    # Reference: pandas; phi is Pearson's r of the two 0/1 masks.
    assert item["phi"] == pytest.approx(masks.astype(float).corr().loc["depth", "salinity"])


def test_all_pairs_phi_matches_pandas_and_merge_adds() -> None:
    masks = planted()
    names = list(masks.columns)
    left, right = MissingTogether(names), MissingTogether(names)
    left.update({name: masks[name].to_numpy()[:1500] for name in names})
    right.update({name: masks[name].to_numpy()[1500:] for name in names})
    merged = left.merge(right)
    found = {(item["a"], item["b"]): item["phi"] for item in merged.finalize(-1.0)}
    expected = masks.astype(float).corr()  # pandas
    assert found[("depth", "site")] == pytest.approx(expected.loc["depth", "site"], abs=1e-12)
    assert ("site", "notes") not in found  # never missing together
    assert merged.rows == len(masks)


@pytest.mark.parametrize("columns", [3, 64, 70])
def test_pair_counts_match_a_product_of_the_masks(columns) -> None:
    # Up to 64 columns the rows are grouped by pattern, above that one float product:
    # both must give numpy's integer product of the 0/1 masks.
    rng = np.random.default_rng(columns)
    masks = rng.random((3000, columns)) < rng.uniform(0.01, 0.3, columns)
    state = MissingTogether([f"c{i}" for i in range(columns)])
    state.update({f"c{i}": masks[:, i] for i in range(columns)})
    ints = masks.astype(np.int64)
    assert (state.both == ints.T @ ints).all()


def test_columns_without_gaps_are_left_out_of_the_product_alone() -> None:
    # Columns 1 and 3 are never missing, and the second batch misses nothing at all:
    # the counts must still be numpy's product of the 0/1 masks over every batch.
    rng = np.random.default_rng(4)
    masks = rng.random((2000, 5)) < 0.1
    masks[:, [1, 3]] = False
    masks[800:1200] = False
    state = MissingTogether([f"c{i}" for i in range(5)])
    for lo in (0, 800, 1200):
        hi = {0: 800, 800: 1200, 1200: 2000}[lo]
        state.update({f"c{i}": masks[lo:hi, i] for i in range(5)})
    ints = masks.astype(np.int64)
    assert (state.both == ints.T @ ints).all() and state.rows == 2000
