"""`tidewaiter user`, `tidewaiter token` and `tidewaiter files purge`, run through the CLI."""

from __future__ import annotations

import io
import os
from datetime import timedelta
from pathlib import Path

import pytest

from server.cli import main
from server.security.passwords import verify_password
from server.security.tokens import digest
from server.settings import get_settings
from server.store import FileStore, Intake, Supplier, accounts, file_store, schema, session_scope
from server.store.models import utcnow
from tests.support import stored_intake


@pytest.fixture
def cli_settings(tmp_path: Path, monkeypatch: pytest.MonkeyPatch):
    for name in list(os.environ):
        if name.startswith("TIDEWAITER_"):
            monkeypatch.delenv(name)
    monkeypatch.setenv("TIDEWAITER_DATA_DIR", str(tmp_path / "data"))
    get_settings.cache_clear()
    settings = get_settings()
    settings.data_dir.mkdir(parents=True)
    schema.upgrade(settings.resolved_database_url)
    yield settings
    get_settings.cache_clear()


def test_user_add_with_a_password_from_stdin(cli_settings, monkeypatch, capsys) -> None:
    monkeypatch.setattr("sys.stdin", io.StringIO("a long tide table\n"))
    assert main(["user", "add", "rui", "--role", "reviewer", "--password-stdin"]) == 0
    assert "rui added with role reviewer" in capsys.readouterr().out
    with session_scope(cli_settings) as session:
        user = accounts.find_user(session, "rui")
        assert user.role == "reviewer" and not user.is_demo
        assert verify_password(user.password_hash, "a long tide table")[0]


def test_user_add_generates_a_password_when_none_is_given(cli_settings, monkeypatch, capsys):
    monkeypatch.setattr("sys.stdin", io.StringIO(""))  # not a terminal: no prompt
    assert main(["user", "add", "ada", "--role", "admin"]) == 0
    password = capsys.readouterr().out.split("password: ")[1].split()[0]
    with session_scope(cli_settings) as session:
        assert verify_password(accounts.find_user(session, "ada").password_hash, password)[0]


def test_user_add_refuses_a_weak_password_and_a_taken_name(cli_settings, monkeypatch, capsys):
    monkeypatch.setattr("sys.stdin", io.StringIO("short\n"))
    assert main(["user", "add", "rui", "--role", "viewer", "--password-stdin"]) == 2
    monkeypatch.setattr("sys.stdin", io.StringIO("a long tide table\n"))
    assert main(["user", "add", "rui", "--role", "viewer", "--password-stdin"]) == 0
    monkeypatch.setattr("sys.stdin", io.StringIO("a long tide table\n"))
    assert main(["user", "add", "rui", "--role", "viewer", "--password-stdin"]) == 2
    assert "already exists" in capsys.readouterr().err


def test_a_role_outside_the_three_is_refused(cli_settings) -> None:
    with pytest.raises(SystemExit):
        main(["user", "add", "x", "--role", "owner"])


def test_token_add_prints_a_token_stored_only_as_its_digest(cli_settings, monkeypatch, capsys):
    monkeypatch.setattr("sys.stdin", io.StringIO("a long tide table\n"))
    main(["user", "add", "rui", "--role", "reviewer", "--password-stdin"])
    capsys.readouterr()
    assert main(["token", "add", "rui", "--name", "nightly upload"]) == 0
    token = capsys.readouterr().out.strip()
    assert token.startswith("tw_")
    with session_scope(cli_settings) as session:
        rows = session.query(accounts.ApiToken).all()
        assert [(r.name, r.digest) for r in rows] == [("nightly upload", digest(token))]
        assert accounts.user_for_token(session, token).name == "rui"
    assert main(["token", "add", "nobody"]) == 2


def test_user_disable_stops_sign_in_and_tokens(cli_settings, monkeypatch, capsys) -> None:
    monkeypatch.setattr("sys.stdin", io.StringIO("a long tide table\n"))
    main(["user", "add", "rui", "--role", "reviewer", "--password-stdin"])
    main(["token", "add", "rui"])
    token = capsys.readouterr().out.strip().splitlines()[-1]
    assert main(["user", "disable", "rui"]) == 0
    with session_scope(cli_settings) as session:
        assert accounts.user_for_token(session, token) is None
    main(["user", "list"])
    assert "disabled" in capsys.readouterr().out


def _intake(session, store: FileStore, name: str, age_days: int, content: bytes) -> Intake:
    supplier = session.query(Supplier).first() or Supplier(name="Saltmarsh buoy network")
    created_at = utcnow() - timedelta(days=age_days)
    return stored_intake(
        session, store, content, supplier=supplier, name=name, status="ready", created_at=created_at
    )


def test_files_purge_removes_old_files_and_keeps_recent_ones(cli_settings, capsys) -> None:
    store = file_store(cli_settings)
    with session_scope(cli_settings) as session:
        old = _intake(session, store, "old.csv", 40, b"a,b\n1,2\n")
        new = _intake(session, store, "new.csv", 2, b"a,b\n3,4\n")
        old_id, new_id, old_key = old.id, new.id, old.file_key
    assert main(["files", "purge", "--days", "30"]) == 0
    assert "1 intake(s)" in capsys.readouterr().out
    with session_scope(cli_settings) as session:
        old, new = session.get(Intake, old_id), session.get(Intake, new_id)
        assert old.file_key is None and old.file_purged_at is not None
        assert new.file_key is not None and store.exists(new.file_key)
        assert [e.action for e in accounts.audit_events(session)] == ["retention-purge"]
    assert not store.exists(old_key)


def test_files_purge_without_a_setting_purges_nothing(cli_settings, capsys) -> None:
    assert main(["files", "purge"]) == 0
    assert "nothing purged" in capsys.readouterr().out


def test_housekeeping_forgets_expired_sessions_and_old_failures(cli_settings) -> None:
    from server.security.retention import purge_by_settings

    with session_scope(cli_settings) as session:
        user = accounts.create_user(session, "rui", "reviewer")
        accounts.open_session(session, user, lifetime=timedelta(seconds=-1))
        live = accounts.open_session(session, user, lifetime=timedelta(hours=1))
        accounts.record_failed_sign_in(session, "rui", "10.0.0.1")
        old = accounts.FailedSignIn(account="rui", address="10.0.0.1")
        old.at = utcnow() - timedelta(days=1)
        session.add(old)
    assert purge_by_settings(cli_settings) == []  # no retention set: no files purged
    with session_scope(cli_settings) as session:
        assert session.query(accounts.UserSession).count() == 1
        assert accounts.user_for_session(session, live).name == "rui"
        assert session.query(accounts.FailedSignIn).count() == 1
