"""Twin columns: two numeric columns that hold the same measure, perhaps in two units.

A pair whose |Pearson r| reaches ``twin_r`` gets the least-squares line
b ≈ slope·a + intercept from its co-moments, and a hint when that line is a
known unit conversion, in either direction.

References: NIST Special Publication 811 (2008), "Guide for the Use of the
International System of Units", Appendix B (conversion factors).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from worker.profiling.relations.comoments import PairMoments


@dataclass(frozen=True)
class Conversion:
    """to = factor · from + offset."""

    source: str
    target: str
    factor: float
    offset: float = 0.0

    def inverse(self) -> Conversion:
        return Conversion(self.target, self.source, 1.0 / self.factor, -self.offset / self.factor)


# NIST SP 811, Appendix B.8 and B.9 (exact factors by definition of the units).
KNOWN_CONVERSIONS: tuple[Conversion, ...] = (
    Conversion("°C", "°F", 1.8, 32.0),
    Conversion("°C", "K", 1.0, 273.15),
    Conversion("kg", "lb", 1.0 / 0.45359237),  # 1 lb = 0.45359237 kg: 2.20462262 lb/kg
    Conversion("mi", "km", 1.609344),
    Conversion("ft", "m", 0.3048),
    Conversion("in", "cm", 2.54),
)


def _close(value: float, expected: float, tolerance: float, scale: float) -> bool:
    return abs(value - expected) <= tolerance * max(abs(expected), scale)


def unit_hint(
    slope: float, intercept: float, spread_b: float, tolerance: float
) -> Conversion | None:
    """The known conversion that maps a onto b, if slope and intercept match it.

    ``spread_b`` (b's standard deviation) scales the intercept's tolerance for
    conversions without an offset, where the fitted intercept is near zero.
    """
    for known in KNOWN_CONVERSIONS:
        for conversion in (known, known.inverse()):
            if _close(slope, conversion.factor, tolerance, 0.0) and _close(
                intercept, conversion.offset, tolerance, spread_b
            ):
                return conversion
    return None


def twin(
    a: str, b: str, moments: PairMoments, *, threshold: float, tolerance: float
) -> dict[str, Any] | None:
    """The twin document of a pair, or None when |r| is below ``threshold``."""
    r = moments.r
    if r is None or abs(r) < threshold:
        return None
    slope, intercept = moments.slope, moments.intercept
    assert slope is not None and intercept is not None
    spread_b = (moments.m2_b / (moments.n - 1)) ** 0.5
    conversion = unit_hint(slope, intercept, spread_b, tolerance)
    doc: dict[str, Any] = {
        "a": a,
        "b": b,
        "slope": slope,
        "intercept": intercept,
        "r": r,
        "n": moments.n,
        "hint": None,
    }
    if conversion is not None:
        doc["hint"] = f"{a} in {conversion.source}, {b} in {conversion.target}"
        doc["conversion"] = {
            "from": conversion.source,
            "to": conversion.target,
            "factor": conversion.factor,
            "offset": conversion.offset,
            "source": "NIST SP 811",
        }
    return doc
