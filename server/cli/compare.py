"""``tidewaiter compare BASE.json TARGET.json``: the drift between two stored profiles."""

from __future__ import annotations

import argparse
import json
import sys
from pathlib import Path
from typing import Any, TextIO


def register(subparsers: argparse._SubParsersAction) -> None:
    """Add the ``compare`` subcommand."""
    parser = subparsers.add_parser(
        "compare",
        help="what changed between two profile documents",
        description="Compare a target profile with its baseline (both JSON profile documents, "
        "as `tidewaiter profile` writes them) and print the drift: schema, volume, each "
        "column's distances and the stability flags.",
    )
    parser.add_argument("baseline", type=Path, help="the baseline's profile (JSON)")
    parser.add_argument("target", type=Path, help="the target's profile (JSON)")
    parser.add_argument(
        "--json",
        dest="json_out",
        metavar="OUT",
        help="also write the drift document as JSON to OUT ('-' for standard output only)",
    )
    parser.set_defaults(handler=run)


class ProfileFileError(Exception):
    """A profile file that cannot be read; the message says why."""


def read_profile(path: Path) -> dict[str, Any]:
    """A profile document read from a JSON file, with a plain error when it is not one."""
    try:
        document = json.loads(path.read_text(encoding="utf-8"))
    except FileNotFoundError:
        raise ProfileFileError(f"{path}: no such file") from None
    except (OSError, UnicodeDecodeError) as exc:
        raise ProfileFileError(f"{path}: cannot be read ({exc})") from None
    except json.JSONDecodeError as exc:
        raise ProfileFileError(f"{path}: not JSON (line {exc.lineno}: {exc.msg})") from None
    if not isinstance(document, dict) or not isinstance(document.get("columns"), list):
        raise ProfileFileError(f"{path}: not a profile document (no 'columns' list)")
    return document


def _fmt(value: Any, digits: int = 3) -> str:
    if value is None:
        return "-"
    if isinstance(value, float):
        return f"{value:.{digits}f}"
    return str(value)


def print_drift(drift: dict[str, Any], out: TextIO) -> None:
    """The drift document as text a person reads in a terminal."""
    volume = drift["volume"]
    ratio = volume["ratio"]
    out.write(
        f"baseline {drift['baseline']['name']} ({volume['rows_baseline']} rows) -> "
        f"target {drift['target']['name']} ({volume['rows_target']} rows"
        + (f", ratio {ratio:.3f})\n" if ratio is not None else ")\n")
    )
    schema = drift["schema"]
    for word, key in (("added", "added"), ("removed", "removed")):
        if schema[key]:
            out.write(f"columns {word}: {', '.join(schema[key])}\n")
    for rename in schema["renamed"]:
        out.write(f"renamed: {rename['from']} -> {rename['to']} {rename['evidence']}\n")
    for change in schema["kind_changed"]:
        out.write(f"kind changed: {change['name']} {change['from']} -> {change['to']}\n")
    header = ("column", "kind", "psi", "ks", "mean_shift_sd", "missing_change", "js", "chi2_p")
    rows = [
        (
            c["name"],
            c.get("kind") or "-",
            _fmt(c["psi"]),
            _fmt(c["ks"]),
            _fmt(c["mean_shift_sd"], 2),
            _fmt(c["missing_share_change"]),
            _fmt(c["js_distance"]),
            _fmt(c["chi2_p_value"], 4),
        )
        for c in drift["columns"]
    ]
    widths = [max(len(str(r[i])) for r in [header, *rows]) for i in range(len(header))]
    for row in [header, *rows]:
        out.write("  ".join(str(v).ljust(w) for v, w in zip(row, widths, strict=True)).rstrip())
        out.write("\n")
    if not drift["flags"]:
        out.write("no stability flags\n")
    for flag in drift["flags"]:
        out.write(f"[{flag['severity']}] {flag['code']}: {flag['message']}\n")


def run(args: argparse.Namespace) -> int:
    """Compare the two profiles; exit code 0, or 2 when a file is not a profile."""
    from server.settings import get_settings
    from worker.profiling.judgement import compare_profiles

    try:
        baseline, target = read_profile(args.baseline), read_profile(args.target)
    except ProfileFileError as exc:
        print(f"tidewaiter compare: {exc}", file=sys.stderr)
        return 2
    drift = compare_profiles(baseline, target, thresholds=get_settings().profiling.thresholds)
    document = json.dumps(drift, indent=2, ensure_ascii=False)
    if args.json_out == "-":
        sys.stdout.write(document + "\n")
        return 0
    print_drift(drift, sys.stdout)
    if args.json_out:
        Path(args.json_out).write_text(document + "\n", encoding="utf-8")
    return 0
