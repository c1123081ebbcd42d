"""Alembic environment: the URL comes from the settings, the tables from ``server.store``.

A caller may pass a ready connection in ``config.attributes["connection"]``
(the ``db`` subcommand and the tests do), otherwise one is opened from the URL.
"""

from __future__ import annotations

from alembic import context
from sqlalchemy import Connection

from server.settings import get_settings
from server.store import Base, load_models
from server.store.database import make_engine
from server.store.schema import render_item

load_models()
target_metadata = Base.metadata
config = context.config


def _url() -> str:
    return config.attributes.get("database_url") or get_settings().resolved_database_url


def _run(connection: Connection) -> None:
    context.configure(
        connection=connection,
        target_metadata=target_metadata,
        render_as_batch=connection.dialect.name == "sqlite",
        compare_type=True,
        render_item=render_item,
    )
    with context.begin_transaction():
        context.run_migrations()


def run_migrations_offline() -> None:
    """Emit the SQL without a database connection (``alembic upgrade --sql``)."""
    context.configure(
        url=_url(), target_metadata=target_metadata, literal_binds=True, render_as_batch=True
    )
    with context.begin_transaction():
        context.run_migrations()


def run_migrations_online() -> None:
    """Apply the migrations on a live connection."""
    connection = config.attributes.get("connection")
    if connection is not None:
        _run(connection)
        return
    engine = make_engine(_url())
    try:
        with engine.connect() as conn:
            _run(conn)
            conn.commit()
    finally:
        engine.dispose()


if context.is_offline_mode():
    run_migrations_offline()
else:
    run_migrations_online()
