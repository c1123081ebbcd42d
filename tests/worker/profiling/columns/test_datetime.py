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
