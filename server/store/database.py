"""Database engines and sessions, built from the settings.

One engine per database URL per process. SQLite (the embedded deployment) is
opened in WAL mode with a busy timeout, so the web requests and the in-process
job threads can write to the same file without "database is locked" errors.
"""

from __future__ import annotations

import threading
from collections.abc import Iterator
from contextlib import contextmanager
from typing import Any

from sqlalchemy import Engine, create_engine, event
from sqlalchemy.orm import Session, sessionmaker

from server.settings import Settings, get_settings

_engines: dict[str, Engine] = {}
_lock = threading.Lock()


def _on_sqlite_connect(dbapi_connection: Any, _record: Any) -> None:
    cursor = dbapi_connection.cursor()
    cursor.execute("PRAGMA journal_mode=WAL")
    cursor.execute("PRAGMA foreign_keys=ON")
    cursor.execute("PRAGMA busy_timeout=30000")
    cursor.close()


def make_engine(url: str) -> Engine:
    """A new engine for ``url``, with the per-database connection settings."""
    if url.startswith("sqlite"):
        engine = create_engine(url, connect_args={"check_same_thread": False, "timeout": 30})
        event.listen(engine, "connect", _on_sqlite_connect)
        return engine
    return create_engine(url, pool_pre_ping=True)


def get_engine(settings: Settings | None = None) -> Engine:
    """The process-wide engine for the settings' database (created on first use)."""
    url = (settings or get_settings()).resolved_database_url
    with _lock:
        engine = _engines.get(url)
        if engine is None:
            if url.startswith("sqlite"):
                (settings or get_settings()).data_dir.mkdir(parents=True, exist_ok=True)
            engine = _engines[url] = make_engine(url)
        return engine


def dispose_engines() -> None:
    """Close every pooled connection (tests and process shutdown)."""
    with _lock:
        for engine in _engines.values():
            engine.dispose()
        _engines.clear()


def session_factory(settings: Settings | None = None) -> sessionmaker[Session]:
    """A session maker bound to the settings' database."""
    return sessionmaker(bind=get_engine(settings), expire_on_commit=False)


@contextmanager
def session_scope(settings: Settings | None = None) -> Iterator[Session]:
    """A session that commits when the block ends normally and rolls back otherwise."""
    session = session_factory(settings)()
    try:
        yield session
        session.commit()
    except BaseException:
        session.rollback()
        raise
    finally:
        session.close()
