"""RelationsState end to end over prepared batches, against scipy and pandas."""

from __future__ import annotations

import itertools

import numpy as np
import pandas as pd
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.stats import spearmanr
from scipy.stats.contingency import association

from tests.worker.profiling.relations.batches import prepared_batches
from worker.profiling.options import ProfileOptions
from worker.profiling.relations import RelationsState
from worker.profiling.relations.options import RelationsOptions

NUMERIC = ["air_c", "air_f", "catch_kg"]
LABELS = ["harbour", "boat_class"]
KINDS = {"air_c": "numeric", "air_f": "numeric", "catch_kg": "numeric"}
KINDS |= {"harbour": "categorical", "boat_class": "categorical"}


def landings(rows: int = 3000, seed: int = 6) -> pd.DataFrame:
    """Invented fish-landing records with a planted °C/°F twin pair."""
    rng = np.random.default_rng(seed)
    harbour = rng.choice(["Saltmere", "Cobble Quay", "Widdon"], rows, p=[0.5, 0.3, 0.2])
    boat = np.where(
        harbour == "Widdon", rng.choice(["trawler", "skiff"], rows, p=[0.9, 0.1]), "skiff"
    )
    air = rng.normal(12, 6, rows).round(1)
    catch = rng.gamma(3, 40, rows).round(1) + np.where(boat == "trawler", 200, 0)
    frame = pd.DataFrame(
        {
            "air_c": air,
            "air_f": (air * 1.8 + 32).round(1),
            "catch_kg": catch,
            "harbour": harbour,
            "boat_class": boat,
        }
    )
    frame.loc[rng.random(rows) < 0.08, "catch_kg"] = np.nan
    frame.loc[rng.random(rows) < 0.05, "harbour"] = None
    return frame


def run(frame: pd.DataFrame, options: ProfileOptions, batch_rows: int = 400) -> RelationsState:
    state = RelationsState(NUMERIC, LABELS, options)
    for batch in prepared_batches(frame, NUMERIC, LABELS, batch_rows=batch_rows):
        state.update(batch)
    return state


def by_method(result: dict, method: str) -> dict:
    return {(p["a"], p["b"]): p for p in result["pairs"] if p["method"] == method}


def test_profile_relations_match_references() -> None:
    frame = landings()
    result = run(frame, ProfileOptions()).finalize(KINDS)
    pearson = by_method(result, "pearson")
    reference = frame[NUMERIC].corr()  # pandas, pairwise-complete rows
    assert pearson[("air_c", "catch_kg")]["value"] == pytest.approx(
        reference.loc["air_c", "catch_kg"], rel=1e-9
    )
    spearman = by_method(result, "spearman")
    both = frame[["air_f", "catch_kg"]].dropna()
    rho = spearmanr(both["air_f"], both["catch_kg"]).statistic  # scipy
    assert spearman[("air_f", "catch_kg")]["value"] == pytest.approx(rho, rel=1e-12)
    assert spearman[("air_f", "catch_kg")]["exact"] is True
    cramer = by_method(result, "cramers_v")[("harbour", "boat_class")]
    table = pd.crosstab(frame["harbour"], frame["boat_class"]).to_numpy()  # pandas counts
    assert cramer["value"] == pytest.approx(association(table, method="cramer"), rel=1e-12)
    assert cramer["n"] == int(table.sum())
    etas = by_method(result, "eta")
    assert etas[("catch_kg", "boat_class")]["value"] > 0.7
    assert [(t["a"], t["b"], t["hint"]) for t in result["twins"]] == [
        ("air_c", "air_f", "air_c in °C, air_f in °F")
    ]
    (crosstab,) = result["crosstabs"]
    assert (
        crosstab["counts"]["matrix"]
        == pd.crosstab(frame["harbour"], frame["boat_class"]).to_numpy().tolist()
    )
    # Widdon is where the trawlers are: that cell is over-represented.
    labels = crosstab["counts"]
    i, j = labels["a_labels"].index("Widdon"), labels["b_labels"].index("trawler")
    assert crosstab["residuals"][i][j] > 10


def test_spearman_on_a_sample_states_its_size() -> None:
    frame = landings(2000)
    options = ProfileOptions(relations=RelationsOptions(rank_sample_rows=500))
    pair = by_method(run(frame, options).finalize(KINDS), "spearman")[("air_c", "air_f")]
    assert pair["exact"] is False
    assert pair["sample"] == 500
    assert pair["value"] == pytest.approx(1.0, abs=1e-3)


