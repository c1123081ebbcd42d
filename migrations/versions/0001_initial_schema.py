"""Initial schema: supplier, intake, profile, column_summary.

Revision ID: 0001
Revises:
Create Date: 2026-12-01 19:32:33
"""

from __future__ import annotations

from collections.abc import Sequence

import sqlalchemy as sa
from alembic import op
from sqlalchemy.dialects import postgresql

revision: str = "0001"
down_revision: str | None = None
branch_labels: str | Sequence[str] | None = None
depends_on: str | Sequence[str] | None = None

Timestamp = sa.DateTime(timezone=True)
Document = sa.JSON().with_variant(postgresql.JSONB(astext_type=sa.Text()), "postgresql")


def upgrade() -> None:
    op.create_table(
        "supplier",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("name", sa.String(length=200), nullable=False),
        sa.Column("note", sa.Text(), nullable=False),
        sa.Column("created_at", Timestamp, nullable=False),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_supplier")),
        sa.UniqueConstraint("name", name=op.f("uq_supplier_name")),
    )
    op.create_table(
        "intake",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("supplier_id", sa.Integer(), nullable=False),
        sa.Column("original_name", sa.String(length=500), nullable=False),
        sa.Column("file_key", sa.String(length=200), nullable=True),
        sa.Column("sha256", sa.String(length=64), nullable=False),
        sa.Column("bytes", sa.BigInteger(), nullable=False),
        sa.Column("status", sa.String(length=20), nullable=False),
        sa.Column("stage", sa.String(length=40), nullable=False),
        sa.Column("progress", sa.Float(), nullable=False),
        sa.Column("error", sa.Text(), nullable=True),
        sa.Column("attempts", sa.Integer(), nullable=False),
        sa.Column("created_at", Timestamp, nullable=False),
        sa.Column("updated_at", Timestamp, nullable=False),
        sa.Column("started_at", Timestamp, nullable=True),
        sa.Column("finished_at", Timestamp, nullable=True),
        sa.Column("file_purged_at", Timestamp, nullable=True),
        sa.ForeignKeyConstraint(
            ["supplier_id"], ["supplier.id"], name=op.f("fk_intake_supplier_id_supplier")
        ),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_intake")),
    )
    op.create_index(op.f("ix_intake_file_key"), "intake", ["file_key"])
    op.create_index(op.f("ix_intake_sha256"), "intake", ["sha256"])
    op.create_index(op.f("ix_intake_status"), "intake", ["status"])
    op.create_index(op.f("ix_intake_supplier_id"), "intake", ["supplier_id"])

    op.create_table(
        "profile",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("intake_id", sa.Integer(), nullable=False),
        sa.Column("format_version", sa.Integer(), nullable=False),
        sa.Column("document", Document, nullable=False),
        sa.Column("rows", sa.BigInteger(), nullable=False),
        sa.Column("columns", sa.Integer(), nullable=False),
        sa.Column("overall_score", sa.Float(), nullable=True),
        sa.Column("created_at", Timestamp, nullable=False),
        sa.ForeignKeyConstraint(
            ["intake_id"],
            ["intake.id"],
            name=op.f("fk_profile_intake_id_intake"),
            ondelete="CASCADE",
        ),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_profile")),
        sa.UniqueConstraint("intake_id", name=op.f("uq_profile_intake_id")),
    )

    op.create_table(
        "column_summary",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("intake_id", sa.Integer(), nullable=False),
        sa.Column("name", sa.String(length=500), nullable=False),
        sa.Column("position", sa.Integer(), nullable=False),
        sa.Column("kind", sa.String(length=20), nullable=True),
        sa.Column("missing_share", sa.Float(), nullable=True),
        sa.Column("distinct", sa.BigInteger(), nullable=True),
        sa.Column("mean", sa.Float(), nullable=True),
        sa.Column("median", sa.Float(), nullable=True),
        sa.Column("std", sa.Float(), nullable=True),
        sa.Column("min", sa.Float(), nullable=True),
        sa.Column("max", sa.Float(), nullable=True),
        sa.Column("top_label", sa.Text(), nullable=True),
        sa.Column("top_label_share", sa.Float(), nullable=True),
        sa.ForeignKeyConstraint(
            ["intake_id"],
            ["intake.id"],
            name=op.f("fk_column_summary_intake_id_intake"),
            ondelete="CASCADE",
        ),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_column_summary")),
        sa.UniqueConstraint(
            "intake_id", "position", name=op.f("uq_column_summary_intake_id_position")
        ),
    )
    op.create_index(op.f("ix_column_summary_intake_id"), "column_summary", ["intake_id"])
    op.create_index(op.f("ix_column_summary_name"), "column_summary", ["name"])


def downgrade() -> None:
    op.drop_index(op.f("ix_column_summary_name"), table_name="column_summary")
    op.drop_index(op.f("ix_column_summary_intake_id"), table_name="column_summary")
    op.drop_table("column_summary")
    op.drop_table("profile")
    op.drop_index(op.f("ix_intake_supplier_id"), table_name="intake")
    op.drop_index(op.f("ix_intake_status"), table_name="intake")
    op.drop_index(op.f("ix_intake_sha256"), table_name="intake")
    op.drop_index(op.f("ix_intake_file_key"), table_name="intake")
    op.drop_table("intake")
    op.drop_table("supplier")
