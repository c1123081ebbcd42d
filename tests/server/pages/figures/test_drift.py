"""Drift figures: baseline and target on one axis, PSI bands marked."""

from __future__ import annotations

import numpy as np
import pandas as pd
import plotly.graph_objects as go
import pytest

from server.pages import palette
from server.pages.figures import (
    drift_column_figure,
    drift_labels_figure,
    drift_numeric_figure,
    drift_overview_figure,
)
from tests.server.pages.profile_sections import label_column, numeric_column


def test_overview_orders_columns_by_psi_and_colours_the_bands() -> None:
    drift = {
        "columns": [
            {"name": "a", "psi": 0.05, "ks": 0.1},
            {"name": "b", "psi": 0.4, "ks": 0.3, "mean_shift_sd": 1.2},
            {"name": "c", "psi": 0.15},
            {"name": "label only", "psi": None},
        ]
    }
    figure = drift_overview_figure(drift)
    go.Figure(figure)
    bars = figure["data"][0]
    assert figure["layout"]["yaxis"]["ticktext"] == ["b", "c", "a"]
    assert bars["marker"]["color"] == [
        palette.OKABE_ITO["vermillion"],
        palette.OKABE_ITO["orange"],
        palette.OKABE_ITO["blue"],
    ]
    assert [s["x0"] for s in figure["layout"]["shapes"]] == [0.1, 0.25]
    assert drift_overview_figure({"columns": []}) is None


def test_numeric_drift_outlines_have_unit_area() -> None:
    rng = np.random.default_rng(7)
    before = numeric_column("temp", pd.Series(rng.normal(12, 2, 400)))
    after = numeric_column("temp", pd.Series(rng.normal(14, 2, 250)))
    figure = drift_numeric_figure(before, after)
    go.Figure(figure)
    for trace in figure["data"]:
        # Density units: the step outline encloses area 1 whatever the row count (numpy).
        assert np.trapezoid(trace["y"], trace["x"]) == pytest.approx(1.0)
    assert drift_column_figure(before, after) == figure


def test_label_drift_puts_new_and_vanished_labels_at_zero() -> None:
    before = label_column("port", pd.Series(["N"] * 6 + ["S"] * 4))
    after = label_column("port", pd.Series(["N"] * 5 + ["E"] * 5))
    figure = drift_labels_figure(before, after)
    go.Figure(figure)
    base, target = figure["data"]
    ticks = figure["layout"]["yaxis"]["ticktext"]
    assert ticks == ["N", "E", "S"]
    assert base["x"] == [0.6, 0.0, 0.4] and target["x"] == [0.5, 0.5, 0.0]


def test_no_drift_figure_when_the_kind_changed() -> None:
    before = label_column("depth", pd.Series(["deep", "shallow"]))
    after = numeric_column("depth", pd.Series([1.0, 2.0, 3.0]))
    assert drift_column_figure(before, after) is None
