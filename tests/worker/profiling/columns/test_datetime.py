"""Dates: formats, ambiguity, granularity, future dates and histogram (truth by construction)."""

import datetime as dt

import pyarrow as pa
import pyarrow.compute as pc
import pytest

from worker.profiling.columns.datetime import DatetimeState, candidate_formats, parse_dates

NOW = dt.datetime(2026, 1, 1, tzinfo=dt.UTC).timestamp()


def _state(values, chunks=2):
    array = pa.array(values)
    state = DatetimeState(candidate_formats(array), now=NOW)
    step = max(1, len(values) // chunks)
    for start in range(0, len(values), step):
        state.update(array.slice(start, step))
    return state.finalize()


def test_day_first_settled_by_a_day_above_12():
    result = _state(["03/04/2025", "05/06/2025", "25/12/2025"])
    assert result["format"] == "%d/%m/%Y" and result["ambiguous"] is False
    assert result["min"] == "2025-04-03T00:00:00" and result["max"] == "2025-12-25T00:00:00"


def test_month_first_settled_in_a_later_batch():
    # The first batch fits both orders; the second only month-first (12/31).
    state = DatetimeState(candidate_formats(pa.array(["03/04/2025", "05/06/2025"])), now=NOW)
    state.update(pa.array(["03/04/2025", "05/06/2025"]))
    state.update(pa.array(["12/31/2025"]))
    result = state.finalize()
    assert result["format"] == "%m/%d/%Y" and result["ambiguous"] is False
    assert result["parsed"] == 3


def test_ambiguous_when_no_part_is_above_12():
    result = _state(["03/04/2025", "05/06/2025", "11/12/2025"])
    assert result["ambiguous"] is True
    assert {result["format"], result["alternative_format"]} == {"%d/%m/%Y", "%m/%d/%Y"}


def test_iso_granularity_future_and_histogram():
    values = ["2025-01-01T10:00:00", "2025-06-01T11:30:00", "2027-02-01T12:00:00", "x"]
    result = _state(values)
    assert result["format"] == "%Y-%m-%dT%H:%M:%S"
    assert result["granularity"] == "minute"
    assert result["future"] == 1
    assert result["unparsed_examples"] == ["x"]
    assert sum(result["histogram"]["counts"]) == 3
    months = _state(["2025-01-01", "2025-03-01", "2025-07-01"])
    assert months["granularity"] == "month"


@pytest.mark.parametrize(
    "values",
    [
        ["2025-03-01", "1999-12-31", None, "2024-02-29"],
        ["2025-03-01", "2025-02-30"],  # a day past the month's end: strptime's reading
        ["2025-03-01", "2025/03/01", "01-03-2025"],
        ["2025-03-01", "2025-3-1"],
    ],
)
def test_iso_dates_read_as_strptime_reads_them(values):
    text = pa.array(values, pa.string())
    # Reference: Arrow's strptime, the general parser the fast ISO path stands in for.
    expected = pc.strptime(text, format="%Y-%m-%d", unit="s", error_is_null=True)
    assert parse_dates(text, "%Y-%m-%d").equals(expected)
    # And Python's own datetime.strptime for the plain dates.
    parsed = parse_dates(text, "%Y-%m-%d").to_pylist()
    assert parsed[0] == dt.datetime.strptime("2025-03-01", "%Y-%m-%d")


def _by_label_and_by_row(values, chunks=3):
    """The finalized figures of one column profiled through its distinct values and row by row."""
    array = pa.array(values)
    formats = candidate_formats(array.drop_null())
    by_label, by_row = DatetimeState(formats, now=NOW), DatetimeState(formats, now=NOW)
    step = max(1, len(values) // chunks)
    encoded_batches = batches = 0
    for start in range(0, len(values), step):
        batches += 1
        batch = array.slice(start, step)
        encoded = by_label.encode(batch)
        encoded_batches += encoded is not None
        by_label.update(batch, encoded)
        by_row.update(batch)
    return by_label.finalize(), by_row.finalize(), (encoded_batches, batches)


@pytest.mark.parametrize(
    "values",
    [
        ["2025-03-01", "2025-03-02", None, "2025-03-01", "2027-01-01"] * 40,  # repeats, a gap
        ["03/04/2025", "05/06/2025", "x", "03/04/2025", "25/12/2025"] * 30,  # day-first, a word
        ["03/04/2025", "05/06/2025", "11/12/2025"] * 30,  # ambiguous
        ["2025-01-01", "2025-03-01", "2025-07-01"] * 30,  # month granularity
        ["2025-01-01T10:00:00", "2025-06-01T11:30:00", "-"] * 30,  # minute granularity
    ],
)
def test_dates_read_through_their_distinct_values_equal_dates_read_row_by_row(values):
    by_label, by_row, (encoded, batches) = _by_label_and_by_row(values)
    assert encoded == batches  # by construction the values repeat in every batch
    assert by_label == by_row


def test_dates_that_hardly_repeat_are_read_row_by_row_after_the_first_batch():
    seconds = [
        f"2025-01-01T{h:02d}:{m:02d}:{s:02d}"
        for h in range(3)
        for m in range(60)
        for s in range(0, 60, 7)
    ]
    by_label, by_row, (encoded, batches) = _by_label_and_by_row(seconds)
    assert (encoded, batches) == (1, 3)
    assert by_label == by_row
    assert by_row["granularity"] == "second"
