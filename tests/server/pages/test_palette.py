"""The palette: the stylesheet agrees with it, and badge text is readable."""

from __future__ import annotations

import re

import pytest

from server.pages import palette
from server.pages.rendering import STATIC_DIR

CSS = (STATIC_DIR / "tidewaiter.css").read_text(encoding="utf-8")


def css_variable(name: str) -> str:
    match = re.search(rf"--tw-{name}:\s*(#[0-9A-Fa-f]{{6}})", CSS)
    assert match, f"--tw-{name} is not declared"
    return match.group(1).upper()


@pytest.mark.parametrize("name", sorted(palette.OKABE_ITO))
def test_stylesheet_declares_the_okabe_ito_colours(name: str) -> None:
    assert css_variable(name.replace("_", "-")) == palette.OKABE_ITO[name]


def test_okabe_ito_values_are_the_published_ones() -> None:
    # Okabe & Ito (2008), as RGB triplets: orange (230,159,0), sky blue (86,180,233),
    # bluish green (0,158,115), yellow (240,228,66), blue (0,114,178), vermillion (213,94,0),
    # reddish purple (204,121,167); recalled from memory of the published table.
    rgb = {k: tuple(int(v[i : i + 2], 16) for i in (1, 3, 5)) for k, v in palette.OKABE_ITO.items()}
    assert rgb["orange"] == (230, 159, 0) and rgb["sky_blue"] == (86, 180, 233)
    assert rgb["bluish_green"] == (0, 158, 115) and rgb["yellow"] == (240, 228, 66)
    assert rgb["blue"] == (0, 114, 178) and rgb["vermillion"] == (213, 94, 0)
    assert rgb["reddish_purple"] == (204, 121, 167)


@pytest.mark.parametrize("severity", ["info", "warning", "critical", "good"])
def test_badges_meet_the_wcag_contrast_for_normal_text(severity: str) -> None:
    text, background = palette.BADGE[severity]
    assert css_variable(f"badge-{severity}") == background.upper()
    # WCAG 2.1 success criterion 1.4.3: at least 4.5:1 for normal text.
    assert palette.contrast_ratio(text, background) >= 4.5


def test_contrast_ratio_matches_the_wcag_definition() -> None:
    # WCAG 2.1: black on white is 21:1, a colour on itself 1:1; #767676 on white is the
    # lightest grey that passes 4.5:1 (a widely quoted value, from memory).
    assert palette.contrast_ratio("#000000", "#FFFFFF") == pytest.approx(21.0)
    assert palette.contrast_ratio("#0072B2", "#0072B2") == pytest.approx(1.0)
    assert palette.contrast_ratio("#767676", "#FFFFFF") == pytest.approx(4.54, abs=0.01)
    assert palette.contrast_ratio(palette.MUTED, palette.PAPER) >= 4.5
