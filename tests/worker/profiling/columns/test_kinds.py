"""Column kinds from candidates and counts (truth by construction)."""

import numpy as np
import pyarrow as pa

from worker.profiling.columns.kinds import KindCounts, choose_candidates, decide_kind


def _decide(values, **extra):
    array = pa.array(values)
    present = array.drop_null()
    candidates = choose_candidates(array, present)
    counts = KindCounts()
    numbers = None
    if candidates.numeric:
        from worker.profiling.prepared import parse_numbers

        numbers = parse_numbers(array)
    counts.update(len(present), numbers, array)
    labels = {str(v).casefold() for v in present.to_pylist()}
    options = {
        "candidates": candidates,
        "dates_parsed": 0,
        "date_examples": [],
        "labels": labels,
        "distinct": len(set(present.to_pylist())),
        "mean_length": float(np.mean([len(v) for v in present.to_pylist()])),
        "has_inner_space": any(" " in v for v in present.to_pylist()),
    }
    options.update(extra)
    return decide_kind(counts, **options)


def test_numbers_stored_as_text_with_a_few_words_are_numeric_with_evidence():
    decision = _decide(["1", "2.5", "n.a.", "4", "5"])
    assert decision.kind == "numeric"
    assert decision.evidence["mixed_kinds"]["examples"] == ["n.a."]
    assert decision.evidence["mixed_kinds"]["fit_share"] == 0.8


def test_booleans_identifiers_text_and_labels():
    assert _decide(["yes", "no", "yes"]).kind == "boolean"
    assert _decide([f"K{i:04d}" for i in range(200)]).kind == "identifier"
    sentences = [f"parcel {i} left the quay late" for i in range(2_000)]
    assert _decide(sentences).kind == "text"
    assert _decide(["red", "blue", "red", "green"] * 10).kind == "categorical"


def test_empty_column():
    counts = KindCounts()
    counts.update(0, None, None)
    decision = decide_kind(
        counts,
        candidates=None,
        dates_parsed=0,
        date_examples=[],
        labels=None,
        distinct=0,
        mean_length=None,
        has_inner_space=False,
    )
    assert decision.kind == "empty"


def test_unique_codes_with_leading_zeros_are_identifiers():
    codes = [f"{i:06d}" for i in range(300)]
    decision = _decide(codes)
    assert decision.kind == "identifier"
    assert decision.evidence["leading_zeros"] is True
    # The same numbers written without zeros stay numeric.
    assert _decide([str(i) for i in range(300)]).kind == "numeric"
