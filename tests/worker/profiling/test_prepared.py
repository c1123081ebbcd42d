"""Tests of the prepared batch: missing masks, numbers and labels (truth by construction)."""

import numpy as np
import pyarrow as pa
import pyarrow.compute as pc

from worker.profiling.prepared import BatchPlan, MissingCounts, parse_numbers, prepare_batch


def _plan(**kw):
    base = dict(
        numeric=frozenset({"x"}),
        labels=frozenset({"s"}),
        missing_tokens=("NA", "-"),
    )
    base.update(kw)
    return BatchPlan(**base)


def test_missing_mask_counts_null_blank_and_tokens():
    # Planted faults: one null, one blank, one whitespace-only, two tokens.
    raw = pa.record_batch(
        {
            "x": pa.array(["1.5", None, "", "  ", "NA", " - ", "abc"]),
            "s": pa.array(["a ", "b", None, "a", "NA", "c", " a"]),
        }
    )
    prepared = prepare_batch(raw, 10, _plan())
    assert prepared.offset == 10
    assert prepared.missing["x"].tolist() == [False, True, True, True, True, True, False]
    detail = prepared.missing_counts["x"]
    assert (detail.null, detail.blank, detail.tokens) == (1, 2, {"NA": 1, "-": 1})
    numbers = prepared.numbers["x"]
    assert numbers[0] == 1.5
    assert np.isnan(numbers[1:]).all()
    assert prepared.labels["s"].to_pylist() == ["a", "b", None, "a", None, "c", "a"]


def test_decimal_comma_and_thousands():
    # Truth by construction: "1.234,5" with "." thousands and "," decimal is 1234.5.
    values = parse_numbers(pa.array(["1.234,5", "7,25", "x"]), decimal=",", thousands=".")
    assert values[:2].tolist() == [1234.5, 7.25]
    assert np.isnan(values[2])


def test_typed_columns_skip_text_parsing():
    raw = pa.record_batch(
        {"x": pa.array([1.0, None, float("nan"), 4.0]), "s": pa.array([1, 2, 3, 4])}
    )
    prepared = prepare_batch(raw, 0, _plan())
    assert prepared.missing["x"].tolist() == [False, True, True, False]
    assert prepared.numbers["x"][[0, 3]].tolist() == [1.0, 4.0]
    assert prepared.labels["s"].to_pylist() == ["1", "2", "3", "4"]


def test_null_mask_and_lengths_of_sliced_arrays():
    from worker.profiling.prepared import _lengths, null_mask

    # pyarrow's is_null and binary_length as the reference, on a slice with an offset.
    array = pa.array(["ab", None, "", "xyz", None, "é"] * 3).slice(4, 9)
    assert null_mask(array).tolist() == array.is_null().to_pylist()
    expected = [0 if v is None else v for v in pc.binary_length(array).to_pylist()]
    assert _lengths(array).tolist() == expected


def test_clean_label_columns_are_counted_once_and_padded_ones_take_the_careful_path():
    plan = _plan(numeric=frozenset(), labels=frozenset({"s"}))
    clean = prepare_batch(pa.record_batch({"s": pa.array(["a", None, "b", "a"])}), 0, plan)
    counted = clean.missing_counts["s"], clean.labels["s"].to_pylist()
    assert counted == (MissingCounts(null=1, blank=0, tokens={}), ["a", None, "b", "a"])
    assert clean.missing["s"].tolist() == [False, True, False, False]
    padded = prepare_batch(pa.record_batch({"s": pa.array(["a ", "NA", "b", " "])}), 0, plan)
    assert padded.labels["s"].to_pylist() == ["a", None, "b", None]
    assert padded.missing_counts["s"] == MissingCounts(null=0, blank=1, tokens={"NA": 1})
    assert padded.padded["s"] == 1


def test_labels_seen_clean_are_remembered_and_each_new_fault_is_still_caught():
    # Planted: after clean batches, a batch with one new faulty label takes the careful
    # path, whatever the fault; a few labels are checked in Python, many in Arrow.
    for labels in (["dry", "reefer", "bulk"], [f"berth-{i:04d}" for i in range(1_500)]):
        plan = _plan(numeric=frozenset(), labels=frozenset({"s"}))
        for _ in range(2):
            clean = prepare_batch(pa.record_batch({"s": pa.array(labels)}), 0, plan)
            assert clean.padded["s"] == 0 and clean.missing_counts["s"].total == 0
        for fault, blank, tokens, padded in (
            (" dry", 0, {}, 1),
            ("dry\t", 0, {}, 1),
            ("", 1, {}, 0),
            ("  ", 1, {}, 0),
            ("NA", 0, {"NA": 1}, 0),
        ):
            batch = pa.record_batch({"s": pa.array([*labels, fault])})
            prepared = prepare_batch(batch, 0, plan)
            detail = prepared.missing_counts["s"]
            assert (detail.blank, detail.tokens, prepared.padded["s"]) == (blank, tokens, padded)
            assert prepared.labels["s"].to_pylist()[:-1] == labels


def test_long_cells_skip_the_token_check_and_short_ones_keep_it():
    # Truth by construction: codes longer than every token are never missing tokens;
    # a column with one short cell still has it checked.
    plan = _plan(numeric=frozenset(), labels=frozenset(), missing_tokens=("N/A", "null"))
    codes = pa.record_batch({"code": pa.array(["CR-0000001", "CR-0000002", " CR-0000003 "])})
    assert not prepare_batch(codes, 0, plan).missing["code"].any()
    mixed = pa.record_batch({"code": pa.array(["CR-0000001", " null ", "N/A", "nulls"])})
    prepared = prepare_batch(mixed, 0, plan)
    assert prepared.missing["code"].tolist() == [False, True, True, False]
    assert prepared.missing_counts["code"].tokens == {"null": 1, "N/A": 1}


def test_numbers_of_a_clean_label_column_equal_parsing_every_cell():
    # A label column that is also a numeric candidate parses its dictionary once;
    # the reference is parse_numbers over every cell.
    grades = pa.array(["3", "7", None, "3", "x", "12.5", "7", None, "-1"])
    plan = _plan(numeric=frozenset({"grade"}), labels=frozenset({"grade"}))
    batch = prepare_batch(pa.record_batch({"grade": grades}), 0, plan)
    assert "grade" in batch.encoded  # the dictionary path was taken
    np.testing.assert_array_equal(batch.numbers["grade"], parse_numbers(grades))
    nothing = pa.nulls(4, pa.string())
    batch = prepare_batch(pa.record_batch({"grade": nothing}), 0, plan)
    assert np.isnan(batch.numbers["grade"]).all()


def test_numbers_among_words_parse_as_polars_lenient_cast_reads_them() -> None:
    # Reference: polars' cast to Float64 with strict=False (null where not a number);
    # non-finite results are NaN in both.
    import polars as pl

    cases = ["1", "-2.5", "+3", ".5", "5.", "1e3", "1.5E-2", "-.5e+1", "abc", "", None]
    cases += ["1e", "e5", "1.2.3", "--1", "inf", "NaN", "1e400", "0x10", "1 000", "7"]
    text = pa.array(cases)
    ours = parse_numbers(text)
    reference = pl.from_arrow(text).cast(pl.Float64, strict=False).to_numpy().astype(float)
    reference[~np.isfinite(reference)] = np.nan
    np.testing.assert_array_equal(ours, reference)
