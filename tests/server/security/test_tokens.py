"""Session and API token secrets: random, prefixed, stored as SHA-256 digests."""

from __future__ import annotations

import hashlib

from server.security.tokens import API_TOKEN_PREFIX, digest, new_api_token, new_secret


def test_digest_is_sha256_hex() -> None:
    # Reference: Python's hashlib; the FIPS 180-4 test vector "abc" recalled from memory.
    assert digest("abc") == "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"
    assert digest("tw_x") == hashlib.sha256(b"tw_x").hexdigest()


def test_secrets_are_long_and_distinct() -> None:
    secrets_seen = {new_secret() for _ in range(200)}
    assert len(secrets_seen) == 200
    assert all(len(s) >= 43 for s in secrets_seen)  # 32 bytes in URL-safe base64


def test_api_tokens_carry_the_prefix() -> None:
    token = new_api_token()
    assert token.startswith(API_TOKEN_PREFIX) and len(token) > 40
