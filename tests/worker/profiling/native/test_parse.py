"""Plain decimals parsed by the compiled pass: exact where it parses, refused elsewhere."""

from __future__ import annotations

import numpy as np
import pyarrow as pa
import pyarrow.compute as pc
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from worker.profiling.native import bytes_are_ascii, number_leads, padded_cells, parse_decimals

# Decimal strings of the grammar: sign, digits, a point, digits, an exponent.
DECIMALS = st.builds(
    lambda sign, whole, point, fraction, exponent: sign + whole + point + fraction + exponent,
    st.sampled_from(["", "-", "+"]),
    st.text("0123456789", max_size=12),
    st.sampled_from(["", "."]),
    st.text("0123456789", max_size=10),
    st.sampled_from(["", "e3", "E-7", "e+22", "e-22", "e25"]),
).filter(lambda text: any(c.isdigit() for c in text.split("e")[0].split("E")[0]))


def _on_the_fast_path(text: str) -> bool:
    """At most 15 significant digits and, for a non-zero value, a power of ten
    (exponent less the digits after the point) within ±22."""
    mantissa, _, exponent = text.lower().partition("e")
    whole, _, fraction = mantissa.lstrip("+-").partition(".")
    digits = (whole + fraction).lstrip("0")
    power = int(exponent or 0) - len(fraction)
    return len(digits) <= 15 and (not digits or abs(power) <= 22)


@settings(max_examples=400, deadline=None)
@given(st.lists(DECIMALS, min_size=1, max_size=40))
def test_parsed_values_are_the_correctly_rounded_ones(texts) -> None:
    # Reference: Python's float(), which rounds correctly (and reads the same grammar).
    found = parse_decimals(pa.array(texts))
    if all(_on_the_fast_path(t) for t in texts):
        assert found is not None  # every one is taken
    if found is not None:
        assert [float(t) for t in texts] == found.tolist()
        assert [np.signbit(float(t)) for t in texts] == np.signbit(found).tolist()


@settings(max_examples=200, deadline=None)
@given(st.lists(st.floats(-1e9, 1e9, allow_nan=False).map(lambda v: f"{v:.4f}"), min_size=1))
def test_short_decimals_are_taken_and_agree_with_arrow(texts) -> None:
    # Everything a supplier's file holds as "1234.5678" is on the fast path; reference:
    # Arrow's cast of the same text.
    found = parse_decimals(pa.array(texts))
    assert found is not None
    expected = pc.cast(pa.array(texts), pa.float64()).to_numpy()
    np.testing.assert_array_equal(found, expected)


def test_nulls_are_nan_and_slices_read_their_own_rows() -> None:
    column = pa.array(["9", "1.5", None, "-2", "7e1", None, "0.25"])
    np.testing.assert_array_equal(parse_decimals(column), [9, 1.5, np.nan, -2, 70, np.nan, 0.25])
    np.testing.assert_array_equal(parse_decimals(column.slice(2, 3)), [np.nan, -2, 70])
    large = pa.array(["3.5", None], pa.large_string())
    np.testing.assert_array_equal(parse_decimals(large), [3.5, np.nan])


@pytest.mark.parametrize(
    "text",
    [
        "",
        " 1",
        "1 ",
        "1,5",
        "1.2.3",
        "-",
        ".",
        "+.",
        "1e",
        "e5",
        "abc",
        "inf",
        "nan",
        "0x1F",
        "1_000",
        "12345678901234567890",
        "9007199254740993",
        "1e23",
        "٣",
    ],
)
def test_anything_else_is_refused(text) -> None:
    # Blanks, words, separators, and numbers past the exact fast path: the caller then
    # parses the column the general way.
    assert parse_decimals(pa.array(["1", text])) is None


def test_text_columns_only() -> None:
    assert parse_decimals(pa.array([1, 2])) is None


@pytest.mark.parametrize("length", [0, 1, 7, 4096, 4099, 100_000])
def test_ascii_check_finds_any_byte_above_127(length) -> None:
    # Reference: numpy's maximum over the same bytes.
    data = bytearray(np.random.default_rng(length).integers(0, 128, length, dtype=np.uint8))
    assert bytes_are_ascii(data) is True
    for at in {0, length // 2, length - 1} if length else set():
        changed = bytearray(data)
        changed[at] = 0xC3
        assert np.frombuffer(changed, np.uint8).max() >= 128
        assert bytes_are_ascii(changed) is False


# Cells made of whitespace, signs, marks, digits and letters, in any order.
CELL_TEXT = st.one_of(st.none(), st.text(" \t\n\v\f\r+-.,09xé", max_size=6))


@settings(max_examples=80, deadline=None, derandomize=True)
@given(st.lists(CELL_TEXT, max_size=40), st.integers(0, 5))
def test_cell_counts_agree_with_arrow(cells, start) -> None:
    column = pa.array(cells, pa.string()).slice(min(start, len(cells)))
    # Reference: Arrow's own trim (the characters it trims) and regular expression.
    # RE2's \s leaves out the vertical tab, which the count takes as whitespace, so
    # the lead check runs on the cells with their vertical tabs made spaces.
    trimmed = pc.ascii_trim_whitespace(column)
    changed = pc.not_equal(pc.binary_length(trimmed), pc.binary_length(column))
    assert padded_cells(column) == (pc.sum(changed).as_py() or 0)
    plain = pc.replace_substring(column, "\v", " ")
    leads = pc.match_substring_regex(plain, r"^\s*[-+]?[.,]?[0-9]")
    assert number_leads(plain) == (pc.sum(leads).as_py() or 0)
    assert number_leads(pa.array([1, 2])) is None and padded_cells(pa.array([1.5])) is None
