"""Running the Alembic migrations from code (the ``db`` subcommand, the tests)."""

from __future__ import annotations

from pathlib import Path
from typing import Any, Literal

import sqlalchemy as sa
from alembic import command
from alembic.config import Config
from alembic.script import ScriptDirectory

MIGRATIONS_DIR = Path(__file__).resolve().parents[2] / "migrations"


def alembic_config(database_url: str) -> Config:
    """An Alembic configuration for ``database_url`` using the project's migrations."""
    config = Config()
    config.set_main_option("script_location", str(MIGRATIONS_DIR))
    config.set_main_option("path_separator", "os")
    config.attributes["database_url"] = database_url
    return config


def upgrade(database_url: str, revision: str = "head") -> None:
    """Migrate the database up to ``revision`` (the newest by default)."""
    command.upgrade(alembic_config(database_url), revision)


def downgrade(database_url: str, revision: str = "base") -> None:
    """Migrate the database down to ``revision`` (an empty schema by default)."""
    command.downgrade(alembic_config(database_url), revision)


def heads() -> list[str]:
    """The head revisions of the migration scripts (exactly one when the history is linear)."""
    return list(ScriptDirectory.from_config(alembic_config("sqlite://")).get_heads())


def render_item(type_: str, obj: Any, autogen_context: Any) -> str | Literal[False]:
    """Write our column types in generated migrations as plain SQLAlchemy types.

    Without it, autogenerate would write ``server.store.models.UTCDateTime``
    (a migration must not import the models) and a JSONB variant with an
    unimported ``Text()``.
    """
    from server.store.models import UTCDateTime

    if type_ != "type":
        return False
    if isinstance(obj, UTCDateTime):
        return "sa.DateTime(timezone=True)"
    if isinstance(obj, sa.JSON) and "postgresql" in getattr(obj, "_variant_mapping", {}):
        autogen_context.imports.add("from sqlalchemy.dialects import postgresql")
        return "sa.JSON().with_variant(postgresql.JSONB(astext_type=sa.Text()), 'postgresql')"
    return False
