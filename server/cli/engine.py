"""Subcommands that use the profiling engine alone: profile, compare."""

from __future__ import annotations

import argparse


def register(subparsers: argparse._SubParsersAction) -> None:
    """Add the engine subcommands."""
