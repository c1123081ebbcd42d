"""Subcommands that use the profiling engine alone: ``tidewaiter profile``.

``tidewaiter profile FILE`` profiles one file on this machine, without the
service: the profile document goes to stdout (or ``--json OUT``), a
standalone HTML report to ``--html OUT``. A progress bar is drawn on stderr
when it is a terminal. An unreadable file ends with exit code 2 and one line
naming the reason.
"""

from __future__ import annotations

import argparse
import json
import math
import sys
import time
from pathlib import Path
from typing import Any, TextIO

from worker.filedigest import FileDigest

EXIT_UNREADABLE = 2
EXIT_OUTPUT_FAILED = 1
BAR_WIDTH = 30


def register(subparsers: argparse._SubParsersAction) -> None:
    """Add the engine subcommands."""
    parser = subparsers.add_parser(
        "profile",
        help="profile one file and write its profile document",
        description="Profile one delivered file (CSV and other delimited text, gzip or zip "
        "of them, .xlsx, Parquet, JSON Lines). Without --json or --html the profile "
        "document is written to stdout.",
    )
    parser.add_argument("file", type=Path, metavar="FILE", help="the file to profile")
    parser.add_argument("--json", type=Path, metavar="OUT", help="write the profile here")
    parser.add_argument(
        "--html", type=Path, metavar="OUT", help="write a standalone HTML report here"
    )
    parser.add_argument("--sheet", metavar="NAME", help="the sheet of an Excel workbook")
    parser.add_argument("--quiet", action="store_true", help="no progress bar")
    parser.set_defaults(handler=run_profile)


def run_profile(args: argparse.Namespace) -> int:
    """Profile ``args.file`` and write what was asked for; returns the exit code."""
    render = None
    if args.html is not None:
        render = _report_renderer()
        if render is None:
            print("tidewaiter: the HTML report is not available yet", file=sys.stderr)
            return EXIT_UNREADABLE
    # The file's digest starts before the engine's imports, which keep one core busy
    # for half a second and leave the other idle.
    digest = FileDigest(args.file) if args.file.is_file() else None
    from server.settings import get_settings
    from worker.profiling import ProfileError, profile_file

    bar = ProgressBar(sys.stderr) if not args.quiet and sys.stderr.isatty() else None
    try:
        profile = profile_file(
            args.file,
            get_settings().profiling,
            progress=bar.update if bar else None,
            sheet=args.sheet,
            sha256=digest,
        )
    except ProfileError as exc:
        if bar:
            bar.clear()
        print(f"tidewaiter: cannot profile {args.file.name}: {exc}", file=sys.stderr)
        return EXIT_UNREADABLE
    except KeyboardInterrupt:
        if bar:
            bar.clear()
        return 130
    if bar:
        bar.clear()
    document = json.dumps(plain(profile), indent=2, ensure_ascii=False, allow_nan=False)
    try:
        if args.json is not None:
            write_whole(args.json, document + "\n")
        elif args.html is None:
            sys.stdout.write(document + "\n")
        if render is not None:
            write_whole(args.html, render(profile))
    except OSError as exc:
        print(f"tidewaiter: cannot write the output: {exc}", file=sys.stderr)
        return EXIT_OUTPUT_FAILED
    return 0


def write_whole(path: Path, text: str) -> None:
    """Write ``text`` to ``path`` so that a reader never sees half a file.

    A regular file is written beside its place and then moved there; a
    device such as /dev/null is written directly.
    """
    if path.exists() and not path.is_file():
        path.write_text(text, encoding="utf-8")
        return
    partial = path.with_name(f".{path.name}.partial")
    partial.write_text(text, encoding="utf-8")
    partial.replace(path)


def _report_renderer() -> Any:
    """``server.pages.report.render_report``, or None while it does not exist."""
    try:
        from server.pages.report import render_report
    except ImportError:
        return None
    return render_report


def plain(value: Any) -> Any:
    """The profile with numpy scalars as Python numbers and NaN or infinity as null.

    Strict JSON has no NaN; a reader of the document must never meet one.
    """
    if isinstance(value, dict):
        return {str(key): plain(item) for key, item in value.items()}
    if isinstance(value, list | tuple):
        return [plain(item) for item in value]
    if hasattr(value, "item") and callable(value.item) and not isinstance(value, str | bytes):
        value = value.item()
    if isinstance(value, float) and not math.isfinite(value):
        return None
    return value


class ProgressBar:
    """A one-line bar on a terminal: stage, bar and share, redrawn at most ten times a second."""

    def __init__(self, stream: TextIO, *, interval: float = 0.1) -> None:
        self._stream = stream
        self._interval = interval
        self._last_draw = 0.0
        self._last: tuple[str, int] | None = None

    def update(self, stage: str, share: float) -> None:
        """Show ``stage`` at ``share`` (0 to 1) of the work."""
        percent = max(0, min(100, round(share * 100)))
        now = time.monotonic()
        if (stage, percent) == self._last:
            return
        if self._last and stage == self._last[0] and now - self._last_draw < self._interval:
            return
        filled = percent * BAR_WIDTH // 100
        line = f"\r{stage:<12} [{'#' * filled}{'.' * (BAR_WIDTH - filled)}] {percent:3d}%"
        self._stream.write(line)
        self._stream.flush()
        self._last, self._last_draw = (stage, percent), now

    def clear(self) -> None:
        """Erase the bar so the next message starts on a clean line."""
        if self._last is not None:
            self._stream.write("\r" + " " * (BAR_WIDTH + 20) + "\r")
            self._stream.flush()
            self._last = None
