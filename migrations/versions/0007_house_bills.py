"""house bills (meter-read periods and the weather of their dates)

Revision ID: 0007
Revises: 0006
Create Date: 2026-12-10 09:00:00.000000
"""

from __future__ import annotations

import sqlalchemy as sa
from alembic import op

revision = "0007"
down_revision = "0006"
branch_labels = None
depends_on = None


def upgrade() -> None:
    # saved houses keep NULL: no bills, so no calibration (as before)
    with op.batch_alter_table("houses", schema=None) as batch_op:
        batch_op.add_column(sa.Column("bills", sa.JSON(), nullable=True))


def downgrade() -> None:
    with op.batch_alter_table("houses", schema=None) as batch_op:
        batch_op.drop_column("bills")
