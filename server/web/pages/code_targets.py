"""The Code targets page (templates/pages/code_targets.html)."""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

from sqlalchemy.orm import Session

from server.physics.code_targets import SURFACE_KINDS
from server.services.organization_code_targets import own_keys, rows_for

KIND_LABELS = {
    "ceiling": "Ceiling / attic", "wood_frame_wall": "Wood-frame wall", "mass_wall": "Mass wall",
    "floor": "Floor", "basement_wall": "Basement wall", "crawlspace_wall": "Crawlspace wall",
    "slab": "Slab (R, depth)", "fenestration": "Windows (U)",
}  # fmt: skip


def code_targets_context(
    *,
    session: Session,
    organization_id: int,
    form: Mapping[str, str] | None = None,
    errors: Mapping[str, str] | None = None,
) -> dict[str, Any]:
    """The prescriptive table by climate zone and surface kind, the firm's own rows marked."""
    rows = rows_for(session=session, organization_id=organization_id)
    table = {(r.climate_zone, r.surface_kind): r for r in rows}
    return {"table": table, "zones": list(range(9)), "kinds": SURFACE_KINDS, "kind_labels": KIND_LABELS,
            "own": own_keys(session=session, organization_id=organization_id), "form": form or {},
            "errors": errors or {}, "edition": next(iter(rows)).edition if rows else "",
            "nav": "code-targets"}  # fmt: skip
