"""house buffer spaces (ISO 13789)

Revision ID: 0004
Revises: 0003
Create Date: 2026-12-08 10:00:00.000000
"""

from __future__ import annotations

import sqlalchemy as sa
from alembic import op

revision = "0004"
down_revision = "0003"
branch_labels = None
depends_on = None


def upgrade() -> None:
    # saved houses keep NULL: no buffer spaces, every surface facing the outdoors (as before)
    with op.batch_alter_table("houses", schema=None) as batch_op:
        batch_op.add_column(sa.Column("spaces", sa.JSON(), nullable=True))


def downgrade() -> None:
    with op.batch_alter_table("houses", schema=None) as batch_op:
        batch_op.drop_column("spaces")
