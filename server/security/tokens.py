"""Random secrets for sessions and API tokens, stored only as their SHA-256 digest.

A token carries 256 bits from ``secrets``; with that much entropy a plain
SHA-256 digest is enough to store it (no salt or slow hash needed: there is no
dictionary to try). The plaintext is shown once and never kept.

References: NIST SP 800-63B section 5.1.1 (look-up secrets of at least 112 bits
may be stored with an approved hash); Python ``secrets`` (PEP 506).
"""

from __future__ import annotations

import hashlib
import secrets

API_TOKEN_PREFIX = "tw_"
"""Marks Tidewaiter API tokens, so secret scanners and people can recognise one."""


def new_secret() -> str:
    """A URL-safe random string of 256 bits."""
    return secrets.token_urlsafe(32)


def new_api_token() -> str:
    """A new API token: the prefix and 256 random bits."""
    return API_TOKEN_PREFIX + new_secret()


def digest(secret: str) -> str:
    """The hex SHA-256 digest under which a session or API token is stored."""
    return hashlib.sha256(secret.encode("utf-8")).hexdigest()
