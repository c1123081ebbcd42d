"""Column figures: drawn from the stored summaries, valid for plotly, safe with odd labels."""

from __future__ import annotations

import numpy as np
import pandas as pd
import plotly.graph_objects as go
import pytest
from sklearn.datasets import load_iris

from server.pages.figures import column_figure, datetime_figure, labels_figure, numeric_figure
from server.pages.figures.columns import whiskers
from tests.server.pages.profile_sections import label_column, numeric_column

IRIS = load_iris(as_frame=True).frame  # the iris data shipped with scikit-learn


def tukey_whiskers(values: np.ndarray) -> tuple[float, float]:
    """Whisker ends from the raw values, by Tukey's definition (Tukey 1977), with numpy."""
    q1, q3 = np.percentile(values, [25, 75])
    reach = 1.5 * (q3 - q1)
    return values[values >= q1 - reach].min(), values[values <= q3 + reach].max()


@pytest.mark.parametrize("name", ["sepal length (cm)", "petal length (cm)", "petal width (cm)"])
def test_whiskers_are_exact_when_no_value_lies_beyond_the_fences(name: str) -> None:
    column = numeric_column(name, IRIS[name])
    # Reference: Tukey's whiskers computed from scikit-learn's iris values with numpy.
    assert whiskers(column["numeric"]) == pytest.approx(tukey_whiskers(IRIS[name].to_numpy()))


def test_whiskers_stay_inside_the_fences_when_outliers_exist() -> None:
    name = "sepal width (cm)"  # iris sepal width has values beyond both fences (2.0 and 4.4)
    values = IRIS[name].to_numpy()
    low, high = whiskers(numeric_column(name, IRIS[name])["numeric"])
    true_low, true_high = tukey_whiskers(values)
    assert (true_low, true_high) == (2.2, 4.0)  # numpy on scikit-learn's iris
    q1, q3 = np.percentile(values, [25, 75])
    assert q1 - 1.5 * (q3 - q1) <= low and high <= q3 + 1.5 * (q3 - q1)
    # Between two stored percentiles of the true end: iris widths are on a 0.1 grid.
    assert abs(low - true_low) <= 0.1 and abs(high - true_high) <= 0.1
    assert low > values.min() and high < values.max()


def test_numeric_figure_bars_are_the_stored_histogram() -> None:
    column = numeric_column("petal length (cm)", IRIS["petal length (cm)"])
    figure = numeric_figure(column)
    go.Figure(figure)  # plotly's own schema accepts every trace and layout key
    bars, density, violin, box = figure["data"]
    edges = np.array(column["numeric"]["histogram"]["edges"])
    assert bars["y"] == column["numeric"]["histogram"]["counts"]
    assert sum(bars["y"]) == 150  # iris has 150 rows (Fisher 1936)
    np.testing.assert_allclose(bars["x"], (edges[:-1] + edges[1:]) / 2)
    np.testing.assert_allclose(bars["width"], np.diff(edges))
    # The density curve is scaled to rows per bin: its area is rows × bin width
    # (the kernel estimate's tails past min and max make it a little smaller).
    area = np.trapezoid(density["y"], density["x"])
    assert 0.85 * 150 * np.diff(edges).mean() < area <= 150 * np.diff(edges).mean()
    assert box["q1"] == [pytest.approx(1.6)] and box["q3"] == [pytest.approx(5.1)]
    assert box["median"] == [pytest.approx(4.35)]  # iris petal length quartiles, numpy type 7
    assert box["boxmean"] == "sd" and box["sd"] == [pytest.approx(IRIS["petal length (cm)"].std())]
    assert max(violin["y"]) == pytest.approx(0.9) and min(violin["y"]) == pytest.approx(-0.9)


def test_numeric_figure_of_a_constant_column_has_visible_bars() -> None:
    figure = numeric_figure(numeric_column("depth", pd.Series([5.0] * 20)))
    go.Figure(figure)
    assert all(width > 0 for width in figure["data"][0]["width"])


def test_numeric_figure_needs_a_histogram() -> None:
    assert numeric_figure({"name": "x", "kind": "numeric", "numeric": {}}) is None
    bad = {"histogram": {"edges": [0, 1], "counts": [1, 2]}}
    assert numeric_figure({"name": "x", "kind": "numeric", "numeric": bad}) is None


def test_labels_figure_shows_the_top_labels_and_the_rest() -> None:
    values = pd.Series(["north"] * 50 + ["south"] * 30 + ["east"] * 15 + ["west"] * 5)
    column = label_column("quay", values, top=2)
    figure = labels_figure(column)
    go.Figure(figure)
    bars = figure["data"][0]
    assert bars["x"] == [50, 30, 20]
    assert figure["layout"]["yaxis"]["ticktext"] == ["north", "south", "the other 2 labels"]
    assert bars["text"] == ["50.0 %", "30.0 %", "20.0 %"]


def test_labels_are_escaped_and_kept_apart() -> None:
    long = "x" * 60
    values = pd.Series(["<b>bold</b>"] * 3 + ["1"] * 2 + [long + "a", long + "b"])
    figure = labels_figure(label_column("tag", values))
    ticks = figure["layout"]["yaxis"]["ticktext"]
    assert ticks[0] == "&lt;b&gt;bold&lt;/b&gt;"
    # Labels placed by position: "1" is a bar, not a number on a numeric axis, and two
    # labels with the same shortened text stay two bars.
    assert figure["data"][0]["y"] == [0, 1, 2, 3]
    assert ticks[2] == ticks[3] and len(ticks[2]) == 40


def test_datetime_figure_spans_the_stored_periods() -> None:
    column = {
        "name": "landed_at",
        "kind": "datetime",
        "datetime": {
            "min": "2026-01-01T00:00:00",
            "max": "2026-01-04T00:00:00",
            "histogram": {
                "edges": ["2026-01-01T00:00:00", "2026-01-02T00:00:00", "2026-01-04T00:00:00"],
                "counts": [4, 6],
            },
        },
    }
    figure = datetime_figure(column)
    go.Figure(figure)
    bars = figure["data"][0]
    assert bars["x"] == ["2026-01-01T12:00:00", "2026-01-03T00:00:00"]
    assert bars["width"] == [86_400_000, 172_800_000]
    assert column_figure(column) == figure


def test_column_figure_has_nothing_for_text_columns() -> None:
    assert column_figure({"name": "note", "kind": "text", "text": {"min_length": 1}}) is None


def test_labels_that_differ_by_edge_spaces_read_apart() -> None:
    values = pd.Series(["ok"] * 5 + ["ok "] * 3 + [" ok"] * 2)
    ticks = labels_figure(label_column("status", values))["layout"]["yaxis"]["ticktext"]
    assert ticks == ["ok", "ok␣", "␣ok"]
