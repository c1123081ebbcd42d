"""Subcommands that run the service: serve, worker, sweep, db, demo."""

from __future__ import annotations

import argparse

from server.settings import get_settings


def register(subparsers: argparse._SubParsersAction) -> None:
    """Add the service subcommands."""
    db = subparsers.add_parser("db", help="migrate the database schema")
    db_commands = db.add_subparsers(dest="db_command", required=True, metavar="ACTION")
    up = db_commands.add_parser("upgrade", help="migrate up (to the newest schema by default)")
    up.add_argument("revision", nargs="?", default="head")
    up.set_defaults(handler=_db_upgrade)
    down = db_commands.add_parser("downgrade", help="migrate down to a revision")
    down.add_argument("revision", help='target revision, "-1" for one step, "base" for none')
    down.set_defaults(handler=_db_downgrade)


def _db_upgrade(args: argparse.Namespace) -> int:
    from server.store import schema

    settings = get_settings()
    if settings.resolved_database_url.startswith("sqlite"):
        settings.data_dir.mkdir(parents=True, exist_ok=True)
    schema.upgrade(settings.resolved_database_url, args.revision)
    print(f"database schema at {args.revision} ({_safe_url(settings.resolved_database_url)})")
    return 0


def _db_downgrade(args: argparse.Namespace) -> int:
    from server.store import schema

    url = get_settings().resolved_database_url
    schema.downgrade(url, args.revision)
    print(f"database schema at {args.revision} ({_safe_url(url)})")
    return 0


def _safe_url(url: str) -> str:
    """The URL with any password hidden, for printing."""
    from sqlalchemy.engine import make_url

    return make_url(url).render_as_string(hide_password=True)
