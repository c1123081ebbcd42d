"""Accounts: users, sign-in sessions, API tokens, failed sign-ins, audit log, unmaskings.

Revision ID: 0002
Revises: 0001
Create Date: 2026-12-01 19:55:00
"""

from __future__ import annotations

from collections.abc import Sequence

import sqlalchemy as sa
from alembic import op
from sqlalchemy.dialects import postgresql

revision: str = "0002"
down_revision: str | None = "0001"
branch_labels: str | Sequence[str] | None = None
depends_on: str | Sequence[str] | None = None

Timestamp = sa.DateTime(timezone=True)
Document = sa.JSON().with_variant(postgresql.JSONB(astext_type=sa.Text()), "postgresql")


def _index(table: str, column: str) -> None:
    op.create_index(op.f(f"ix_{table}_{column}"), table, [column], unique=False)


def upgrade() -> None:
    op.create_table(
        "app_user",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("name", sa.String(length=100), nullable=False),
        sa.Column("role", sa.String(length=20), nullable=False),
        sa.Column("password_hash", sa.Text(), nullable=True),
        sa.Column("is_demo", sa.Boolean(), nullable=False),
        sa.Column("is_active", sa.Boolean(), nullable=False),
        sa.Column("created_at", Timestamp, nullable=False),
        sa.Column("last_sign_in_at", Timestamp, nullable=True),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_app_user")),
        sa.UniqueConstraint("name", name=op.f("uq_app_user_name")),
    )
    op.create_table(
        "failed_sign_in",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("account", sa.String(length=100), nullable=False),
        sa.Column("address", sa.String(length=64), nullable=False),
        sa.Column("at", Timestamp, nullable=False),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_failed_sign_in")),
    )
    for column in ("account", "address", "at"):
        _index("failed_sign_in", column)
    op.create_table(
        "api_token",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("user_id", sa.Integer(), nullable=False),
        sa.Column("name", sa.String(length=100), nullable=False),
        sa.Column("digest", sa.String(length=64), nullable=False),
        sa.Column("hint", sa.String(length=12), nullable=False),
        sa.Column("created_at", Timestamp, nullable=False),
        sa.Column("last_used_at", Timestamp, nullable=True),
        sa.Column("revoked_at", Timestamp, nullable=True),
        sa.ForeignKeyConstraint(
            ["user_id"],
            ["app_user.id"],
            name=op.f("fk_api_token_user_id_app_user"),
            ondelete="CASCADE",
        ),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_api_token")),
        sa.UniqueConstraint("digest", name=op.f("uq_api_token_digest")),
    )
    _index("api_token", "user_id")
    op.create_table(
        "audit_event",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("at", Timestamp, nullable=False),
        sa.Column("actor_id", sa.Integer(), nullable=True),
        sa.Column("actor_name", sa.String(length=100), nullable=True),
        sa.Column("action", sa.String(length=40), nullable=False),
        sa.Column("target", sa.String(length=300), nullable=True),
        sa.Column("address", sa.String(length=64), nullable=True),
        sa.Column("detail", Document, nullable=False),
        sa.ForeignKeyConstraint(
            ["actor_id"],
            ["app_user.id"],
            name=op.f("fk_audit_event_actor_id_app_user"),
            ondelete="SET NULL",
        ),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_audit_event")),
    )
    for column in ("action", "actor_id", "at"):
        _index("audit_event", column)
    op.create_table(
        "user_session",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("user_id", sa.Integer(), nullable=False),
        sa.Column("digest", sa.String(length=64), nullable=False),
        sa.Column("created_at", Timestamp, nullable=False),
        sa.Column("expires_at", Timestamp, nullable=False),
        sa.Column("address", sa.String(length=64), nullable=True),
        sa.ForeignKeyConstraint(
            ["user_id"],
            ["app_user.id"],
            name=op.f("fk_user_session_user_id_app_user"),
            ondelete="CASCADE",
        ),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_user_session")),
        sa.UniqueConstraint("digest", name=op.f("uq_user_session_digest")),
    )
    for column in ("expires_at", "user_id"):
        _index("user_session", column)
    op.create_table(
        "intake_unmasking",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("intake_id", sa.Integer(), nullable=False),
        sa.Column("user_id", sa.Integer(), nullable=True),
        sa.Column("at", Timestamp, nullable=False),
        sa.ForeignKeyConstraint(
            ["intake_id"],
            ["intake.id"],
            name=op.f("fk_intake_unmasking_intake_id_intake"),
            ondelete="CASCADE",
        ),
        sa.ForeignKeyConstraint(
            ["user_id"],
            ["app_user.id"],
            name=op.f("fk_intake_unmasking_user_id_app_user"),
            ondelete="SET NULL",
        ),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_intake_unmasking")),
        sa.UniqueConstraint("intake_id", name=op.f("uq_intake_unmasking_intake_id")),
    )


def downgrade() -> None:
    op.drop_table("intake_unmasking")
    op.drop_table("user_session")
    op.drop_table("audit_event")
    op.drop_table("api_token")
    op.drop_table("failed_sign_in")
    op.drop_table("app_user")