def test_final_kinds_decide_which_pairs_are_reported() -> None:
    frame = landings(500)
    kinds = KINDS | {"air_f": "text", "harbour": "identifier"}
    result = run(frame, ProfileOptions()).finalize(kinds)
    names = {name for pair in result["pairs"] for name in (pair["a"], pair["b"])}
    assert "air_f" not in names and "harbour" not in names
    assert result["twins"] == [] and result["crosstabs"] == []


@settings(max_examples=15, deadline=None)
@given(cuts=st.lists(st.integers(1, 599), min_size=1, max_size=3), seed=st.integers(0, 50))
def test_chunks_merged_equal_one_pass(cuts, seed) -> None:
    frame = landings(600, seed)
    options = ProfileOptions(relations=RelationsOptions(rank_sample_rows=200))
    one = run(frame, options).finalize(KINDS)
    bounds = sorted({0, 600, *cuts})
    states = []
    for lo, hi in itertools.pairwise(bounds):
        state = RelationsState(NUMERIC, LABELS, options)
        for batch in prepared_batches(frame.iloc[lo:hi], NUMERIC, LABELS, batch_rows=97):
            state.update(type(batch)(**{**batch.__dict__, "offset": batch.offset + lo}))
        states.append(state)
    merged = states[0]
    for state in states[1:]:
        merged = merged.merge(state)
    result = merged.finalize(KINDS)
    assert len(result["pairs"]) == len(one["pairs"])
    for mine, theirs in zip(result["pairs"], one["pairs"], strict=True):
        assert (mine["a"], mine["b"], mine["method"], mine["n"]) == (
            theirs["a"],
            theirs["b"],
            theirs["method"],
            theirs["n"],
        )
        assert mine["value"] == pytest.approx(theirs["value"], rel=1e-9)
    assert [c["counts"] for c in result["crosstabs"]] == [c["counts"] for c in one["crosstabs"]]
    assert result["missing_together"] == one["missing_together"]


def test_ranks_within_match_scipy_rankdata() -> None:
    from scipy.stats import rankdata

    from worker.profiling.relations.state import _ranks_within

    rng = np.random.default_rng(13)
    values = rng.integers(0, 30, 5000).astype(float)  # many ties
    values[rng.random(5000) < 0.1] = np.nan
    keep = ~np.isnan(values) & (rng.random(5000) < 0.7)
    ranks = _ranks_within(values, np.argsort(values, kind="stable"), keep)
    assert np.array_equal(ranks, rankdata(values[keep]))  # reference: scipy, average ties


def test_spearman_of_complete_and_incomplete_columns_match_scipy() -> None:
    rng = np.random.default_rng(21)
    frame = pd.DataFrame(rng.normal(size=(800, 4)).round(1), columns=["p", "q", "r", "s"])
    frame["q"] += frame["p"]
    frame.loc[rng.random(800) < 0.2, "s"] = np.nan
    names = list(frame.columns)
    state = RelationsState(names, [], ProfileOptions())
    for batch in prepared_batches(frame, names, [], batch_rows=300):
        state.update(batch)
    result = by_method(state.finalize(dict.fromkeys(names, "numeric")), "spearman")
    reference = frame.corr(method="spearman")  # pandas: pairwise-complete rows, average ties
    for (a, b), pair in result.items():
        assert pair["value"] == pytest.approx(reference.loc[a, b], rel=1e-12)
    assert len(result) == 6


def test_pairs_are_bounded_by_the_column_limit() -> None:
    options = ProfileOptions(relations=RelationsOptions(pair_columns=2))
    state = RelationsState(NUMERIC, LABELS, options)
    assert state.numeric == NUMERIC[:2] and state.labels == LABELS[:2]


def test_wide_tables_get_a_smaller_sample() -> None:
    options = ProfileOptions(relations=RelationsOptions(rank_sample_cells=3000))
    assert RelationsState(NUMERIC, LABELS, options).sample.k == 1000  # 3000 values / 3 columns


def test_a_column_missing_from_a_batch_counts_as_missing() -> None:
    frame = landings(300)
    state = RelationsState(NUMERIC, LABELS, ProfileOptions())
    batches = list(prepared_batches(frame, NUMERIC, LABELS, batch_rows=100))
    first = batches[0]
    numbers = {k: v for k, v in first.numbers.items() if k != "catch_kg"}
    labels = {k: v for k, v in first.labels.items() if k != "harbour"}
    state.update(type(first)(**{**first.__dict__, "numbers": numbers, "labels": labels}))
    for batch in batches[1:]:
        state.update(batch)
    pairs = by_method(state.finalize(KINDS), "pearson")
    assert pairs[("air_c", "catch_kg")]["n"] == int(frame["catch_kg"].iloc[100:].notna().sum())
