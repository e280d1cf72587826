"""revoked sessions (sign-out ends that session on the server)

Revision ID: 0005
Revises: 0004
Create Date: 2026-12-02 05:28:40.311315
"""

from __future__ import annotations

import sqlalchemy as sa
from alembic import op

revision = "0005"
down_revision = "0004"
branch_labels = None
depends_on = None


def upgrade() -> None:
    op.create_table(
        "revoked_sessions",
        sa.Column("nonce", sa.String(length=64), nullable=False),
        sa.Column("user_id", sa.Integer(), nullable=False),
        sa.Column("revoked_at", sa.DateTime(timezone=True), nullable=False),
        sa.Column("expires_at", sa.DateTime(timezone=True), nullable=False),
        sa.ForeignKeyConstraint(["user_id"], ["users.id"], ondelete="CASCADE"),
        sa.PrimaryKeyConstraint("nonce"),
    )
    with op.batch_alter_table("revoked_sessions", schema=None) as batch_op:
        batch_op.create_index(
            batch_op.f("ix_revoked_sessions_expires_at"), ["expires_at"], unique=False
        )
        batch_op.create_index(batch_op.f("ix_revoked_sessions_user_id"), ["user_id"], unique=False)


def downgrade() -> None:
    with op.batch_alter_table("revoked_sessions", schema=None) as batch_op:
        batch_op.drop_index(batch_op.f("ix_revoked_sessions_user_id"))
        batch_op.drop_index(batch_op.f("ix_revoked_sessions_expires_at"))

    op.drop_table("revoked_sessions")
