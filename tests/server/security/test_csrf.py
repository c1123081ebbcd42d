"""CSRF tokens bound to the session, and the origin check."""

from __future__ import annotations

import hashlib
import hmac

from server.security.csrf import csrf_ok, csrf_token, same_origin


def test_token_is_the_hmac_of_the_session_secret() -> None:
    # Reference: Python's hmac module (RFC 2104 HMAC-SHA256).
    expected = hmac.new(b"s3cret", b"tidewaiter-csrf", hashlib.sha256).hexdigest()
    assert csrf_token("s3cret") == expected


def test_token_checks_against_its_own_session_only() -> None:
    token = csrf_token("session-one")
    assert csrf_ok("session-one", token)
    assert not csrf_ok("session-two", token)
    assert not csrf_ok("session-one", token[:-1] + ("0" if token[-1] != "0" else "1"))
    assert not csrf_ok("session-one", None)
    assert not csrf_ok("session-one", "")


def test_same_origin() -> None:
    assert same_origin("http://desk.example:8000", None, "desk.example:8000")
    assert same_origin(None, "http://desk.example:8000/intakes/3", "desk.example:8000")
    assert same_origin(None, None, "desk.example:8000")
    assert not same_origin("http://evil.example", None, "desk.example:8000")
    assert not same_origin(None, "https://evil.example/page", "desk.example:8000")
    assert not same_origin("null", None, "desk.example:8000")  # sandboxed frames send "null"
