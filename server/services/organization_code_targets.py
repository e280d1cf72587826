"""The firm's editable code-target table: packaged rows, replaced row by row by the firm's own."""

from __future__ import annotations

from sqlalchemy import select
from sqlalchemy.orm import Session

from server.errors import InputError
from server.models import CodeTargetRow
from server.physics.code_targets import SURFACE_KINDS, CodeTarget
from server.services.code_target_data import load_code_targets

ORGANIZATION_SOURCE = "firm's own"  # one of the source kinds CodeTarget accepts


def rows_for(*, session: Session, organization_id: int) -> tuple[CodeTarget, ...]:
    """Packaged rows with the firm's rows in their place."""
    own = {
        (r.climate_zone, r.surface_kind): r
        for r in session.scalars(
            select(CodeTargetRow).where(CodeTargetRow.organization_id == organization_id)
        )
    }
    merged: list[CodeTarget] = []
    for row in load_code_targets():
        mine = own.pop((row.climate_zone, row.surface_kind), None)
        merged.append(row if mine is None else _target(mine))
    merged.extend(_target(r) for r in own.values())
    return tuple(merged)


def own_keys(*, session: Session, organization_id: int) -> set[tuple[int, str]]:
    query = select(CodeTargetRow.climate_zone, CodeTargetRow.surface_kind).where(
        CodeTargetRow.organization_id == organization_id
    )
    return {(zone, kind) for zone, kind in session.execute(query)}


def _target(row: CodeTargetRow) -> CodeTarget:
    return CodeTarget(
        edition=row.edition, climate_zone=row.climate_zone, surface_kind=row.surface_kind,
        r_min_ip=row.r_min_ip, u_max_ip=row.u_max_ip, note=row.note, source_kind=ORGANIZATION_SOURCE,
    )  # fmt: skip


def save_row(
    *, session: Session, organization_id: int, climate_zone: int, surface_kind: str,
    r_min_ip: float | None, u_max_ip: float | None, note: str, edition: str,
) -> CodeTargetRow:  # fmt: skip
    """Set the firm's row for one zone and kind (checked like a packaged row)."""
    if surface_kind not in SURFACE_KINDS:
        raise InputError("surface_kind", "choose a surface kind from the list")
    try:
        CodeTarget(edition=edition.strip(), climate_zone=climate_zone, surface_kind=surface_kind,
                   r_min_ip=r_min_ip, u_max_ip=u_max_ip, note=note.strip(), source_kind=ORGANIZATION_SOURCE)  # fmt: skip
    except ValueError as exc:
        text = str(exc)
        field = "edition" if "edition" in text else "climate_zone" if "zone" in text else "r_min_ip"
        raise InputError(field, text) from None
    row = session.scalars(
        select(CodeTargetRow).where(
            CodeTargetRow.organization_id == organization_id,
            CodeTargetRow.climate_zone == climate_zone,
            CodeTargetRow.surface_kind == surface_kind,
        )
    ).first() or CodeTargetRow(
        organization_id=organization_id, climate_zone=climate_zone, surface_kind=surface_kind
    )
    row.r_min_ip, row.u_max_ip, row.note, row.edition = (
        r_min_ip,
        u_max_ip,
        note.strip()[:500],
        edition.strip()[:300],
    )
    session.add(row)
    session.flush()
    return row


def reset_row(
    *, session: Session, organization_id: int, climate_zone: int, surface_kind: str
) -> None:
    """Drop the firm's row: the packaged row applies again."""
    row = session.scalars(
        select(CodeTargetRow).where(
            CodeTargetRow.organization_id == organization_id,
            CodeTargetRow.climate_zone == climate_zone,
            CodeTargetRow.surface_kind == surface_kind,
        )
    ).first()
    if row is not None:
        session.delete(row)
        session.flush()
