"""Planted twin columns get the right unit hint (truth known by construction)."""

from __future__ import annotations

import numpy as np
import pytest

from worker.profiling.relations.comoments import CoMoments
from worker.profiling.relations.twins import twin, unit_hint


def moments_of(a: np.ndarray, b: np.ndarray):
    state = CoMoments(["a", "b"])
    state.update({"a": a, "b": b})
    return state.pair("a", "b")


RNG = np.random.default_rng(5)
CELSIUS = RNG.normal(14, 9, 3000).round(1)
KILOGRAMS = RNG.gamma(9, 8, 3000).round(2)
MILES = RNG.uniform(1, 300, 3000).round(2)


# Conversion factors: NIST SP 811 (2008), Appendix B.
@pytest.mark.parametrize(
    ("a", "b", "source", "target"),
    [
        (CELSIUS, (CELSIUS * 1.8 + 32).round(1), "°C", "°F"),
        ((CELSIUS * 1.8 + 32).round(1), CELSIUS, "°F", "°C"),
        (KILOGRAMS, (KILOGRAMS / 0.45359237).round(2), "kg", "lb"),
        ((KILOGRAMS / 0.45359237).round(2), KILOGRAMS, "lb", "kg"),
        (MILES, (MILES * 1.609344).round(2), "mi", "km"),
        ((MILES * 1.609344).round(2), MILES, "km", "mi"),
        (MILES * 10, (MILES * 3.048).round(2), "ft", "m"),
        (MILES, (MILES * 2.54).round(2), "in", "cm"),
        ((CELSIUS + 273.15).round(2), CELSIUS, "K", "°C"),
    ],
)
def test_planted_conversion_gets_its_hint(a, b, source, target) -> None:
    doc = twin("a", "b", moments_of(a, b), threshold=0.999, tolerance=0.005)
    assert doc is not None
    assert doc["conversion"]["from"] == source
    assert doc["conversion"]["to"] == target
    assert doc["hint"] == f"a in {source}, b in {target}"
    slope, intercept = np.polyfit(a, b, 1)  # reference: numpy least squares
    assert doc["slope"] == pytest.approx(slope, rel=1e-9)
    assert doc["intercept"] == pytest.approx(intercept, rel=1e-6, abs=1e-9)


def test_twin_without_a_known_unit_has_no_hint() -> None:
    doc = twin("a", "b", moments_of(MILES, MILES * 3 + 7), threshold=0.999, tolerance=0.005)
    assert doc is not None and doc["hint"] is None and doc["slope"] == pytest.approx(3.0)


def test_loosely_related_pair_is_no_twin() -> None:
    noisy = CELSIUS * 1.8 + 32 + RNG.normal(0, 3, 3000)
    assert twin("a", "b", moments_of(CELSIUS, noisy), threshold=0.999, tolerance=0.005) is None


def test_hint_needs_the_offset_too() -> None:
    assert unit_hint(1.8, 32.0, 10.0, 0.005).target == "°F"
    assert unit_hint(1.8, 0.0, 10.0, 0.005) is None
