"""Text figures: lengths against pyarrow's utf8_length, whitespace and shapes by construction."""

import numpy as np
import pyarrow as pa
import pyarrow.compute as pc

from worker.profiling.columns.text import TextState, ascii_lengths, shapes


def test_lengths_match_pyarrow_for_ascii_and_unicode():
    for values in (["ab", "c", "defg"], ["Zoë", "Ærø", "a"]):
        array = pa.array(values)
        state = TextState()
        state.update(array, np.zeros(len(values), bool))
        # pyarrow.compute.utf8_length counts characters.
        lengths = pc.utf8_length(array).to_pylist()
        result = state.finalize()
        assert (result["min_length"], result["max_length"]) == (min(lengths), max(lengths))
        assert result["mean_length"] == sum(lengths) / len(lengths)
    assert ascii_lengths(pa.array(["Zoë"])) is None
    assert ascii_lengths(pa.array(["abc", "de"]).slice(1)).tolist() == [2]


def test_whitespace_and_shapes():
    raw = pa.array([" lead", "trail ", "AB-1234", "XY-9", "skip"])
    state = TextState()
    state.update(raw, np.array([False, False, False, False, True]))
    result = state.finalize()
    assert (result["leading_whitespace"], result["trailing_whitespace"]) == (1, 1)
    assert result["patterns"][0] == {"pattern": "A-9", "count": 2, "share": 0.5}
    assert shapes(pa.array(["Crate 12b"])).to_pylist() == ["Aa 9a"]
