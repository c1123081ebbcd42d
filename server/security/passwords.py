"""Password hashing with Argon2id, rehashing stored hashes when the parameters change.

References: A. Biryukov, D. Dinu, D. Khovratovich, "Argon2: the memory-hard
function for password hashing", RFC 9106 (2021); argon2-cffi's
``PasswordHasher`` carries the RFC's recommended parameters.
"""

from __future__ import annotations

from argon2 import PasswordHasher
from argon2.exceptions import InvalidHashError, VerificationError

_hasher = PasswordHasher()

MIN_PASSWORD_LENGTH = 10
"""Shortest password accepted when one is set (NIST SP 800-63B asks at least 8)."""


class WeakPassword(ValueError):
    """A password refused when it is set, with the reason in plain words."""


def check_strength(password: str) -> None:
    """Refuse passwords that are too short or only whitespace; raise ``WeakPassword``."""
    if len(password) < MIN_PASSWORD_LENGTH:
        raise WeakPassword(f"a password needs at least {MIN_PASSWORD_LENGTH} characters")
    if not password.strip():
        raise WeakPassword("a password cannot be only spaces")


def hash_password(password: str, hasher: PasswordHasher | None = None) -> str:
    """The Argon2id hash of ``password`` (salt and parameters included in the string)."""
    return (hasher or _hasher).hash(password)


def verify_password(
    stored_hash: str, password: str, hasher: PasswordHasher | None = None
) -> tuple[bool, str | None]:
    """Check ``password`` against ``stored_hash``.

    Returns ``(ok, new_hash)``: ``new_hash`` is a fresh hash to store when the
    password was right but the stored hash used other parameters than the
    current ones (so raising the cost upgrades accounts as people sign in).
    """
    hasher = hasher or _hasher
    try:
        hasher.verify(stored_hash, password)
    except (VerificationError, InvalidHashError):
        return False, None
    if hasher.check_needs_rehash(stored_hash):
        return True, hasher.hash(password)
    return True, None


# A hash of nothing anyone can type, checked when the account does not exist, so a
# sign-in for an unknown name takes as long as one for a known name.
_DUMMY_HASH = _hasher.hash("\x00 no account \x00")


def burn_time(password: str) -> None:
    """Spend one verification's time, for sign-ins naming no account."""
    verify_password(_DUMMY_HASH, password)
