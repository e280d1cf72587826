"""A pipe run's page (templates/pages/pipe_run.html)."""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

from server.documents.house import PipeFigures
from server.errors import InputError
from server.models import House, Surface
from server.services import houses as svc
from server.services.cautions import cautions_for
from server.services.comparison import compute_house
from server.services.house_document import house_document
from server.web.settings_forms import FUEL_CHOICES
from server.web.systems_forms import (
    PIPE_MATERIALS,
    PIPE_SERVICES,
    pipe_locations,
    pipe_service_values,
)


def _in_house(house: House, surface: Surface) -> PipeFigures | None:
    """The run's figures in the whole-house calculation (what its loss costs, after where it
    runs and what it carries), or None when the house cannot be computed yet."""
    try:
        result = compute_house(house_document(house), upgrades_alone=False)
    except InputError:
        return None
    return next((p for p in result.as_found.pipes if p.id == surface.slug), None)


def pipe_run_context(
    *,
    house: House,
    surface: Surface,
    insulate_form: Mapping[str, str] | None = None,
    insulate_errors: Mapping[str, str] | None = None,
    service_form: Mapping[str, str] | None = None,
    service_errors: Mapping[str, str] | None = None,
    service_message: str = "",
) -> dict[str, Any]:
    """The run's loss (same code path as /calc/pipe), its upgrades, cautions, the insulate
    form and the what-it-carries form (what was typed kept, with their messages)."""
    result = next((r for s, r in svc.pipe_rows(house) if s.id == surface.id), None)
    pipe = (surface.details or {}).get("pipe") or {}
    return {
        "house": house, "surface": surface, "result": result if not isinstance(result, str) else None,
        "error": result if isinstance(result, str) else None, "units": house.units,
        "upgrades": [u for u in house.upgrades if u.surface_id == surface.id],
        "cautions": cautions_for(["pipe_run"]), "insulate_errors": insulate_errors or {},
        "insulate_form": insulate_form or {},
        "service_form": service_form if service_form is not None else pipe_service_values(pipe),
        "service_errors": service_errors or {}, "service_message": service_message,
        "service_choices": PIPE_SERVICES, "location_choices": pipe_locations(house),
        "material_choices": PIPE_MATERIALS, "fuel_choices": FUEL_CHOICES,
        "in_house": _in_house(house, surface),
    }  # fmt: skip
