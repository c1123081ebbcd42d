"""A small invented delivery for browser tests: one day's landings at a harbour.

Planted faults (true by construction): -999 stands for an unknown catch in
12 rows, the water temperature is given twice (°C and °F), one berth takes
most of the landings, and 9 temperatures are missing. A column name and a
label carry markup, which must show as text.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd

HOSTILE_LABEL = "<b>Pier</b> & <script>x</script>"
HOSTILE_COLUMN = "note <i>raw</i>"


def landings_frame(rows: int = 240, seed: int = 11) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    frame = pd.DataFrame(
        {
            "berth": rng.choice(
                ["North Quay", "South Quay", "Fish Dock", HOSTILE_LABEL],
                rows,
                p=[0.7, 0.15, 0.1, 0.05],
            ),
            "vessel_class": rng.choice(["trawler", "crabber", "tug", "ferry"], rows),
            "water_temp_c": rng.normal(11.5, 1.8, rows).round(2),
            "catch_kg": rng.gamma(2.0, 140.0, rows).round(1),
            "landed_at": pd.date_range("2026-04-01 04:00", periods=rows, freq="37min").astype(str),
            HOSTILE_COLUMN: rng.choice(["ok", "late", "iced"], rows),
        }
    )
    frame["water_temp_f"] = (frame["water_temp_c"] * 9 / 5 + 32).round(2)
    frame.loc[rng.choice(rows, 12, replace=False), "catch_kg"] = -999
    frame.loc[rng.choice(rows, 9, replace=False), "water_temp_c"] = np.nan
    return frame


def write_landings(path: Path, rows: int = 240, seed: int = 11) -> Path:
    landings_frame(rows, seed).to_csv(path, index=False)
    return path
