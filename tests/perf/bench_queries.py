"""Benchmark of the on-demand questions over a columnar copy of 1 million rows (run on demand).

    .venv/bin/python tests/perf/bench_queries.py [--rows 1000000]

Builds the invented cargo manifest of the engine benchmark as raw text, writes
its columnar copy with ColumnarCopy, then times each question (median of five
runs, after one warm-up) beside what a person would write with pandas over the
same Parquet file (read the columns, trim, count) and beside a polars lazy scan
(the alternative design: trim and filter inside polars), and prints the times
and the ratio pandas / ours.
The target: every question well under a second.
"""

from __future__ import annotations

import argparse
import statistics
import sys
import tempfile
import time
from collections.abc import Callable
from pathlib import Path

import pandas as pd
import polars as pl
import pyarrow.csv as pacsv

sys.path.insert(0, str(Path(__file__).resolve().parents[2]))

from tests.perf.manifests import write_manifest
from worker.profiling.columnar import ColumnarCopy
from worker.profiling.queries import column_values, crosstab, label_counts, sample_rows


def timed(call: Callable[[], object], runs: int = 5) -> float:
    call()
    times = []
    for _ in range(runs):
        start = time.perf_counter()
        call()
        times.append(time.perf_counter() - start)
    return statistics.median(times)


def build_copy(folder: Path, rows: int) -> Path:
    csv_path = write_manifest(folder / f"manifest-{rows}.csv", rows)
    names = pacsv.read_csv(csv_path, read_options=pacsv.ReadOptions(skip_rows_after_names=rows))
    text = {name: "string" for name in names.column_names}
    reader = pacsv.open_csv(
        csv_path,
        convert_options=pacsv.ConvertOptions(column_types=text, strings_can_be_null=True),
    )
    target = folder / f"manifest-{rows}.parquet"
    with ColumnarCopy(target) as copy:
        for batch in reader:
            copy.write(batch)
    return target


def pandas_frame(path: Path, columns: list[str]) -> pd.DataFrame:
    frame = pd.read_parquet(path, columns=columns)
    return frame.apply(lambda column: column.str.strip())


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--rows", type=int, default=1_000_000)
    args = parser.parse_args()
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp)
        start = time.perf_counter()
        path = build_copy(folder, args.rows)
        print(
            f"columnar copy of {args.rows:,} rows: {path.stat().st_size / 1e6:.1f} MB, "
            f"built in {time.perf_counter() - start:.1f} s"
        )

        def pandas_crosstab_within() -> object:
            frame = pandas_frame(path, ["cargo_class", "status", "berth"])
            frame = frame[frame["berth"] == "berth-001"]
            return pd.crosstab(frame["cargo_class"], frame["status"])

        def pandas_crosstab() -> object:
            frame = pandas_frame(path, ["cargo_class", "status"])
            return pd.crosstab(frame["cargo_class"], frame["status"])

        def pandas_label_counts() -> object:
            frame = pandas_frame(path, ["berth", "cargo_class"])
            return frame[frame["cargo_class"] == "reefer"]["berth"].value_counts()

        def pandas_sample() -> object:
            frame = pd.read_parquet(path)
            hold = frame["status"].str.strip() == "held"
            return frame[hold].sample(20, random_state=0)

        def pandas_values() -> object:
            return pd.read_parquet(path, columns=["crate_id"])["crate_id"].iloc[500_000:500_050]

        def scan(columns: list[str]) -> pl.LazyFrame:
            return pl.scan_parquet(path).select(
                [pl.col(name).str.strip_chars() for name in columns]
            )

        def polars_crosstab_within() -> object:
            frame = scan(["cargo_class", "status", "berth"])
            frame = frame.filter(pl.col("berth") == "berth-001")
            return frame.group_by("cargo_class", "status").len().collect()

        def polars_crosstab() -> object:
            return scan(["cargo_class", "status"]).group_by("cargo_class", "status").len().collect()

        def polars_label_counts() -> object:
            frame = scan(["berth", "cargo_class"]).filter(pl.col("cargo_class") == "reefer")
            return frame.group_by("berth").len().collect()

        def polars_sample() -> object:
            frame = pl.scan_parquet(path).with_row_index("row")
            held = frame.filter(pl.col("status").str.strip_chars() == "held").collect()
            return held.sample(20, seed=0)

        def polars_values() -> object:
            return pl.scan_parquet(path).select("crate_id").slice(500_000, 50).collect()

        cases = [
            (
                "crosstab cargo_class × status where berth = berth-001",
                lambda: crosstab(path, "cargo_class", "status", {"berth": "berth-001"}),
                pandas_crosstab_within,
                polars_crosstab_within,
            ),
            (
                "crosstab cargo_class × status",
                lambda: crosstab(path, "cargo_class", "status"),
                pandas_crosstab,
                polars_crosstab,
            ),
            (
                "label counts of berth where cargo_class = reefer",
                lambda: label_counts(path, "berth", {"cargo_class": "reefer"}),
                pandas_label_counts,
                polars_label_counts,
            ),
            (
                "20 sample rows where status = held",
                lambda: sample_rows(path, 20, {"status": "held"}),
                pandas_sample,
                polars_sample,
            ),
            (
                "50 values of crate_id from row 500,000",
                lambda: column_values(path, "crate_id", 50, offset=500_000),
                pandas_values,
                polars_values,
            ),
        ]
        header = f"{'question':<55} {'tidewaiter s':>12} {'pandas s':>9} {'polars s':>9}"
        print(f"{header} {'pandas/ours':>12}")
        for name, ours, theirs, lazy in cases:
            mine, reference, other = timed(ours), timed(theirs), timed(lazy)
            print(
                f"{name:<55} {mine:>12.3f} {reference:>9.3f} {other:>9.3f}"
                f" {reference / mine:>11.1f}x"
            )


if __name__ == "__main__":
    main()
