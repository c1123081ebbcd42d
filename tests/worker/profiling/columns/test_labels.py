"""Label counts, variants, entropy and the Misra–Gries summary (truth by construction)."""

import math
from collections import Counter

import numpy as np
import pyarrow as pa
from hypothesis import given, settings
from hypothesis import strategies as st

from worker.profiling.columns.labels import LabelState, fold_label


def test_planted_variants_and_declared_synonyms():
    state = LabelState()
    state.update(pa.array(["Active", "active ", "ACTIVE", "Closed", "F", "Female", None]))
    result = state.finalize(synonyms={"F": "Female"})
    groups = [sorted(group) for group in result["variants"]]
    assert sorted(["ACTIVE", "Active", "active "]) in groups
    assert ["F", "Female"] in groups
    assert fold_label("  Cl-osed ") == "cl osed"


def test_shares_entropy_imbalance_and_rare():
    labels = ["a"] * 90 + ["b"] * 9 + ["c"]
    state = LabelState()
    state.update(pa.array(labels))
    result = state.finalize(rare_share=0.05)
    assert result["top"][0] == {"value": "a", "count": 90, "share": 0.9}
    shares = np.array([0.9, 0.09, 0.01])
    # Shannon entropy in bits, computed here with numpy.
    assert math.isclose(result["entropy"], float(-(shares * np.log2(shares)).sum()))
    assert result["imbalance_ratio"] == 90.0
    assert [r["value"] for r in result["rare"]] == ["c"]
    assert result["other_count"] == 0


def test_misra_gries_keeps_heavy_labels_with_bounded_error():
    rng = np.random.default_rng(8)
    heavy = rng.choice(["x", "y", "z"], size=30_000)
    tail = np.array([f"id{i}" for i in range(20_000)])
    data = np.concatenate([heavy, tail])
    rng.shuffle(data)
    state = LabelState(exact_bound=500, summary_size=100)
    for chunk in np.array_split(data, 10):
        state.update(pa.array(chunk))
    assert not state.exact
    truth = Counter(data.tolist())
    result = state.finalize()
    top = {item["value"]: item["count"] for item in result["top"][:3]}
    assert set(top) == {"x", "y", "z"}
    for value, count in top.items():
        # Misra & Gries (1982): each kept count is at most count_error below the truth.
        assert truth[value] - result["count_error"] <= count <= truth[value]
    assert result["count_error"] <= len(data) / 101


@settings(max_examples=40, deadline=None)
@given(st.lists(st.sampled_from(["a", "b", "c", " a", "B", None]), max_size=200), st.integers(1, 5))
def test_merged_chunks_equal_one_pass(values, k):
    one = LabelState()
    one.update(pa.array(values, type=pa.string()))
    parts = []
    for chunk in np.array_split(np.array(values, dtype=object), k):
        part = LabelState()
        part.update(pa.array(chunk.tolist(), type=pa.string()))
        parts.append(part)
    merged = parts[0]
    for part in parts[1:]:
        merged = merged.merge(part)
    assert merged.counts == one.counts
    assert merged.n == one.n == sum(v is not None for v in values)
