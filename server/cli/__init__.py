"""The ``tidewaiter`` command.

Each module of this package adds one group of subcommands through its
``register(subparsers)`` function; ``main`` wires them together. The modules
import what their commands need when a command runs, so starting one command
does not load the settings, the engine or the service of every other.
"""

from __future__ import annotations

import argparse
import sys
from collections.abc import Sequence

from server.cli import accounts, compare, engine, service

COMMAND_GROUPS = (service, engine, compare, accounts)


def build_parser() -> argparse.ArgumentParser:
    """The full argument parser, with every subcommand."""
    parser = argparse.ArgumentParser(
        prog="tidewaiter", description="Intake desk for partner data files."
    )
    subparsers = parser.add_subparsers(dest="command", required=True, metavar="COMMAND")
    for group in COMMAND_GROUPS:
        group.register(subparsers)
    return parser


def main(argv: Sequence[str] | None = None) -> int:
    """Run one subcommand; returns the process exit code."""
    args = build_parser().parse_args(argv)
    return int(args.handler(args) or 0)


if __name__ == "__main__":
    sys.exit(main())
