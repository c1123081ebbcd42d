"""Reviews: supplier rules versions, judgements, decisions, comment threads and comments.

Revision ID: 0003
Revises: 0002
Create Date: 2026-12-01 19:44:26
"""

from __future__ import annotations

from collections.abc import Sequence

import sqlalchemy as sa
from alembic import op
from sqlalchemy.dialects import postgresql

revision: str = "0003"
down_revision: str | None = "0002"
branch_labels: str | Sequence[str] | None = None
depends_on: str | Sequence[str] | None = None

Timestamp = sa.DateTime(timezone=True)
Document = sa.JSON().with_variant(postgresql.JSONB(astext_type=sa.Text()), "postgresql")


def _index(table: str, column: str) -> None:
    op.create_index(op.f(f"ix_{table}_{column}"), table, [column], unique=False)


def _fk(table: str, column: str, target: str, ondelete: str | None = None):
    return sa.ForeignKeyConstraint(
        [column],
        [f"{target}.id"],
        name=op.f(f"fk_{table}_{column}_{target}"),
        ondelete=ondelete,
    )


def upgrade() -> None:
    op.create_table(
        "supplier_rules",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("supplier_id", sa.Integer(), nullable=False),
        sa.Column("version", sa.Integer(), nullable=False),
        sa.Column("document", Document, nullable=False),
        sa.Column("note", sa.Text(), nullable=False),
        sa.Column("created_by", sa.String(length=100), nullable=False),
        sa.Column("created_at", Timestamp, nullable=False),
        _fk("supplier_rules", "supplier_id", "supplier", "CASCADE"),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_supplier_rules")),
        sa.UniqueConstraint(
            "supplier_id", "version", name=op.f("uq_supplier_rules_supplier_id_version")
        ),
    )
    _index("supplier_rules", "supplier_id")

    op.create_table(
        "comment_thread",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("intake_id", sa.Integer(), nullable=False),
        sa.Column("supplier_id", sa.Integer(), nullable=False),
        sa.Column("column_name", sa.String(length=500), nullable=True),
        sa.Column("flag_code", sa.String(length=60), nullable=True),
        sa.Column("status", sa.String(length=20), nullable=False),
        sa.Column("earlier_thread_id", sa.Integer(), nullable=True),
        sa.Column("created_by", sa.String(length=100), nullable=False),
        sa.Column("created_at", Timestamp, nullable=False),
        sa.Column("resolved_by", sa.String(length=100), nullable=True),
        sa.Column("resolved_at", Timestamp, nullable=True),
        _fk("comment_thread", "earlier_thread_id", "comment_thread", "SET NULL"),
        _fk("comment_thread", "intake_id", "intake", "CASCADE"),
        _fk("comment_thread", "supplier_id", "supplier"),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_comment_thread")),
    )
    _index("comment_thread", "intake_id")
    _index("comment_thread", "supplier_id")

    op.create_table(
        "decision",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("intake_id", sa.Integer(), nullable=False),
        sa.Column("verdict", sa.String(length=30), nullable=False),
        sa.Column("reason", sa.Text(), nullable=False),
        sa.Column("decided_by", sa.String(length=100), nullable=False),
        sa.Column("decided_by_id", sa.Integer(), nullable=True),
        sa.Column("rules_version", sa.Integer(), nullable=True),
        sa.Column("score", sa.Integer(), nullable=True),
        sa.Column("created_at", Timestamp, nullable=False),
        _fk("decision", "intake_id", "intake", "CASCADE"),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_decision")),
    )
    _index("decision", "intake_id")

    op.create_table(
        "judgement",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("intake_id", sa.Integer(), nullable=False),
        sa.Column("rules_id", sa.Integer(), nullable=True),
        sa.Column("rules_version", sa.Integer(), nullable=True),
        sa.Column("baseline_intake_id", sa.Integer(), nullable=True),
        sa.Column("baseline_chosen", sa.Boolean(), nullable=False),
        sa.Column("assessment", Document, nullable=False),
        sa.Column("drift", Document, nullable=True),
        sa.Column("overall_score", sa.Integer(), nullable=True),
        sa.Column("suggested_verdict", sa.String(length=20), nullable=False),
        sa.Column("critical", sa.Integer(), nullable=False),
        sa.Column("warnings", sa.Integer(), nullable=False),
        sa.Column("infos", sa.Integer(), nullable=False),
        sa.Column("judged_at", Timestamp, nullable=False),
        _fk("judgement", "baseline_intake_id", "intake", "SET NULL"),
        _fk("judgement", "intake_id", "intake", "CASCADE"),
        _fk("judgement", "rules_id", "supplier_rules", "SET NULL"),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_judgement")),
        sa.UniqueConstraint("intake_id", name=op.f("uq_judgement_intake_id")),
    )

    op.create_table(
        "comment",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("thread_id", sa.Integer(), nullable=False),
        sa.Column("author", sa.String(length=100), nullable=False),
        sa.Column("author_id", sa.Integer(), nullable=True),
        sa.Column("body", sa.Text(), nullable=False),
        sa.Column("created_at", Timestamp, nullable=False),
        sa.Column("edited_at", Timestamp, nullable=True),
        _fk("comment", "thread_id", "comment_thread", "CASCADE"),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_comment")),
    )
    _index("comment", "thread_id")


def downgrade() -> None:
    op.drop_index(op.f("ix_comment_thread_id"), table_name="comment")
    op.drop_table("comment")
    op.drop_table("judgement")
    op.drop_index(op.f("ix_decision_intake_id"), table_name="decision")
    op.drop_table("decision")
    op.drop_index(op.f("ix_comment_thread_supplier_id"), table_name="comment_thread")
    op.drop_index(op.f("ix_comment_thread_intake_id"), table_name="comment_thread")
    op.drop_table("comment_thread")
    op.drop_index(op.f("ix_supplier_rules_supplier_id"), table_name="supplier_rules")
    op.drop_table("supplier_rules")
