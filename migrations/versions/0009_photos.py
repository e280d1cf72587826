"""photos of what was found (files kept outside the database)

Revision ID: 0009
Revises: 0008
Create Date: 2026-12-12 09:00:00.000000
"""

from __future__ import annotations

import sqlalchemy as sa
from alembic import op

revision = "0009"
down_revision = "0008"
branch_labels = None
depends_on = None


def upgrade() -> None:
    op.create_table(
        "photos",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("organization_id", sa.Integer(), nullable=False),
        sa.Column("house_id", sa.Integer(), nullable=False),
        sa.Column("surface_id", sa.Integer(), nullable=True),
        sa.Column("caption", sa.String(length=200), nullable=False),
        sa.Column("storage_key", sa.String(length=64), nullable=False),
        sa.Column("content_type", sa.String(length=40), nullable=False),
        sa.Column("width", sa.Integer(), nullable=False),
        sa.Column("height", sa.Integer(), nullable=False),
        sa.Column("bytes", sa.Integer(), nullable=False),
        sa.Column("show_on_share", sa.Boolean(), nullable=False, server_default=sa.false()),
        sa.Column("include_in_quote", sa.Boolean(), nullable=False, server_default=sa.false()),
        sa.Column("created_at", sa.DateTime(timezone=True), nullable=False),
        sa.ForeignKeyConstraint(["organization_id"], ["organizations.id"], ondelete="CASCADE"),
        sa.ForeignKeyConstraint(["house_id"], ["houses.id"], ondelete="CASCADE"),
        sa.ForeignKeyConstraint(["surface_id"], ["surfaces.id"], ondelete="SET NULL"),
        sa.PrimaryKeyConstraint("id"),
        sa.UniqueConstraint("storage_key", name="uq_photos_storage_key"),
    )
    with op.batch_alter_table("photos", schema=None) as batch_op:
        batch_op.create_index(
            batch_op.f("ix_photos_organization_id"), ["organization_id"], unique=False
        )
        batch_op.create_index(batch_op.f("ix_photos_house_id"), ["house_id"], unique=False)
        batch_op.create_index(batch_op.f("ix_photos_surface_id"), ["surface_id"], unique=False)


def downgrade() -> None:
    # the files in the photo directory stay: removing them is the operator's choice
    with op.batch_alter_table("photos", schema=None) as batch_op:
        batch_op.drop_index(batch_op.f("ix_photos_surface_id"))
        batch_op.drop_index(batch_op.f("ix_photos_house_id"))
        batch_op.drop_index(batch_op.f("ix_photos_organization_id"))

    op.drop_table("photos")
