"""Pair figures: the correlation heatmap and the crosstab heatmap."""

from __future__ import annotations

import numpy as np
import palmerpenguins
import plotly.graph_objects as go
import pytest
from sklearn.datasets import load_iris

from server.pages.figures import (
    correlation_figure,
    correlation_methods,
    crosstab_figure,
    crosstab_table,
)
from server.pages.figures.relations import RESIDUAL_CAP
from tests.server.pages.profile_sections import crosstab, pearson_pairs

IRIS = load_iris(as_frame=True).frame.drop(columns="target")  # scikit-learn's iris
PENGUINS = palmerpenguins.load_penguins()  # the palmerpenguins package's data


def test_correlation_heatmap_is_the_pandas_matrix() -> None:
    figure = correlation_figure(pearson_pairs(IRIS), "pearson", columns=list(IRIS.columns))
    go.Figure(figure)
    z = np.array(figure["data"][0]["z"], dtype=float)
    # Reference: pandas DataFrame.corr on the same values, diagonal included.
    np.testing.assert_allclose(z, IRIS.corr().to_numpy(), atol=1e-12)
    # Petal length and petal width: r = 0.9629, the widely quoted value for Fisher's iris
    # (recalled from memory).
    assert z[2, 3] == pytest.approx(0.9629, abs=1e-4)
    assert figure["data"][0]["zmin"] == -1.0


def test_correlation_heatmap_keeps_one_method_and_leaves_gaps() -> None:
    pairs = [
        {"a": "x", "b": "y", "method": "pearson", "value": 0.5, "n": 10},
        {"a": "x", "b": "y", "method": "spearman", "value": 0.4, "n": 10},
        {"a": "kind", "b": "port", "method": "cramers_v", "value": 0.3, "n": 10},
        {"a": "kind", "b": "x", "method": "cramers_v", "value": float("nan"), "n": 10},
    ]
    assert correlation_methods(pairs) == ["pearson", "spearman", "cramers_v"]
    figure = correlation_figure(pairs, "cramers_v")
    go.Figure(figure)
    assert figure["data"][0]["z"] == [[1.0, 0.3], [0.3, 1.0]]
    assert figure["data"][0]["zmin"] == 0.0
    assert correlation_figure(pairs, "eta") is None


def test_crosstab_heatmap_shows_counts_shaded_by_residuals() -> None:
    section = crosstab(PENGUINS, "species", "island")
    figure = crosstab_figure(section)
    go.Figure(figure)
    trace = figure["data"][0]
    # Gentoo penguins live only on Biscoe: 124 of them (palmerpenguins, pandas crosstab).
    gentoo, biscoe = section["rows"].index("Gentoo"), section["columns"].index("Biscoe")
    assert trace["text"][gentoo][biscoe] == "124"
    assert trace["z"][gentoo][biscoe] == RESIDUAL_CAP  # far beyond +4: capped
    assert figure["layout"]["xaxis"]["ticktext"] == ["Biscoe", "Dream", "Torgersen"]
    assert trace["zmid"] == 0 and trace["zmin"] == -RESIDUAL_CAP
    row_share = trace["customdata"][gentoo][biscoe][3]
    assert row_share == "100.0 %"


def test_crosstab_table_reads_both_shapes() -> None:
    as_lists = {
        "a": "gear",
        "b": "port",
        "rows": ["net", "line"],
        "columns": ["N", "S"],
        "counts": [[3, 1], [0, 2]],
        "residuals": [[1.5, -1.5], [-1.5, 1.5]],
    }
    as_dicts = {
        "a": "gear",
        "b": "port",
        "counts": {"net": {"N": 3, "S": 1}, "line": {"N": 0, "S": 2}},
        "residuals": {"net": {"N": 1.5, "S": -1.5}, "line": {"N": -1.5, "S": 1.5}},
    }
    as_stored = {
        "a": "gear",
        "b": "port",
        "counts": {"a_labels": ["net", "line"], "b_labels": ["N", "S"], "matrix": [[3, 1], [0, 2]]},
        "residuals": [[1.5, -1.5], [-1.5, 1.5]],
    }
    assert crosstab_table(as_lists) == crosstab_table(as_dicts) == crosstab_table(as_stored)
    with pytest.raises(ValueError, match="do not match"):
        crosstab_table({"rows": ["a"], "columns": ["b"], "counts": [[1], [2]]})


def test_crosstab_labels_are_escaped() -> None:
    section = {"a": "x", "b": "y", "rows": ["<script>"], "columns": ["&"], "counts": [[1]]}
    figure = crosstab_figure(section)
    assert figure["layout"]["yaxis"]["ticktext"] == ["&lt;script&gt;"]
    assert figure["layout"]["xaxis"]["ticktext"] == ["&amp;"]
    assert figure["data"][0]["z"] == [[0.0]]  # no residuals stored: drawn neutral


def test_wide_correlation_heatmaps_keep_the_most_tied_columns() -> None:
    from server.pages.figures.relations import COLUMN_LIMIT

    names = [f"c{i:02d}" for i in range(COLUMN_LIMIT + 10)]
    # By construction: c00..c09 pair strongly with each other, every other pair weakly.
    pairs = [
        {"a": a, "b": b, "method": "pearson", "value": 0.9 if i < 10 and j < 10 else 0.1, "n": 5}
        for i, a in enumerate(names)
        for j, b in enumerate(names)
        if i < j
    ]
    figure = correlation_figure(pairs, "pearson", names)
    ticks = figure["layout"]["xaxis"]["ticktext"]
    assert len(ticks) == COLUMN_LIMIT and ticks[:10] == names[:10]
