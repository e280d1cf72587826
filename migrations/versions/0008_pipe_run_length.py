"""a pipe run's length in its own column; every upgrade row names its kind

Revision ID: 0008
Revises: 0007
Create Date: 2026-12-11 09:00:00.000000

Pipe runs kept their length in ``surfaces.area``. It moves to the new ``length`` column and
``area`` becomes NULL for them; a CHECK keeps an area on every other surface (and a length on
every pipe run). Upgrade rows whose ``kind`` is empty get the kind their document describes,
so the code reads ``upgrades.kind`` and never guesses from the document's keys.
"""

from __future__ import annotations

from typing import Any

import sqlalchemy as sa
from alembic import op

revision = "0008"
down_revision = "0007"
branch_labels = None
depends_on = None

CHECK_NAME = "ck_surfaces_area_or_length"
#: the same text as server.models.SURFACE_MEASURE_CHECK (a migration never imports the models)
CHECK = (
    "(kind = 'pipe_run' AND length IS NOT NULL AND area IS NULL)"
    " OR (kind <> 'pipe_run' AND area IS NOT NULL AND length IS NULL)"
)


def _kind_of(document: dict[str, Any]) -> str:
    """The kind a stored upgrade document describes, as the house document's check infers it."""
    if document.get("kind"):
        return str(document["kind"])
    if document.get("shgc") is not None:
        return "window"
    if document.get("cfm50_after") is not None or document.get("n50_after") is not None:
        return "air_sealing"
    if document.get("pipe_layers") is not None:
        return "pipe_insulation"
    if (
        document.get("supply_leakage_after") is not None
        or document.get("return_leakage_after") is not None
    ):
        return "duct_sealing"
    if document.get("supply_r_after") is not None or document.get("return_r_after") is not None:
        return "duct_insulation"
    return "assembly"


def upgrade() -> None:
    with op.batch_alter_table("surfaces", schema=None) as batch_op:
        batch_op.add_column(sa.Column("length", sa.Float(), nullable=True))
        batch_op.alter_column("area", existing_type=sa.Float(), nullable=True)
    op.execute("UPDATE surfaces SET length = area, area = NULL WHERE kind = 'pipe_run'")
    with op.batch_alter_table("surfaces", schema=None) as batch_op:
        batch_op.create_check_constraint(CHECK_NAME, CHECK)

    upgrades = sa.table(
        "upgrades", sa.column("id", sa.Integer()), sa.column("kind", sa.String(40)),
        sa.column("document", sa.JSON()),
    )  # fmt: skip
    conn = op.get_bind()
    rows = conn.execute(
        sa.select(upgrades.c.id, upgrades.c.document).where(upgrades.c.kind == "")
    ).all()
    for row in rows:
        conn.execute(
            upgrades.update()
            .where(upgrades.c.id == row.id)
            .values(kind=_kind_of(dict(row.document or {})))
        )


def downgrade() -> None:
    # the kinds filled in stay: the older code reads them too
    with op.batch_alter_table("surfaces", schema=None) as batch_op:
        batch_op.drop_constraint(CHECK_NAME, type_="check")
    op.execute("UPDATE surfaces SET area = COALESCE(length, 0) WHERE kind = 'pipe_run'")
    op.execute("UPDATE surfaces SET area = 0 WHERE area IS NULL")
    with op.batch_alter_table("surfaces", schema=None) as batch_op:
        batch_op.alter_column("area", existing_type=sa.Float(), nullable=False)
        batch_op.drop_column("length")
