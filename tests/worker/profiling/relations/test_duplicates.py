"""Duplicate rows by row hash, checked against pandas on planted duplicates."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pyarrow as pa
from hypothesis import given, settings
from hypothesis import strategies as st

from worker.profiling.options import ProfileOptions
from worker.profiling.relations.duplicates import DuplicateState, row_hashes
from worker.profiling.relations.options import RelationsOptions


def text_frame(rows: int, seed: int) -> pd.DataFrame:
    # Planted duplicates: a delivery where some lines were sent twice (truth by construction).
    rng = np.random.default_rng(seed)
    frame = pd.DataFrame(
        {
            "station": rng.choice(["Kelp Point", "Gull Rock", "Tern Bay"], rows),
            "reading": rng.integers(0, 40, rows).astype(str),
            "note": rng.choice(["", "calm", None], rows),
        }
    )
    repeats = frame.sample(rows // 10, random_state=seed)
    return pd.concat([frame, repeats], ignore_index=True).sample(frac=1, random_state=1)


def state_of(frame: pd.DataFrame, batch_rows: int, offset: int = 0, **bounds) -> DuplicateState:
    options = ProfileOptions(relations=RelationsOptions(**bounds))
    state = DuplicateState(list(frame.columns), options)
    table = pa.Table.from_pandas(frame.reset_index(drop=True), preserve_index=False)
    for batch in table.to_batches(max_chunksize=batch_rows):
        state.update(batch, offset)
        offset += batch.num_rows
    return state


def test_count_matches_pandas_and_examples_are_equal_rows() -> None:
    frame = text_frame(3000, 1).reset_index(drop=True)
    result = state_of(frame, 700).finalize()
    assert result["exact"] is True
    assert result["duplicate_rows"] == int(frame.duplicated().sum())  # reference: pandas
    assert len(result["examples"]) == 5
    firsts = [group[0] for group in result["examples"]]
    assert firsts == sorted(firsts)
    for group in result["examples"]:
        rows = frame.iloc[group]
        assert len(group) >= 2 and (rows.nunique(dropna=False) == 1).all()
    # The first group is the first row that pandas finds repeated later.
    first_repeated = int(np.flatnonzero(frame.duplicated(keep=False).to_numpy())[0])
    assert firsts[0] == first_repeated


def test_raw_texts_differ_when_the_numbers_agree() -> None:
    frame = pd.DataFrame({"v": ["1", "1.0", "1", " 1"], "w": ["a", "a", "a", "a"]})
    assert state_of(frame, 2).finalize()["duplicate_rows"] == 1


def test_missing_cell_equals_missing_cell_but_not_blank() -> None:
    batch = pa.record_batch({"v": pa.array([None, None, ""], pa.string())})
    hashes = row_hashes(batch)
    assert hashes[0] == hashes[1] != hashes[2]


def test_above_the_bound_the_count_is_an_estimate() -> None:
    rng = np.random.default_rng(3)
    distinct = [str(v) for v in rng.permutation(60_000)]
    frame = pd.DataFrame({"id": distinct + distinct[:20_000]})
    exact = state_of(frame, 5000).finalize()
    assert exact["duplicate_rows"] == 20_000 == int(frame.duplicated().sum())  # pandas
    estimated = state_of(frame, 5000, duplicate_exact_rows=10_000).finalize()
    assert estimated["exact"] is False
    # HyperLogLog's standard error is 1.04/sqrt(m) on the distinct count (Flajolet et al.
    # 2007); allow four of them.
    error = 4 * estimated["distinct_rows_relative_error"] * 60_000
    assert abs(estimated["duplicate_rows"] - 20_000) <= error
    assert estimated["examples"] == []  # none among the first 10,000 rows


@settings(max_examples=30, deadline=None)
@given(
    rows=st.lists(
        st.tuples(st.sampled_from(["a", "b", "", None]), st.sampled_from(["1", "1.0", None])),
        min_size=1,
        max_size=60,
    ),
    cut=st.integers(0, 60),
)
def test_chunks_merged_equal_one_pass(rows, cut) -> None:
    frame = pd.DataFrame(rows, columns=["x", "y"], dtype=object)
    cut = min(cut, len(frame))
    one = state_of(frame, 7).finalize()
    head = state_of(frame.iloc[:cut], 5)
    tail = state_of(frame.iloc[cut:], 5, offset=cut)
    assert tail.merge(head).finalize() == one
    assert one["duplicate_rows"] == int(frame.duplicated().sum())  # pandas


def test_examples_are_the_first_groups_with_their_first_rows_as_pandas_groups_them() -> None:
    frame = text_frame(4000, 4).reset_index(drop=True)
    options = {"duplicate_examples": 4, "duplicate_example_rows": 2}
    result = state_of(frame, 300, **options).finalize()
    # Reference: pandas. Groups of equal rows (NaN equal to NaN), ordered by their first row.
    repeated = frame[frame.duplicated(keep=False)].fillna("<null>")
    groups = repeated.groupby(list(frame.columns), sort=False).groups.values()
    expected = sorted(sorted(int(r) for r in rows)[:2] for rows in groups)[:4]
    assert result["examples"] == expected
