"""Subcommands that run the service: serve, worker, sweep, db, demo, settings."""

from __future__ import annotations

import argparse
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from server.settings import Settings


def register(subparsers: argparse._SubParsersAction) -> None:
    """Add the service subcommands."""
    _register_running(subparsers)
    db = subparsers.add_parser("db", help="migrate the database schema")
    db_commands = db.add_subparsers(dest="db_command", required=True, metavar="ACTION")
    up = db_commands.add_parser("upgrade", help="migrate up (to the newest schema by default)")
    up.add_argument("revision", nargs="?", default="head")
    up.set_defaults(handler=_db_upgrade)
    down = db_commands.add_parser("downgrade", help="migrate down to a revision")
    down.add_argument("revision", help='target revision, "-1" for one step, "base" for none')
    down.set_defaults(handler=_db_downgrade)


def _db_upgrade(args: argparse.Namespace) -> int:
    from server.settings import get_settings
    from server.store import schema

    settings = get_settings()
    if settings.resolved_database_url.startswith("sqlite"):
        settings.data_dir.mkdir(parents=True, exist_ok=True)
    schema.upgrade(settings.resolved_database_url, args.revision)
    print(f"database schema at {args.revision} ({_safe_url(settings.resolved_database_url)})")
    return 0


def _db_downgrade(args: argparse.Namespace) -> int:
    from server.settings import get_settings
    from server.store import schema

    url = get_settings().resolved_database_url
    schema.downgrade(url, args.revision)
    print(f"database schema at {args.revision} ({_safe_url(url)})")
    return 0


def _safe_url(url: str) -> str:
    """The URL with any password hidden, for printing."""
    from sqlalchemy.engine import make_url

    return make_url(url).render_as_string(hide_password=True)


def _sign_in_notice(settings: Settings) -> list[str]:
    """How to sign in: the demo accounts while they exist, else how to add a user."""
    from server.security.demo_accounts import sign_in_notice
    from server.store import session_scope

    try:
        with session_scope(settings) as session:
            lines = sign_in_notice(session)
    except Exception:  # no schema yet: `tidewaiter db upgrade` comes first
        return ["Run `tidewaiter db upgrade` first, then `tidewaiter user add NAME --role admin`."]
    return lines or ["Sign in with an account from `tidewaiter user add NAME --role ROLE`."]


def _serve(args: argparse.Namespace) -> int:
    import uvicorn

    from server.app import create_app
    from server.settings import get_settings

    settings = get_settings()
    host = args.host or settings.host
    port = args.port or settings.port
    print(f"Tidewaiter is serving on http://{host}:{port}/ (API docs at /docs)")
    for line in _sign_in_notice(settings):
        print(line)
    # Proxy headers are believed only from TIDEWAITER_SECURITY__TRUSTED_PROXIES (the app's
    # own middleware), never by uvicorn's default trust of 127.0.0.1.
    uvicorn.run(
        create_app(settings),
        host=host,
        port=port,
        log_level=args.log_level,
        proxy_headers=False,
    )
    return 0


def _worker(args: argparse.Namespace) -> int:
    from server.settings import get_settings
    from worker.jobs.celery_app import QUEUE, celery_for

    settings = get_settings()
    if settings.job_runner != "celery":
        print(
            "note: TIDEWAITER_JOB_RUNNER is not 'celery', so servers with these settings "
            "profile files themselves and send this worker nothing"
        )
    concurrency = args.concurrency or settings.worker_concurrency
    celery_for(settings).worker_main(
        [
            "worker",
            f"--queues={QUEUE}",
            f"--concurrency={concurrency}",
            f"--loglevel={args.log_level.upper()}",
            "--without-gossip",
            "--without-mingle",
            "--hostname=tidewaiter@%h",
        ]
    )
    return 0


def _sweep(args: argparse.Namespace) -> int:
    import time

    from server.security.retention import purge_by_settings
    from server.settings import get_settings
    from worker.jobs.sweeper import sweep

    settings = get_settings()
    while True:
        result = sweep(settings)
        print(f"sweep: requeued {result.requeued or 'none'}, gave up on {result.failed or 'none'}")
        purged = purge_by_settings(settings)  # retention and expired sessions, as in serve
        if purged:
            print(f"retention: purged the stored files of intakes {purged}")
        if not args.loop:
            return 0
        time.sleep(settings.sweeper_interval_seconds)


def _demo_load(args: argparse.Namespace) -> int:
    from server.demo import load_demo
    from server.settings import get_settings

    result = load_demo(get_settings())
    for intake_id, status in result.statuses.items():
        print(f"intake {intake_id}: {status}")
    if result.skipped:
        print(f"already loaded, skipped: {', '.join(result.skipped)}")
    failed = [i for i, status in result.statuses.items() if status == "failed"]
    return 1 if failed else 0


def _settings_table(args: argparse.Namespace) -> int:
    from server.settings_doc import settings_table

    print(settings_table())
    return 0


def _register_running(subparsers: argparse._SubParsersAction) -> None:
    serve = subparsers.add_parser("serve", help="serve the web app and the API")
    serve.add_argument("--host", help="address to listen on (default: the host setting)")
    serve.add_argument("--port", type=int, help="port to listen on (default: the port setting)")
    serve.add_argument("--log-level", default="info")
    serve.set_defaults(handler=_serve)

    worker = subparsers.add_parser("worker", help="run a Celery worker that profiles intakes")
    worker.add_argument("--concurrency", type=int, help="processes (default: the setting)")
    worker.add_argument("--log-level", default="info")
    worker.set_defaults(handler=_worker)

    sweep = subparsers.add_parser(
        "sweep", help="enqueue intakes stuck in queued or profiling again"
    )
    sweep.add_argument("--loop", action="store_true", help="sweep every sweeper interval")
    sweep.set_defaults(handler=_sweep)

    table = subparsers.add_parser("settings", help="print every setting and its default")
    table.set_defaults(handler=_settings_table)

    demo = subparsers.add_parser("demo", help="the invented demo scenario")
    demo_commands = demo.add_subparsers(dest="demo_command", required=True, metavar="ACTION")
    load = demo_commands.add_parser("load", help="load the demo suppliers and deliveries")
    load.set_defaults(handler=_demo_load)
