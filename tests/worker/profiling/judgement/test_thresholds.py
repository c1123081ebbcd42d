"""The thresholds: documented defaults, supplier overrides, settings from the environment."""

from __future__ import annotations

import pydantic
import pytest

from server.settings import Settings
from worker.profiling.judgement.thresholds import FlagThresholds, with_overrides
from worker.profiling.options import ProfileOptions


@pytest.mark.parametrize("name", sorted(FlagThresholds.model_fields))
def test_every_default_names_its_source(name: str) -> None:
    description = FlagThresholds.model_fields[name].description or ""
    # A publication (author and year) or the words "common practice".
    assert "common practice" in description or any(ch.isdigit() for ch in description), name


def test_published_defaults() -> None:
    t = FlagThresholds()
    assert (t.tukey_k, t.tukey_far_k) == (1.5, 3.0)  # Tukey (1977)
    assert t.modified_z == 3.5  # Iglewicz & Hoaglin (1993)
    assert (t.psi_warning, t.psi_critical) == (0.1, 0.25)  # common practice in credit scoring
    assert (t.cochran_min_expected, t.cochran_low_share) == (5.0, 0.2)  # Cochran (1954)
    assert (t.strong_pair_r, t.twin_r) == (0.98, 0.999)


def test_overrides_are_validated() -> None:
    base = FlagThresholds()
    assert with_overrides(base, {"psi_warning": 0.2}).psi_warning == 0.2
    assert with_overrides(base, None) is base
    with pytest.raises(pydantic.ValidationError):
        with_overrides(base, {"psi_warnin": 0.2})
    with pytest.raises(pydantic.ValidationError):
        with_overrides(base, {"dominant_label_share": 1.5})


def test_thresholds_are_engine_options_and_settings(monkeypatch: pytest.MonkeyPatch) -> None:
    assert ProfileOptions().thresholds == FlagThresholds()
    monkeypatch.setenv("TIDEWAITER_PROFILING__THRESHOLDS__PSI_WARNING", "0.15")
    assert Settings().profiling.thresholds.psi_warning == 0.15
