"""Engine benchmark: `tidewaiter profile` against the parsing floor and a naive pandas routine.

Run on demand (``make bench``); pytest does not collect it. It writes two
invented cargo manifests into tests/perf/out/ (12 million rows, about 0.9 GB,
and 2 million rows), then measures, each in its own process so that wall
time and peak resident memory belong to that run alone:

- floor: ``pyarrow.csv.read_csv`` of the whole file with its default threads,
  the cost of merely parsing it (the fastest of three runs);
- reader: Tidewaiter's own reader alone (``open_table`` and every batch), to
  tell reading from profiling;
- profile: ``tidewaiter profile FILE --quiet --json /dev/null``;
- floor 1t and profile 1t: the floor without Arrow's threads and the profile
  with one profiling thread, to show how much each gains from the second core;
- pandas: the routine a person would write in a notebook (read_csv,
  describe(include="all"), quantile, value_counts per text column, corr,
  isna().sum(), duplicated().sum()).

It prints each figure and the ratios, against these targets: profile at most
2.5 x the floor, at least 6 x faster than pandas, peak memory at most 1 GB
and flat in the number of rows (2 M versus 12 M rows: at most 1.3 x).
The machine is shared with whatever else runs: compare the ratios of one
run, not absolute times across runs.

Usage: python tests/perf/bench_profile.py [--rows N] [--small-rows N] [--skip-pandas]
"""

from __future__ import annotations

import argparse
import json
import os
import subprocess
import sys
import textwrap
import time
from dataclasses import asdict, dataclass
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))

from manifests import write_manifest

OUT = Path(__file__).resolve().parent / "out"
PYTHON = sys.executable
TIDEWAITER = str(Path(sys.executable).with_name("tidewaiter"))

FLOOR = textwrap.dedent(
    """
    import sys
    import pyarrow.csv as pacsv
    threads = sys.argv[2] == "threads"
    table = pacsv.read_csv(sys.argv[1], read_options=pacsv.ReadOptions(use_threads=threads))
    print(table.num_rows)
    """
)

READ_ONLY = textwrap.dedent(
    """
    import sys
    from worker.profiling.readers import open_table
    with open_table(sys.argv[1]) as source:
        print(sum(batch.num_rows for batch in source.batches()))
    """
)

NAIVE_PANDAS = textwrap.dedent(
    """
    import sys
    import pandas as pd
    frame = pd.read_csv(sys.argv[1])
    frame.describe(include="all")
    frame.quantile([0.25, 0.5, 0.75], numeric_only=True)
    for name in frame.select_dtypes(exclude="number").columns:
        frame[name].value_counts()
    frame.corr(numeric_only=True)
    frame.isna().sum()
    print(int(frame.duplicated().sum()))
    """
)


@dataclass
class Run:
    """One measured process."""

    name: str
    rows: int
    seconds: float
    cpu_seconds: float
    peak_rss_mb: float
    exit_code: int


def measure(name: str, rows: int, command: list[str], env: dict[str, str] | None = None) -> Run:
    """Run ``command`` in its own process; wall time, CPU time (user + system, every
    thread) and that process's own peak RSS."""
    start = time.perf_counter()
    process = subprocess.Popen(
        command, stdout=subprocess.DEVNULL, env={**os.environ, **(env or {})}
    )
    _, status, usage = os.wait4(process.pid, 0)
    seconds = time.perf_counter() - start
    process.returncode = os.waitstatus_to_exitcode(status)
    cpu = usage.ru_utime + usage.ru_stime
    # ru_maxrss is in kilobytes on Linux.
    run = Run(
        name,
        rows,
        round(seconds, 2),
        round(cpu, 2),
        round(usage.ru_maxrss / 1024, 1),
        process.returncode,
    )
    print(
        f"  {name:<10} {rows:>11,} rows  {run.seconds:8.2f} s  {run.peak_rss_mb:8.0f} MB"
        f"  cpu {run.cpu_seconds:7.2f} s ({cpu / max(seconds, 1e-9):.2f} cores)"
        + ("" if run.exit_code == 0 else f"  (exit code {run.exit_code})"),
        flush=True,
    )
    return run


def figure(label: str, value: float) -> None:
    """Print one figure that has no target."""
    print(f"  {label:<34} {value:8.2f}")


