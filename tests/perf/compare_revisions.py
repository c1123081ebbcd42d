"""`tidewaiter profile` of the working tree against an earlier revision, run in turns.

Run on demand; pytest does not collect it. The whole profile's wall time
drifts by a second or more between minutes on a shared machine, so a change
is judged by profiling the same file with the earlier revision and with the
working tree alternately, several times, and comparing medians measured in
the same minutes. The earlier revision is checked out into a temporary git
worktree; both run with this virtual environment's Python, each with its own
tree first on the import path (each run prints which tree it imported, so a
mix-up cannot go unnoticed). Each tree's compiled passes (the ext-modules of its
pyproject.toml) are built in place first, so neither runs a stale build.

Usage: python tests/perf/compare_revisions.py REVISION FILE [--runs N]
"""

from __future__ import annotations

import argparse
import os
import statistics
import subprocess
import sys
import sysconfig
import tempfile
import time
import tomllib
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
PROFILE = (
    "import sys, worker\n"
    "from server.cli import main\n"
    "print(worker.__file__, file=sys.stderr)\n"
    "sys.exit(main(['profile', '--quiet', '--json', '/dev/null', sys.argv[1]]))\n"
)


def build_native(tree: Path) -> None:
    """Compile ``tree``'s C extension modules in place with the flags its pyproject.toml
    gives pip (revisions from before there were any need nothing)."""
    config = tomllib.loads((tree / "pyproject.toml").read_text())
    modules = config.get("tool", {}).get("setuptools", {}).get("ext-modules", [])
    include = sysconfig.get_paths()["include"]
    suffix = sysconfig.get_config_var("EXT_SUFFIX")
    for module in modules:
        target = tree / (module["name"].replace(".", "/") + suffix)
        sources = [str(tree / source) for source in module["sources"]]
        flags = module.get("extra-compile-args", [])
        command = ["cc", "-shared", "-fPIC", *flags, f"-I{include}", *sources, "-o", str(target)]
        subprocess.run(command, check=True)


def run_once(tree: Path, data: Path) -> tuple[float, float, float]:
    """Wall seconds, CPU seconds and peak RSS (MB) of one profile with ``tree``'s code."""
    environment = {**os.environ, "PYTHONPATH": str(tree)}
    start = time.perf_counter()
    process = subprocess.Popen(
        [sys.executable, "-c", PROFILE, str(data)],
        cwd=tree,
        env=environment,
        stdout=subprocess.DEVNULL,
        stderr=subprocess.PIPE,
        text=True,
    )
    _, status, usage = os.wait4(process.pid, 0)
    wall = time.perf_counter() - start
    imported = process.stderr.read().strip().splitlines() if process.stderr else []
    if os.waitstatus_to_exitcode(status) != 0 or not imported:
        raise SystemExit(f"profiling with {tree} failed: {' '.join(imported)[-300:]}")
    if not imported[0].startswith(str(tree)):
        raise SystemExit(f"{tree} ran code from {imported[0]}")
    return wall, usage.ru_utime + usage.ru_stime, usage.ru_maxrss / 1024


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("revision", help="the earlier revision, e.g. HEAD~3 or a commit")
    parser.add_argument("file", type=Path, help="the delivery to profile")
    parser.add_argument("--runs", type=int, default=3, help="runs of each, in turns")
    args = parser.parse_args()
    data = args.file.resolve()
    with tempfile.TemporaryDirectory() as scratch:
        earlier = Path(scratch) / "earlier"
        subprocess.run(
            ["git", "worktree", "add", "--detach", str(earlier), args.revision],
            cwd=ROOT,
            check=True,
            capture_output=True,
        )
        try:
            build_native(earlier)
            build_native(ROOT)
            runs: dict[str, list[tuple[float, float, float]]] = {"earlier": [], "working": []}
            for turn in range(args.runs):
                for name, tree in (("earlier", earlier), ("working", ROOT)):
                    wall, cpu, rss = run_once(tree, data)
                    runs[name].append((wall, cpu, rss))
                    print(f"  {turn + 1}  {name:<8} {wall:7.2f} s  cpu {cpu:7.2f} s  {rss:6.0f} MB")
        finally:
            subprocess.run(
                ["git", "worktree", "remove", "--force", str(earlier)], cwd=ROOT, check=True
            )
    medians = {
        name: [statistics.median(run[i] for run in values) for i in range(3)]
        for name, values in runs.items()
    }
    for name, (wall, cpu, rss) in medians.items():
        print(f"median {name:<8} {wall:7.2f} s  cpu {cpu:7.2f} s  {rss:6.0f} MB")
    (wall_a, cpu_a, _), (wall_b, cpu_b, _) = medians["earlier"], medians["working"]
    print(f"working / earlier: wall {wall_b / wall_a:.2f}, cpu {cpu_b / cpu_a:.2f}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
