"""Missing-cell detail merges by addition (truth by construction)."""

from worker.profiling.columns.missing import MissingState
from worker.profiling.prepared import MissingCounts


def test_detail_adds_up_across_batches():
    a, b = MissingState(), MissingState()
    a.update(MissingCounts(null=2, blank=1, tokens={"NA": 3}), rows=10)
    b.update(MissingCounts(null=0, blank=4, tokens={"NA": 1, "-": 2}), rows=20)
    result = a.merge(b).finalize()
    assert result["missing"] == 13
    assert result["count"] == 17
    assert result["missing_detail"] == {"null": 2, "blank": 5, "tokens": {"NA": 4, "-": 2}}