def ratio(label: str, value: float, target: str, bound: float, *, below: bool = False) -> None:
    """Print one figure with its target and whether it is met."""
    ok = value <= bound if below else value >= bound
    outcome = "meets the target" if ok else "MISSES the target"
    print(f"  {label:<34} {value:8.2f}  (target {target}: {outcome})")


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("--rows", type=int, default=12_000_000)
    parser.add_argument("--small-rows", type=int, default=2_000_000)
    parser.add_argument("--skip-pandas", action="store_true", help="skip the slow pandas run")
    args = parser.parse_args()

    started = time.perf_counter()
    big = write_manifest(OUT / f"manifest-{args.rows}.csv", args.rows)
    small = write_manifest(OUT / f"manifest-{args.small_rows}.csv", args.small_rows)
    print(
        f"data: {big.name} {big.stat().st_size / 1e9:.2f} GB, "
        f"{small.name} {small.stat().st_size / 1e9:.2f} GB "
        f"(ready in {time.perf_counter() - started:.1f} s); {os.cpu_count()} cores",
        flush=True,
    )

    profile_cmd = [TIDEWAITER, "profile", "--quiet", "--json", os.devnull]
    runs = {
        # The floor's first run in a process can be several times slower than the
        # next (the kernel faulting in its 3 GB); its fastest of three is the honest floor.
        "floor": min(
            (
                measure("floor", args.rows, [PYTHON, "-c", FLOOR, str(big), "threads"])
                for _ in range(3)
            ),
            key=lambda run: run.seconds,
        ),
        "reader": measure("reader", args.rows, [PYTHON, "-c", READ_ONLY, str(big)]),
        "profile": measure("profile", args.rows, [*profile_cmd, str(big)]),
        "profile_small": measure("profile", args.small_rows, [*profile_cmd, str(small)]),
        # How much each gains from the second core: Arrow's parser without its
        # threads (fastest of three, as above), and the profile with one profiling
        # thread (its reader has one anyway).
        "floor_one": min(
            (
                measure("floor 1t", args.rows, [PYTHON, "-c", FLOOR, str(big), "one"])
                for _ in range(3)
            ),
            key=lambda run: run.seconds,
        ),
        "profile_one": measure(
            "profile 1t",
            args.rows,
            [*profile_cmd, str(big)],
            env={"TIDEWAITER_PROFILING__THREADS": "1"},
        ),
    }
    if not args.skip_pandas:
        runs["pandas"] = measure("pandas", args.rows, [PYTHON, "-c", NAIVE_PANDAS, str(big)])

    failed = [run.name for run in runs.values() if run.exit_code != 0]
    if failed:
        # A run that failed measured nothing: no ratio is printed from it.
        raise SystemExit(f"failed runs: {', '.join(failed)}; no ratios")
    floor, profile, small_profile = runs["floor"], runs["profile"], runs["profile_small"]
    print("ratios:")
    ratio("profile / floor time", profile.seconds / floor.seconds, "<= 2.5", 2.5, below=True)
    figure("reader alone / floor time", runs["reader"].seconds / floor.seconds)
    # The work done, whatever the cores the machine lent: CPU seconds side by side.
    figure("profile / floor CPU time", profile.cpu_seconds / floor.cpu_seconds)
    one_floor, one_profile = runs["floor_one"], runs["profile_one"]
    figure("profile / floor, one thread each", one_profile.seconds / one_floor.seconds)
    figure("floor: one thread / threads", one_floor.seconds / floor.seconds)
    figure("profile: one thread / threads", one_profile.seconds / profile.seconds)
    if "pandas" in runs:
        ratio("pandas / profile time", runs["pandas"].seconds / profile.seconds, ">= 6", 6)
    ratio("profile peak RSS (MB)", profile.peak_rss_mb, "<= 1024", 1024, below=True)
    label = f"RSS {args.rows:,} / {args.small_rows:,} rows"
    ratio(label, profile.peak_rss_mb / small_profile.peak_rss_mb, "<= 1.3", 1.3, below=True)
    results = OUT / "bench-results.json"
    results.write_text(json.dumps({name: asdict(run) for name, run in runs.items()}, indent=2))
    print(f"figures saved to tests/perf/out/{results.name}")
    return 0 if all(run.exit_code == 0 for run in runs.values()) else 1


if __name__ == "__main__":
    sys.exit(main())
