"""On-demand questions over the Parquet copy, checked against pandas on the same data."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd
import pyarrow as pa
import pytest
from scipy.stats import chi2_contingency

from worker.profiling.columnar import ColumnarCopy
from worker.profiling.options import DEFAULT_MISSING_TOKENS
from worker.profiling.queries import (
    OTHER_LABEL,
    QueryError,
    column_values,
    crosstab,
    label_counts,
    sample_rows,
)


def crew(rows: int = 4000) -> pd.DataFrame:
    """An invented harbour crew roster as delivered: raw texts with stray spaces and tokens."""
    rng = np.random.default_rng(12)
    gender = rng.choice(
        ["female", "male", "female ", "N/A", ""], rows, p=[0.4, 0.45, 0.05, 0.05, 0.05]
    )
    role = np.where(
        np.char.strip(gender.astype(str)) == "female",
        rng.choice(["pilot", "rigger", "clerk"], rows, p=[0.5, 0.2, 0.3]),
        rng.choice(["pilot", "rigger", "clerk", " cook"], rows, p=[0.2, 0.5, 0.2, 0.1]),
    )
    shift = rng.choice(["dawn", "day", "night"], rows)
    return pd.DataFrame(
        {"gender": gender, "role": role, "shift": shift, "id": np.arange(rows).astype(str)}
    )


def cleaned(frame: pd.DataFrame) -> pd.DataFrame:
    """The engine's cleaning, restated with pandas: trim, blank and missing tokens to NA."""
    out = frame.apply(lambda col: col.str.strip())
    return out.mask(out.isin(["", *DEFAULT_MISSING_TOKENS]))


@pytest.fixture(scope="module")
def copy_path(tmp_path_factory) -> Path:
    path = tmp_path_factory.mktemp("copy") / "crew.parquet"
    frame = crew()
    table = pa.Table.from_pandas(frame, preserve_index=False)
    with ColumnarCopy(path, row_group_rows=1000) as copy:
        for batch in table.to_batches(max_chunksize=700):
            copy.write(batch)
    return path


def test_label_counts_within_a_value_of_another(copy_path: Path) -> None:
    counts = label_counts(copy_path, "role", {"gender": "female"})
    frame = cleaned(crew())
    expected = frame[frame["gender"] == "female"]["role"].value_counts()  # pandas
    assert {c["value"]: c["count"] for c in counts} == expected.to_dict()
    assert [c["count"] for c in counts] == sorted(expected, reverse=True)
    assert sum(c["share"] for c in counts) == pytest.approx(1.0)


def test_label_counts_list_missing_and_fold_the_rest(copy_path: Path) -> None:
    counts = label_counts(copy_path, "gender", limit=1)
    frame = cleaned(crew())
    expected = frame["gender"].value_counts()  # pandas
    assert counts[0] == {
        "value": expected.index[0],
        "count": int(expected.iloc[0]),
        "share": pytest.approx(expected.iloc[0] / len(frame)),
    }
    assert counts[1]["value"] == OTHER_LABEL
    assert counts[1]["count"] == int(expected.iloc[1:].sum())
    assert counts[2]["value"] is None
    assert counts[2]["count"] == int(frame["gender"].isna().sum())  # pandas


def test_crosstab_matches_pandas_and_scipy(copy_path: Path) -> None:
    doc = crosstab(copy_path, "gender", "role")
    frame = cleaned(crew())
    expected = pd.crosstab(frame["gender"], frame["role"])  # pandas, missing left out
    assert doc["counts"]["a_labels"] == list(expected.index)
    assert doc["counts"]["b_labels"] == list(expected.columns)
    assert doc["counts"]["matrix"] == expected.to_numpy().tolist()
    reference = chi2_contingency(expected.to_numpy())  # scipy
    assert doc["chi2"] == pytest.approx(reference.statistic, rel=1e-12)
    assert doc["p_value"] == pytest.approx(reference.pvalue, rel=1e-9, abs=1e-300)
    cook = doc["counts"]["b_labels"].index("cook")
    female = doc["counts"]["a_labels"].index("female")
    assert doc["residuals"][female][cook] < -3  # planted: no female cooks


def test_crosstab_within_a_filter_and_folding(copy_path: Path) -> None:
    doc = crosstab(copy_path, "role", "shift", {"gender": "male"}, max_labels=2)
    frame = cleaned(crew())
    male = frame[frame["gender"] == "male"]
    assert doc["n"] == int((male["role"].notna() & male["shift"].notna()).sum())
    assert doc["folded"] == ["role", "shift"]
    top = male["role"].value_counts().index[:2]
    assert doc["counts"]["a_labels"] == [*sorted(top), OTHER_LABEL]
    assert doc["where"] == {"gender": "male"}


