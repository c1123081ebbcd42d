"""The across-column findings as the engine puts them in a profile (planted faults)."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd
import pytest
from scipy.stats import pearsonr

from worker.profiling import profile_file


def planted_delivery(path: Path) -> pd.DataFrame:
    """Invented buoy readings with planted faults, truth known by construction:
    a °C/°F twin pair, a kg/lb twin pair, two sensors that fail together, and
    thirty lines sent twice."""
    rng = np.random.default_rng(30)
    rows = 1500
    water = rng.normal(11, 4, rows).round(2)
    anchor = rng.gamma(6, 20, rows).round(2)
    failed = rng.random(rows) < 0.1
    frame = pd.DataFrame(
        {
            "buoy": rng.choice(["B-North", "B-Reef", "B-Cove"], rows),
            "sea_state": rng.choice(["calm", "choppy", "rough"], rows),
            "water_c": water,
            "water_f": (water * 1.8 + 32).round(2),
            "anchor_kg": anchor,
            "anchor_lb": (anchor * 2.20462262).round(2),
            "wave_m": np.where(failed, np.nan, rng.gamma(2, 0.6, rows).round(2)),
            "gust_kn": np.where(failed, np.nan, rng.gamma(3, 5, rows).round(1)),
        }
    )
    frame = pd.concat([frame, frame.iloc[100:130]], ignore_index=True)
    frame.to_csv(path, index=False)
    return frame


def test_planted_faults_are_found(tmp_path: Path) -> None:
    path = tmp_path / "buoys.csv"
    frame = planted_delivery(path)
    profile = profile_file(path)
    hints = {(t["a"], t["b"]): t["hint"] for t in profile["twins"]}
    assert hints == {
        ("water_c", "water_f"): "water_c in °C, water_f in °F",
        ("anchor_kg", "anchor_lb"): "anchor_kg in kg, anchor_lb in lb",
    }
    text = pd.read_csv(path, dtype=str, keep_default_na=False)
    assert profile["dataset"]["duplicate_rows"] == int(text.duplicated().sum()) == 30  # pandas
    together = {(m["a"], m["b"]) for m in profile["dataset"]["missing_together"]}
    assert together == {("wave_m", "gust_kn")}
    pearson = {(p["a"], p["b"]): p["value"] for p in profile["pairs"] if p["method"] == "pearson"}
    both = frame[["wave_m", "gust_kn"]].dropna()
    reference = pearsonr(both["wave_m"], both["gust_kn"]).statistic  # scipy
    assert pearson[("wave_m", "gust_kn")] == pytest.approx(reference, rel=1e-9)
    crosstab_pairs = {(c["a"], c["b"]) for c in profile["crosstabs"]}
    assert crosstab_pairs == {("buoy", "sea_state")}
