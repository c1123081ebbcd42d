"""Invented cargo manifests for the engine benchmark, generated fast.

A harbour's receiving office gets one row per crate from its shipping
partners. The columns mix every kind the engine must handle: integers, floats
with empty cells, a date, label columns of 4, 5 and 200 labels, a pair of
twin columns (kilograms and pounds) and an identifier with millions of
distinct values. Everything is vectorised (numpy, then pyarrow's CSV writer),
so ten million rows take seconds, not minutes.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pyarrow as pa
import pyarrow.compute as pc
import pyarrow.csv as pacsv

STATUSES = np.array(["landed", "held", "released", "returned"])
CARGO_CLASSES = np.array(["bulk", "reefer", "tank", "dry", "fragile"])
BERTHS = np.array([f"berth-{n:03d}" for n in range(1, 201)])
CHUNK_ROWS = 1_000_000


def _chunk(rng: np.random.Generator, start: int, rows: int, total: int) -> pa.Table:
    """One chunk of ``rows`` manifest rows, the first numbered ``start``."""
    crate = rng.permutation(np.arange(start, start + rows)) * 7919 % (total * 11) + 10**7
    crate_ids = pc.binary_join_element_wise("CR-", pc.cast(pa.array(crate), pa.string()), "")
    kg = np.round(rng.gamma(2.0, 180.0, rows), 2)
    kg_missing = rng.random(rows) < 0.03
    temp = np.round(rng.normal(4.0, 2.5, rows), 1)
    temp_missing = rng.random(rows) < 0.10
    days = rng.integers(0, 3 * 365, rows).astype("timedelta64[D]") + np.datetime64("2024-01-01")
    declared = rng.integers(1, 400, rows)
    declared[rng.random(rows) < 0.001] = -999
    berth_weights = 1.0 / np.arange(1, 201)
    return pa.table(
        {
            "crate_id": crate_ids,
            "berth": BERTHS[rng.choice(200, rows, p=berth_weights / berth_weights.sum())],
            "cargo_class": CARGO_CLASSES[rng.choice(5, rows, p=[0.4, 0.2, 0.2, 0.15, 0.05])],
            "status": STATUSES[rng.integers(0, 4, rows)],
            "landed_on": pc.strftime(pa.array(days), "%Y-%m-%d"),
            "pieces": rng.integers(1, 60, rows),
            "declared_pieces": declared,
            "weight_kg": pa.array(kg, mask=kg_missing),
            "weight_lb": pa.array(np.round(kg * 2.20462262, 2), mask=kg_missing),
            "hold_temp_c": pa.array(temp, mask=temp_missing),
            "duty_paid": np.round(rng.lognormal(5.0, 1.0, rows), 2),
            "inspection_score": rng.integers(0, 11, rows),
        }
    )


def write_manifest(path: Path, rows: int, *, seed: int = 20261201) -> Path:
    """Write ``rows`` manifest rows as CSV to ``path`` (skipped if it already exists)."""
    if path.exists():
        return path
    path.parent.mkdir(parents=True, exist_ok=True)
    rng = np.random.default_rng(seed)
    partial = path.with_suffix(".part")
    writer = None
    try:
        for start in range(0, rows, CHUNK_ROWS):
            table = _chunk(rng, start, min(CHUNK_ROWS, rows - start), rows)
            if writer is None:
                writer = pacsv.CSVWriter(
                    partial, table.schema, write_options=pacsv.WriteOptions(quoting_style="none")
                )
            writer.write_table(table)
    finally:
        if writer is not None:
            writer.close()
    partial.rename(path)
    return path
