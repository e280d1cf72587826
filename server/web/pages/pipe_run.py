"""A pipe run's page (templates/pages/pipe_run.html)."""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

from server.models import House, Surface
from server.services import houses as svc
from server.services.cautions import cautions_for


def pipe_run_context(
    *,
    house: House,
    surface: Surface,
    insulate_form: Mapping[str, str] | None = None,
    insulate_errors: Mapping[str, str] | None = None,
) -> dict[str, Any]:
    """The run's loss (same code path as /calc/pipe), its upgrades, cautions, and the
    insulate form (what was typed kept, with its messages)."""
    result = next((r for s, r in svc.pipe_rows(house) if s.id == surface.id), None)
    return {
        "house": house, "surface": surface, "result": result if not isinstance(result, str) else None,
        "error": result if isinstance(result, str) else None, "units": house.units,
        "upgrades": [u for u in house.upgrades if u.surface_id == surface.id],
        "cautions": cautions_for(["pipe_run"]), "insulate_errors": insulate_errors or {},
        "insulate_form": insulate_form or {},
    }  # fmt: skip
