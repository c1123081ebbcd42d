"""Demo accounts: one per role, with a published password, marked as demo.

Made by ``tidewaiter demo load`` so a visitor of the demo can sign in at once;
``tidewaiter serve`` prints their sign-in while they exist. They are demo
accounts (``is_demo``) and the pages say so; a real deployment never loads the
demo, or disables these accounts (``tidewaiter user disable NAME``).
"""

from __future__ import annotations

from sqlalchemy import select
from sqlalchemy.orm import Session

from server.security.passwords import hash_password
from server.store import accounts
from server.store.accounts import Role

DEMO_PASSWORD = "harbour-demo-only"
"""Published on purpose: these accounts exist only in the demo."""

DEMO_ACCOUNTS: tuple[tuple[str, Role], ...] = (
    ("demo-admin", Role.admin),
    ("demo-reviewer", Role.reviewer),
    ("demo-viewer", Role.viewer),
)


def ensure_demo_accounts(session: Session) -> list[str]:
    """Create the demo accounts that are missing; returns the names created."""
    created = []
    for name, role in DEMO_ACCOUNTS:
        if accounts.find_user(session, name) is None:
            accounts.create_user(
                session, name, role, password_hash=hash_password(DEMO_PASSWORD), is_demo=True
            )
            created.append(name)
    return created


def active_demo_accounts(session: Session) -> list[tuple[str, str]]:
    """(name, role) of the demo accounts that may still sign in."""
    rows = session.execute(
        select(accounts.User.name, accounts.User.role)
        .where(accounts.User.is_demo, accounts.User.is_active)
        .order_by(accounts.User.name)
    ).all()
    return [(name, role) for name, role in rows]


def sign_in_notice(session: Session) -> list[str]:
    """Lines to print at start while demo accounts exist (empty otherwise)."""
    demo = active_demo_accounts(session)
    if not demo:
        return []
    lines = ["Demo accounts (published password, for the demo only):"]
    lines += [f"  {name:<14} role {role:<9} password {DEMO_PASSWORD}" for name, role in demo]
    lines.append(
        "Disable them before real use: tidewaiter user disable demo-admin (and the others)."
    )
    return lines