def test_sample_rows_come_from_the_filter(copy_path: Path) -> None:
    rows = sample_rows(copy_path, 25, {"gender": None})
    frame = crew()
    missing = cleaned(frame)["gender"].isna()
    assert len(rows) == 25
    assert [r["row"] for r in rows] == sorted(r["row"] for r in rows)
    for row in rows:
        assert missing.iloc[row["row"]]
        assert row["values"] == frame.iloc[row["row"]].to_dict()  # raw cells, as delivered
    everything = sample_rows(copy_path, 10_000)
    assert len(everything) == len(frame)


def test_column_values_pages_in_row_order(copy_path: Path) -> None:
    page = column_values(copy_path, "id", 5, offset=998)
    assert page["values"] == ["998", "999", "1000", "1001", "1002"]  # across row groups
    assert page["total"] == 4000
    filtered = column_values(copy_path, "gender", 3, where={"role": "cook"})
    frame = crew()
    cooks = frame[frame["role"].str.strip() == "cook"]
    assert filtered["values"] == cooks["gender"].head(3).tolist()
    assert filtered["rows"] == cooks.index[:3].tolist()


def test_clear_errors(tmp_path: Path, copy_path: Path) -> None:
    with pytest.raises(QueryError, match="no column named 'salary'"):
        label_counts(copy_path, "salary")
    with pytest.raises(QueryError, match="columnar copy"):
        label_counts(tmp_path / "absent.parquet", "role")
    with pytest.raises(QueryError, match="two different"):
        crosstab(copy_path, "role", "role")


def test_labels_are_cleaned_as_the_engine_cleans_them(tmp_path: Path) -> None:
    # Reference: the engine's own batch preparation (prepare_batch) on the same raw cells.
    from worker.profiling.prepared import BatchPlan, prepare_batch

    raw = ["\u00a0pilot", "pilot\t", "NULL", " ", None, "Pilot", "#N/A", "clerk"] * 50
    batch = pa.record_batch({"role": pa.array(raw, pa.string())})
    path = tmp_path / "roles.parquet"
    with ColumnarCopy(path, row_group_rows=64) as copy:
        for part in pa.Table.from_batches([batch]).to_batches(max_chunksize=30):
            copy.write(part)
    plan = BatchPlan(frozenset(), frozenset(["role"]), DEFAULT_MISSING_TOKENS)
    engine = pd.Series(prepare_batch(batch, 0, plan).labels["role"].to_pylist(), dtype=object)
    counts = {c["value"]: c["count"] for c in label_counts(path, "role")}
    expected = engine.value_counts().to_dict() | {None: int(engine.isna().sum())}  # pandas
    assert counts == expected


def test_typed_parquet_columns_are_labels_too(tmp_path: Path) -> None:
    path = tmp_path / "typed.parquet"
    with ColumnarCopy(path) as copy:
        copy.write(pa.record_batch({"crew": pa.array([3, 4, 3, None]), "dock": list("abab")}))
    assert label_counts(path, "crew", {"dock": "a"}) == [{"value": "3", "count": 2, "share": 1.0}]


def test_questions_over_the_copy_the_engine_wrote(tmp_path: Path) -> None:
    from worker.profiling import profile_file

    frame = crew(600)
    csv_path = tmp_path / "crew.csv"
    frame.to_csv(csv_path, index=False)
    copy_path = tmp_path / "crew.parquet"
    profile = profile_file(csv_path, columnar_copy=copy_path)
    assert not (tmp_path / "crew.parquet.partial").exists()
    # The profile's own label counts (engine), folded by trimmed label, agree with the copy's.
    (role,) = [c for c in profile["columns"] if c["name"] == "role"]
    engine: dict[str, int] = {}
    for item in role["labels"]["top"]:
        engine[item["value"].strip()] = engine.get(item["value"].strip(), 0) + item["count"]
    counts = {c["value"]: c["count"] for c in label_counts(copy_path, "role")}
    assert counts == engine
    # The profile's crosstab and the on-demand one without a filter are the same table.
    (stored,) = [c for c in profile["crosstabs"] if {c["a"], c["b"]} == {"gender", "role"}]
    asked = crosstab(copy_path, stored["a"], stored["b"])
    assert asked["counts"] == stored["counts"]
    assert asked["chi2"] == pytest.approx(stored["chi2"], rel=1e-12)


def test_a_filter_matching_nothing_gives_empty_answers(copy_path: Path) -> None:
    nobody = {"shift": "midnight"}
    doc = crosstab(copy_path, "gender", "role", nobody)
    assert doc["n"] == 0 and doc["chi2"] is None and doc["counts"]["matrix"] == []
    assert label_counts(copy_path, "role", nobody) == []
    assert sample_rows(copy_path, 5, nobody) == []
    assert column_values(copy_path, "role", 5, where=nobody)["values"] == []
    # One label left on a side: counts, but no test of independence.
    single = crosstab(copy_path, "role", "shift", {"shift": "dawn"})
    assert single["counts"]["b_labels"] == ["dawn"] and single["p_value"] is None
