"""Profile documents built from planted values, shaped as the design notes' profile document.

The judgement reads profiles only, so these builders compute each column's
summary from a list of values with numpy (quantiles type 7, sample std,
Tukey and modified-z outlier counts) the way the profile document defines
them. The truth of every planted fault is known by construction.
"""

from __future__ import annotations

from collections import Counter
from collections.abc import Sequence
from typing import Any

import numpy as np

MISSING_TOKENS = {"N/A", "NA", "null", "-", "?"}


def numeric_column(
    name: str,
    values: Sequence[float | None],
    *,
    sentinels: Sequence[float] = (),
    off_kind: int = 0,
    kind: str = "numeric",
) -> dict[str, Any]:
    """A numeric column's section; None is a missing cell; ``sentinels`` are reported stand-ins."""
    present = np.array([v for v in values if v is not None], dtype=float)
    missing = len(values) - len(present)
    q1, median, q3 = np.percentile(present, [25, 50, 75])
    iqr = q3 - q1
    mad = float(np.median(np.abs(present - median)))
    modified = (
        np.zeros(len(present), bool)
        if mad == 0
        else np.abs(0.6745 * (present - median) / mad) > 3.5
    )
    distinct = len(np.unique(present))
    counts = Counter(present.tolist())
    return {
        "name": name,
        "kind": kind,
        "count": len(present),
        "missing": missing,
        "missing_detail": {"null": missing, "blank": 0, "tokens": {}},
        "suspected_sentinels": [{"value": s, "count": counts[float(s)]} for s in sentinels],
        "distinct": distinct,
        "distinct_exact": True,
        "off_kind": off_kind,
        "numeric": {
            "min": float(present.min()),
            "max": float(present.max()),
            "mean": float(present.mean()),
            "std": float(present.std(ddof=1)) if len(present) > 1 else None,
            "median": float(median),
            "q1": float(q1),
            "q3": float(q3),
            "iqr": float(iqr),
            "mad": mad,
            "percentiles": np.percentile(present, np.arange(101)).tolist(),
            "outliers": {
                "tukey_low": int((present < q1 - 1.5 * iqr).sum()),
                "tukey_high": int((present > q3 + 1.5 * iqr).sum()),
                "tukey_far": int(((present < q1 - 3 * iqr) | (present > q3 + 3 * iqr)).sum()),
                "modified_z": int(modified.sum()),
            },
            "exact": True,
        },
    }


def label_column(
    name: str,
    values: Sequence[str | None],
    *,
    kind: str = "categorical",
    top: int = 20,
    variants: Sequence[Sequence[str]] = (),
) -> dict[str, Any]:
    """A label column's section; None and missing tokens are missing cells."""
    tokens = Counter(v for v in values if v is not None and v.strip() in MISSING_TOKENS)
    present = [v for v in values if v is not None and v.strip() not in MISSING_TOKENS]
    counts = Counter(present).most_common()
    n = len(present)
    listed = counts[:top]
    return {
        "name": name,
        "kind": kind,
        "count": n,
        "missing": len(values) - n,
        "missing_detail": {
            "null": sum(v is None for v in values),
            "blank": 0,
            "tokens": dict(tokens),
        },
        "suspected_sentinels": [],
        "distinct": len(counts),
        "distinct_exact": True,
        "labels": {
            "top": [{"value": v, "count": c, "share": c / n} for v, c in listed],
            "other_count": n - sum(c for _, c in listed),
            "rare": [{"value": v, "count": c, "share": c / n} for v, c in counts if c / n < 0.01],
            "variants": [list(group) for group in variants],
        },
    }


def profile_of(
    columns: list[dict[str, Any]],
    *,
    name: str = "delivery.csv",
    duplicate_rows: int = 0,
    pairs: Sequence[dict[str, Any]] = (),
    twins: Sequence[dict[str, Any]] = (),
    crosstabs: Sequence[dict[str, Any]] = (),
) -> dict[str, Any]:
    """A whole profile document around the given column sections."""
    rows = max((c["count"] + c["missing"] for c in columns), default=0)
    return {
        "format_version": 1,
        "source": {"name": name, "bytes": 0, "sha256": "0" * 64, "format": "csv"},
        "dataset": {
            "rows": rows,
            "columns": len(columns),
            "missing_cells": sum(c["missing"] for c in columns),
            "duplicate_rows": duplicate_rows,
            "parse_errors": [],
        },
        "columns": [{**c, "position": i} for i, c in enumerate(columns)],
        "pairs": list(pairs),
        "twins": list(twins),
        "crosstabs": list(crosstabs),
        "flags": [],
        "score": None,
    }


def crosstab_of(a: str, b: str, a_values: Sequence[str], b_values: Sequence[str]) -> dict:
    """A crosstab section as the engine stores it, counted from two label lists."""
    from scipy.stats import chi2_contingency

    a_labels = sorted(set(a_values))
    b_labels = sorted(set(b_values))
    matrix = np.zeros((len(a_labels), len(b_labels)), dtype=int)
    for x, y in zip(a_values, b_values, strict=True):
        matrix[a_labels.index(x), b_labels.index(y)] += 1
    result = chi2_contingency(matrix)
    return {
        "a": a,
        "b": b,
        "n": int(matrix.sum()),
        "counts": {"a_labels": a_labels, "b_labels": b_labels, "matrix": matrix.tolist()},
        "chi2": float(result.statistic),
        "dof": int(result.dof),
        "p_value": float(result.pvalue),
    }
