"""Benchmark of the judgement of wide files (run on demand).

    .venv/bin/python tests/perf/bench_judgement.py [--columns 200]

Builds invented profiles of COLUMNS numeric columns and times, side by side
in one run (median of five runs): assess() of one profile, compare_profiles()
of two deliveries with the same column names, and compare_profiles() of two
deliveries whose every column was renamed (the worst case of the rename
search), printing each time and its ratio to the first. The target: a wide
delivery is judged in a few seconds at most, so the job never waits on it.
"""

from __future__ import annotations

import argparse
import statistics
import sys
import time
from collections.abc import Callable
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[2]))

from tests.worker.profiling.judgement.planted import numeric_column, profile_of
from worker.profiling.judgement import FlagThresholds, assess, compare_profiles


def _median_seconds(task: Callable[[], object], runs: int = 5) -> float:
    task()
    times = []
    for _ in range(runs):
        start = time.perf_counter()
        task()
        times.append(time.perf_counter() - start)
    return statistics.median(times)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--columns", type=int, default=200)
    parser.add_argument("--rows", type=int, default=2000)
    args = parser.parse_args()
    rng = np.random.default_rng(0)
    t = FlagThresholds()

    def delivery(prefix: str) -> dict:
        return profile_of(
            [
                numeric_column(f"{prefix}{i}", rng.normal(i, 1, args.rows).tolist())
                for i in range(args.columns)
            ]
        )

    march, april, renamed = delivery("gauge_"), delivery("gauge_"), delivery("sensor_")
    results = {
        "assess one profile": _median_seconds(lambda: assess(april, thresholds=t)),
        "drift, same names": _median_seconds(lambda: compare_profiles(march, april, thresholds=t)),
        "drift, every column renamed": _median_seconds(
            lambda: compare_profiles(march, renamed, thresholds=t)
        ),
    }
    first = next(iter(results.values()))
    print(f"{args.columns} numeric columns, {args.rows} rows each")
    for name, seconds in results.items():
        print(f"{name:32s} {seconds * 1000:9.1f} ms  ratio {seconds / first:6.2f}")


if __name__ == "__main__":
    main()
