"""The words of flag messages: percentages, numbers, plurals, linear relations."""

from __future__ import annotations

import pytest

from worker.profiling.judgement.wording import linear, make_flag, number, percent, plural


@pytest.mark.parametrize(
    ("share", "text"),
    [(0.042, "4.2 %"), (0.5, "50 %"), (0.0004, "0.04 %"), (0.0, "0 %"), (1.0, "100 %")],
)
def test_percent(share: float, text: str) -> None:
    assert percent(share) == text


def test_number_and_plural() -> None:
    assert number(1234) == "1,234" and number(2.0) == "2" and number(0.123456) == "0.1235"
    assert plural(1, "row") == "1 row" and plural(3, "row") == "3 rows"


def test_linear_relation() -> None:
    # Fahrenheit from Celsius: F = 1.8 × C + 32.
    assert linear(1.8, "temp_c", 32.0, scale=30) == "1.8 × 'temp_c' + 32"
    assert linear(2.20462, "kg", 0.0019, scale=119) == "2.205 × 'kg'"  # rounding, left out
    assert linear(2.0, "a", -0.5) == "2 × 'a' - 0.5"


def test_make_flag_refuses_an_unknown_severity() -> None:
    with pytest.raises(ValueError, match="severity"):
        make_flag("x.y", "fatal", [], "m", {})
