"""Subcommands that run the service: serve, worker, db, demo."""

from __future__ import annotations

import argparse


def register(subparsers: argparse._SubParsersAction) -> None:
    """Add the service subcommands."""
