"""Accounts in the database, on SQLite and PostgreSQL: secrets stored only as digests,
sessions that expire, tokens that revoke, throttling records, audit log and unmaskings."""

from __future__ import annotations

from datetime import timedelta

import pytest
from sqlalchemy import select
from sqlalchemy.orm import Session

from server.security.passwords import hash_password
from server.security.signin import sign_in
from server.security.tokens import digest
from server.settings import SecuritySettings
from server.store import Intake, Supplier, accounts, schema
from server.store.database import make_engine
from server.store.models import utcnow

PASSWORD = "seven knots of wind"


@pytest.fixture
def session(database_url: str):
    schema.upgrade(database_url)
    engine = make_engine(database_url)
    with Session(engine) as session:
        yield session
    engine.dispose()


def test_names_are_unique_and_roles_are_ordered(session) -> None:
    accounts.create_user(session, "rui", "reviewer")
    with pytest.raises(accounts.AccountError, match="already exists"):
        accounts.create_user(session, "rui", "viewer")
    with pytest.raises(ValueError):
        accounts.create_user(session, "kim", "owner")
    assert accounts.Role.admin.allows(accounts.Role.reviewer)
    assert not accounts.Role.viewer.allows(accounts.Role.reviewer)


def test_sessions_are_stored_as_digests_and_expire(session) -> None:
    user = accounts.create_user(session, "rui", "reviewer")
    secret = accounts.open_session(session, user, lifetime=timedelta(hours=1))
    row = session.scalars(select(accounts.UserSession)).one()
    assert row.digest == digest(secret) and secret not in row.digest
    assert accounts.user_for_session(session, secret).name == "rui"
    assert accounts.user_for_session(session, secret + "x") is None
    row.expires_at = utcnow() - timedelta(seconds=1)
    session.flush()
    assert accounts.user_for_session(session, secret) is None
    assert accounts.purge_expired_sessions(session) == 1


def test_tokens_revoke_and_note_their_last_use(session) -> None:
    user = accounts.create_user(session, "rui", "reviewer")
    token, plaintext = accounts.create_token(session, user, "nightly")
    assert token.digest == digest(plaintext) and token.hint == plaintext[-4:]
    assert token.last_used_at is None
    assert accounts.user_for_token(session, plaintext).id == user.id
    assert token.last_used_at is not None
    other = accounts.create_user(session, "kim", "viewer")
    assert accounts.revoke_token(session, other, token.id) is None  # not theirs
    assert accounts.revoke_token(session, user, token.id).revoked_at is not None
    assert accounts.user_for_token(session, plaintext) is None


def test_sign_in_throttles_per_account_and_clears_on_success(session) -> None:
    accounts.create_user(session, "rui", "reviewer", password_hash=hash_password(PASSWORD))
    security = SecuritySettings(max_failed_sign_ins=3)
    for _ in range(2):
        assert not sign_in(session, "rui", "nope", address="10.0.0.1", security=security).ok
    assert sign_in(session, "rui", PASSWORD, address="10.0.0.1", security=security).ok
    assert (
        accounts.failed_sign_ins(session, since=utcnow() - timedelta(hours=1), account="rui") == []
    )
    for _ in range(3):
        sign_in(session, "rui", "nope", address="10.0.0.2", security=security)
    held = sign_in(session, "rui", PASSWORD, address="10.0.0.3", security=security)
    assert not held.ok and held.retry_after is not None and held.retry_after > 0
    actions = [e.action for e in accounts.audit_events(session)]
    assert actions[0] == "sign-in-held" and actions.count("sign-in-failed") == 5


def test_the_audit_log_keeps_the_actor_name_after_the_account_goes(session) -> None:
    user = accounts.create_user(session, "rui", "reviewer")
    accounts.audit(session, "upload", actor=user, target="/api/v1/intakes", address="10.0.0.9")
    session.delete(user)
    session.flush()
    session.expire_all()
    event = accounts.audit_events(session)[0]
    assert (event.actor_id, event.actor_name, event.action) == (None, "rui", "upload")


def test_unmasking_is_per_intake_and_goes_with_it(session) -> None:
    admin = accounts.create_user(session, "ada", "admin")
    supplier = Supplier(name="Saltmarsh buoy network")
    intake = Intake(
        supplier=supplier, original_name="a.csv", file_key=None, sha256="0" * 64, bytes=1
    )
    session.add(intake)
    session.flush()
    assert not accounts.is_unmasked(session, intake.id)
    accounts.set_unmasked(session, intake.id, admin, True)
    accounts.set_unmasked(session, intake.id, admin, True)  # twice is still one row
    assert accounts.is_unmasked(session, intake.id)
    assert len(session.scalars(select(accounts.IntakeUnmasking)).all()) == 1
    session.delete(intake)
    session.flush()
    assert session.scalars(select(accounts.IntakeUnmasking)).all() == []
