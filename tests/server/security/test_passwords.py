"""Argon2 password hashing: verification, refusal, and rehash when parameters change."""

from __future__ import annotations

import pytest
from argon2 import PasswordHasher

from server.security.passwords import (
    WeakPassword,
    check_strength,
    hash_password,
    verify_password,
)

# Low-cost parameters keep the tests fast; production uses argon2-cffi's defaults (RFC 9106).
CHEAP = PasswordHasher(time_cost=1, memory_cost=8, parallelism=1)
CHEAPER = PasswordHasher(time_cost=1, memory_cost=16, parallelism=1)


def test_hash_is_argon2id_and_salted() -> None:
    first = hash_password("correct horse battery", CHEAP)
    second = hash_password("correct horse battery", CHEAP)
    assert first.startswith("$argon2id$")  # PHC string format of RFC 9106's Argon2id
    assert first != second  # a fresh salt each time
    assert "correct horse" not in first


def test_right_password_verifies_wrong_one_does_not() -> None:
    stored = hash_password("correct horse battery", CHEAP)
    assert verify_password(stored, "correct horse battery", CHEAP) == (True, None)
    assert verify_password(stored, "correct horse batterz", CHEAP) == (False, None)


def test_garbage_hash_is_a_refusal_not_an_error() -> None:
    assert verify_password("not a hash", "whatever", CHEAP) == (False, None)


def test_changed_parameters_give_a_new_hash_on_verify() -> None:
    stored = hash_password("correct horse battery", CHEAP)
    ok, new_hash = verify_password(stored, "correct horse battery", CHEAPER)
    assert ok and new_hash is not None
    assert "m=16" in new_hash and "m=8" in stored
    assert verify_password(new_hash, "correct horse battery", CHEAPER) == (True, None)


def test_a_wrong_password_never_triggers_a_rehash() -> None:
    stored = hash_password("correct horse battery", CHEAP)
    assert verify_password(stored, "nope nope nope", CHEAPER) == (False, None)


@pytest.mark.parametrize("password", ["short", "          ", ""])
def test_weak_passwords_are_refused(password: str) -> None:
    with pytest.raises(WeakPassword):
        check_strength(password)


def test_a_long_enough_password_passes() -> None:
    check_strength("tide tables at dawn")
