"""The one colour palette of the pages, the report and every figure.

The qualitative colours are the eight of Okabe and Ito's colour-universal
design set, chosen so that the common forms of colour-vision deficiency still
tell them apart. The diverging scale runs from Okabe–Ito blue through white to
Okabe–Ito vermillion, a blue–orange pair that stays distinguishable under
protanopia and deuteranopia; no figure uses a red–green contrast. Meaning is
never carried by colour alone: severities also have words and symbols, and
heatmap cells carry their numbers.

The CSS file (``web/static/tidewaiter.css``) declares the same colours as
custom properties; a test checks that the two agree.

References: M. Okabe and K. Ito, "Color Universal Design (CUD): how to make
figures and presentations that are friendly to colorblind people", J*Fly, 2008.
"""

from __future__ import annotations

OKABE_ITO: dict[str, str] = {
    "black": "#000000",
    "orange": "#E69F00",
    "sky_blue": "#56B4E9",
    "bluish_green": "#009E73",
    "yellow": "#F0E442",
    "blue": "#0072B2",
    "vermillion": "#D55E00",
    "reddish_purple": "#CC79A7",
}

INK = "#1F2A33"
"""Body text: a dark slate, softer than black on white."""
MUTED = "#5B6770"
"""Secondary text and axis labels (contrast 5.8:1 on white)."""
PAPER = "#FFFFFF"
GRID = "#E3E7EA"
REST = "#9AA5AD"
"""Bars that stand for "the rest" (labels outside the top list)."""

SERIES: tuple[str, ...] = (
    OKABE_ITO["blue"],
    OKABE_ITO["orange"],
    OKABE_ITO["bluish_green"],
    OKABE_ITO["vermillion"],
    OKABE_ITO["reddish_purple"],
    OKABE_ITO["sky_blue"],
    OKABE_ITO["yellow"],
    OKABE_ITO["black"],
)
"""Order in which figures with several series take their colours."""

BASELINE = OKABE_ITO["sky_blue"]
"""The baseline intake in drift figures."""
TARGET = OKABE_ITO["vermillion"]
"""The intake under review in drift figures."""

SEVERITY: dict[str, str] = {
    "info": OKABE_ITO["blue"],
    "warning": OKABE_ITO["orange"],
    "critical": OKABE_ITO["vermillion"],
}
"""Severity colours in figures (marks, not text)."""

BADGE: dict[str, tuple[str, str]] = {
    "info": ("#FFFFFF", OKABE_ITO["blue"]),
    "warning": (INK, OKABE_ITO["orange"]),
    "critical": ("#FFFFFF", "#B04A00"),
    "good": ("#FFFFFF", "#00775A"),
}
"""(text, background) of badges: Okabe–Ito hues, darkened where white text needs
it, so every pair reaches the 4.5:1 contrast WCAG 2.1 asks of normal text."""

DIVERGING: list[list[float | str]] = [
    [0.0, "#0072B2"],
    [0.25, "#7FB8D8"],
    [0.5, "#FFFFFF"],
    [0.75, "#EAAE7F"],
    [1.0, "#D55E00"],
]
"""Negative values blue, zero white, positive values vermillion (plotly colourscale)."""

SEQUENTIAL: list[list[float | str]] = [
    [0.0, "#FFFFFF"],
    [0.5, "#7FB8D8"],
    [1.0, "#0072B2"],
]
"""Zero white to strong blue, for measures that run from 0 to 1."""


def contrast_ratio(foreground: str, background: str) -> float:
    """The WCAG 2.1 contrast ratio of two ``#RRGGBB`` colours (1 to 21).

    References: W3C, Web Content Accessibility Guidelines 2.1, definitions of
    "relative luminance" and "contrast ratio", 2018.
    """

    def luminance(colour: str) -> float:
        channels = [int(colour[i : i + 2], 16) / 255 for i in (1, 3, 5)]
        linear = [c / 12.92 if c <= 0.04045 else ((c + 0.055) / 1.055) ** 2.4 for c in channels]
        return 0.2126 * linear[0] + 0.7152 * linear[1] + 0.0722 * linear[2]

    lighter, darker = sorted((luminance(foreground), luminance(background)), reverse=True)
    return (lighter + 0.05) / (darker + 0.05)
