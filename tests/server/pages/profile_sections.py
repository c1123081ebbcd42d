"""Profile-document sections built from raw values with numpy and scipy.

The figure and report tests need sections shaped as DESIGN.md describes them.
Building them here from reference libraries (numpy's histogram and type 7
percentiles, scipy's Gaussian kernel density, pandas' moments) keeps those
tests independent of the engine.
"""

from __future__ import annotations

from typing import Any

import numpy as np
import pandas as pd
from scipy import stats


def numeric_column(name: str, values: pd.Series, position: int = 0) -> dict[str, Any]:
    """A numeric column entry: moments from pandas, quantiles from numpy, density from scipy."""
    present = values.dropna().to_numpy(dtype=float)
    counts, edges = np.histogram(present, bins="auto")
    q1, median, q3 = np.percentile(present, [25, 50, 75])
    grid = np.linspace(present.min(), present.max(), 64)
    density = stats.gaussian_kde(present)(grid) if np.ptp(present) > 0 else np.ones_like(grid)
    return {
        "name": name,
        "position": position,
        "kind": "numeric",
        "count": int(present.size),
        "missing": int(values.isna().sum()),
        "missing_detail": {"null": int(values.isna().sum()), "blank": 0, "tokens": {}},
        "suspected_sentinels": [],
        "distinct": int(np.unique(present).size),
        "distinct_exact": True,
        "numeric": {
            "min": float(present.min()),
            "max": float(present.max()),
            "mean": float(present.mean()),
            "std": float(present.std(ddof=1)),
            "q1": float(q1),
            "median": float(median),
            "q3": float(q3),
            "iqr": float(q3 - q1),
            "percentiles": [float(p) for p in np.percentile(present, np.arange(101))],
            "histogram": {"edges": edges.tolist(), "counts": counts.tolist()},
            "density": {"x": grid.tolist(), "y": density.tolist()},
            "exact": True,
        },
    }


def label_column(name: str, values: pd.Series, position: int = 0, top: int = 10) -> dict[str, Any]:
    """A categorical column entry with its most frequent labels and the rest."""
    present = values.dropna().astype(str)
    counts = present.value_counts()
    shown = counts.iloc[:top]
    return {
        "name": name,
        "position": position,
        "kind": "categorical",
        "count": int(present.size),
        "missing": int(values.isna().sum()),
        "missing_detail": {"null": int(values.isna().sum()), "blank": 0, "tokens": {}},
        "suspected_sentinels": [],
        "distinct": int(counts.size),
        "distinct_exact": True,
        "labels": {
            "top": [
                {"value": str(v), "count": int(n), "share": float(n / present.size)}
                for v, n in shown.items()
            ],
            "other_count": int(counts.iloc[top:].sum()),
        },
    }


def crosstab(frame: pd.DataFrame, a: str, b: str) -> dict[str, Any]:
    """A crosstab entry: counts from pandas, chi-square from scipy, adjusted residuals.

    Adjusted residuals are (observed - expected) / sqrt(expected·(1 - row share)·(1 - column
    share)), after Haberman (1973).
    """
    table = pd.crosstab(frame[a], frame[b])
    observed = table.to_numpy(dtype=float)
    chi2, p_value, dof, expected = stats.chi2_contingency(observed, correction=False)
    total = observed.sum()
    row_share = observed.sum(axis=1, keepdims=True) / total
    col_share = observed.sum(axis=0, keepdims=True) / total
    residuals = (observed - expected) / np.sqrt(expected * (1 - row_share) * (1 - col_share))
    return {
        "a": a,
        "b": b,
        "rows": [str(r) for r in table.index],
        "columns": [str(c) for c in table.columns],
        "counts": observed.astype(int).tolist(),
        "chi2": float(chi2),
        "dof": int(dof),
        "p_value": float(p_value),
        "residuals": residuals.tolist(),
    }


def pearson_pairs(frame: pd.DataFrame) -> list[dict[str, Any]]:
    """Pearson pairs of every two numeric columns, from pandas."""
    corr = frame.corr(method="pearson")
    names = list(corr.columns)
    return [
        {"a": a, "b": b, "method": "pearson", "value": float(corr.loc[a, b]), "n": len(frame)}
        for i, a in enumerate(names)
        for b in names[i + 1 :]
    ]
