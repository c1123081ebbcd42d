"""Helpers for tests that need accounts: users of each role, their tokens, signed-in sessions."""

from __future__ import annotations

from typing import Any

from server.security.passwords import hash_password
from server.settings import Settings
from server.store import accounts, session_scope

PASSWORD = "low tide at the north pier"


def add_user(settings: Settings, name: str, role: str, *, password: str = PASSWORD) -> str:
    """Create a user with a password; returns an API token of theirs."""
    with session_scope(settings) as session:
        user = accounts.create_user(
            session, name, accounts.Role(role), password_hash=hash_password(password)
        )
        _token, plaintext = accounts.create_token(session, user, "tests")
    return plaintext


def bearer(token: str) -> dict[str, str]:
    """The header that authenticates with an API token."""
    return {"Authorization": f"Bearer {token}"}


def sign_in(client: Any, name: str, password: str = PASSWORD) -> str:
    """Sign in through the API (the cookie lands in the client); returns the CSRF token."""
    answer = client.post("/api/v1/auth/sign-in", json={"name": name, "password": password})
    assert answer.status_code == 200, answer.text
    return answer.json()["csrf_token"]
