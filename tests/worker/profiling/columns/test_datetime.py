"""Dates: formats, ambiguity, granularity, future dates and histogram (truth by construction)."""

import datetime as dt

import pyarrow as pa

from worker.profiling.columns.datetime import DatetimeState, candidate_formats

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
