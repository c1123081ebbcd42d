"""Migrations: one head, up and down on SQLite and PostgreSQL, and models that match them."""

from __future__ import annotations

from alembic.autogenerate import compare_metadata
from alembic.migration import MigrationContext
from sqlalchemy import inspect

from server.store import Base, load_models, schema
from server.store.database import make_engine

OWN_TABLES = {"supplier", "intake", "profile", "column_summary"}


def test_history_has_a_single_head() -> None:
    assert len(schema.heads()) == 1


def test_upgrade_then_downgrade_on_both_databases(database_url: str) -> None:
    schema.upgrade(database_url)
    engine = make_engine(database_url)
    try:
        tables = set(inspect(engine).get_table_names())
        assert tables >= OWN_TABLES | {"alembic_version"}

        load_models()
        with engine.connect() as conn:
            differences = compare_metadata(MigrationContext.configure(conn), Base.metadata)
        assert differences == [], "the models and the migrations disagree"

        schema.downgrade(database_url, "base")
        assert set(inspect(engine).get_table_names()) <= {"alembic_version"}

        schema.upgrade(database_url)  # and up again, as a restored backup would
        assert set(inspect(engine).get_table_names()) >= OWN_TABLES
    finally:
        engine.dispose()


def test_generated_migrations_use_plain_sqlalchemy_types(tmp_path) -> None:
    from alembic.autogenerate import produce_migrations, render_python_code

    from server.store.schema import render_item

    load_models()
    engine = make_engine(f"sqlite:///{tmp_path / 'empty.sqlite3'}")
    try:
        with engine.connect() as conn:
            context = MigrationContext.configure(conn, opts={"render_item": render_item})
            code = render_python_code(
                produce_migrations(context, Base.metadata).upgrade_ops, render_item=render_item
            )
    finally:
        engine.dispose()
    assert "server.store" not in code
    assert "sa.DateTime(timezone=True)" in code
    assert "astext_type=Text()" not in code
