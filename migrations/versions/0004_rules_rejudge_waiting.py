"""Rules versions remember whether they apply to the deliveries still waiting for a decision.

Revision ID: 0004
Revises: 0003
Create Date: 2026-12-01 23:40:00
"""

from __future__ import annotations

from collections.abc import Sequence

import sqlalchemy as sa
from alembic import op

revision: str = "0004"
down_revision: str | None = "0003"
branch_labels: str | Sequence[str] | None = None
depends_on: str | Sequence[str] | None = None


def upgrade() -> None:
    with op.batch_alter_table("supplier_rules") as table:
        table.add_column(
            sa.Column("rejudge_waiting", sa.Boolean(), nullable=False, server_default=sa.true())
        )


def downgrade() -> None:
    with op.batch_alter_table("supplier_rules") as table:
        table.drop_column("rejudge_waiting")
