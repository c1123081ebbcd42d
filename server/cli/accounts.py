"""Subcommands for accounts and retention: user add/list/disable, token add, files purge."""

from __future__ import annotations

import argparse
import getpass
import secrets
import sys


def register(subparsers: argparse._SubParsersAction) -> None:
    """Add the ``user``, ``token`` and ``files`` subcommands."""
    user = subparsers.add_parser("user", help="accounts and their roles")
    users = user.add_subparsers(dest="user_command", required=True, metavar="ACTION")
    add = users.add_parser("add", help="add an account (prints a new password unless given one)")
    add.add_argument("name")
    add.add_argument("--role", required=True, choices=["admin", "reviewer", "viewer"])
    add.add_argument(
        "--password-stdin", action="store_true", help="read the password from standard input"
    )
    add.set_defaults(handler=_user_add)
    listing = users.add_parser("list", help="list the accounts")
    listing.set_defaults(handler=_user_list)
    disable = users.add_parser("disable", help="stop an account from signing in")
    disable.add_argument("name")
    disable.set_defaults(handler=_user_disable)

    token = subparsers.add_parser("token", help="API tokens for scripts")
    tokens = token.add_subparsers(dest="token_command", required=True, metavar="ACTION")
    token_add = tokens.add_parser("add", help="create a token for USER and print it (once)")
    token_add.add_argument("user")
    token_add.add_argument("--name", default="script", help="a label to tell tokens apart")
    token_add.set_defaults(handler=_token_add)

    files = subparsers.add_parser("files", help="stored delivered files")
    file_commands = files.add_subparsers(dest="files_command", required=True, metavar="ACTION")
    purge = file_commands.add_parser(
        "purge", help="purge stored files older than the retention setting (profiles stay)"
    )
    purge.add_argument("--days", type=int, help="override the retention_days setting")
    purge.set_defaults(handler=_files_purge)


def _read_password(args: argparse.Namespace) -> tuple[str, bool]:
    if args.password_stdin:
        return sys.stdin.readline().rstrip("\n"), False
    if sys.stdin.isatty():
        first = getpass.getpass("Password (empty for a generated one): ")
        if first:
            if getpass.getpass("Again: ") != first:
                raise SystemExit("the two passwords differ")
            return first, False
    return secrets.token_urlsafe(12), True


def _user_add(args: argparse.Namespace) -> int:
    from server.security.passwords import WeakPassword, check_strength, hash_password
    from server.settings import get_settings
    from server.store import accounts, session_scope

    password, generated = _read_password(args)
    try:
        check_strength(password)
    except WeakPassword as exc:
        print(f"refused: {exc}", file=sys.stderr)
        return 2
    try:
        with session_scope(get_settings()) as session:
            user = accounts.create_user(
                session, args.name, args.role, password_hash=hash_password(password)
            )
            accounts.audit(
                session, "user-change", target=f"user:{user.name}", detail={"added_by": "command"}
            )
    except accounts.AccountError as exc:
        print(f"refused: {exc}", file=sys.stderr)
        return 2
    print(f"user {args.name} added with role {args.role}")
    if generated:
        print(f"password: {password}  (shown once; they can change it with an admin)")
    return 0


def _user_list(args: argparse.Namespace) -> int:
    from server.settings import get_settings
    from server.store import accounts, session_scope

    with session_scope(get_settings()) as session:
        for user in accounts.list_users(session):
            marks = [
                m for m, on in (("demo", user.is_demo), ("disabled", not user.is_active)) if on
            ]
            print(f"{user.name:<24} {user.role:<9} {' '.join(marks)}".rstrip())
    return 0


def _user_disable(args: argparse.Namespace) -> int:
    from server.settings import get_settings
    from server.store import accounts, session_scope

    with session_scope(get_settings()) as session:
        user = accounts.find_user(session, args.name)
        if user is None:
            print(f"there is no user {args.name}", file=sys.stderr)
            return 2
        user.is_active = False
        accounts.close_user_sessions(session, user)
        accounts.audit(
            session, "user-change", target=f"user:{user.name}", detail={"disabled": True}
        )
    print(f"user {args.name} can no longer sign in")
    return 0


def _token_add(args: argparse.Namespace) -> int:
    from server.settings import get_settings
    from server.store import accounts, session_scope

    with session_scope(get_settings()) as session:
        user = accounts.find_user(session, args.user)
        if user is None or not user.is_active:
            print(f"there is no active user {args.user}", file=sys.stderr)
            return 2
        _token, plaintext = accounts.create_token(session, user, args.name)
        accounts.audit(
            session, "token-change", target=f"user:{user.name}", detail={"added_by": "command"}
        )
    print(plaintext)
    print(
        f"(an API token of {args.user}, role {user.role}; shown once. "
        "Send it as: Authorization: Bearer <token>)",
        file=sys.stderr,
    )
    return 0


def _files_purge(args: argparse.Namespace) -> int:
    from server.security.retention import purge_old_files
    from server.settings import get_settings
    from server.store import file_store, session_scope

    settings = get_settings()
    days = args.days if args.days is not None else settings.security.retention_days
    if days is None:
        print("no retention set (TIDEWAITER_SECURITY__RETENTION_DAYS); nothing purged")
        return 0
    with session_scope(settings) as session:
        purged = purge_old_files(session, file_store(settings), days=days)
    print(f"purged the stored files of {len(purged)} intake(s) older than {days} days")
    return 0
