"""The Surface page (templates/pages/surface.html; partials/layer_editor.html for htmx)."""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any, cast

from sqlalchemy.orm import Session

from server.documents.assembly import AssemblyInput, AssemblyResult
from server.documents.common import Units
from server.errors import InputError
from server.models import House, Surface
from server.services import houses as svc
from server.services import surface_details as details_svc
from server.services.assembly import evaluate_assembly
from server.services.catalog import Catalog
from server.services.cautions import cautions_for
from server.services.code_check import code_verdict
from server.services.envelope import as_found, behind_label, is_ground
from server.services.library import list_materials
from server.services.moisture import check_assembly_moisture
from server.services.organization_code_targets import rows_for
from server.services.typical import typical_assemblies
from server.web.layer_form import CAVITY_TYPES, LAYER_TYPES, AssemblyForm
from server.web.pages.photos import photos_context
from server.web.svg_condensation import condensation_svg


def _units(house: House) -> Units:
    return cast(Units, house.units)  # the column holds only 'ip' or 'si'


def saved_result(*, house: House, surface: Surface, catalog: Catalog) -> AssemblyResult | None:
    """The saved assembly's result, or None when it cannot be computed."""
    try:
        return evaluate_assembly(
            AssemblyInput.model_validate(surface.assembly), units=_units(house), catalog=catalog
        )
    except (InputError, ValueError):
        return None


def moisture_context(
    *, house: House, surface: Surface, result: AssemblyResult | None, catalog: Catalog
) -> dict[str, Any] | None:
    """The dew-point check of the saved assembly, or None when it cannot be computed."""
    if result is None:
        return None
    try:
        doc = AssemblyInput.model_validate(surface.assembly)
        design = ((house.climate or {}).get("weather") or {}).get("heating_design_temperature")
        check = check_assembly_moisture(doc, result, units=_units(house), catalog=catalog,
                                        outdoor_design_temperature=design)  # fmt: skip
    except (ValueError, InputError):
        return None
    return {"check": check, "svg": condensation_svg(check.result, units=_units(house))}


def details_context(
    *,
    house: House,
    surface: Surface,
    catalog: Catalog,
    typed: Mapping[str, str] | None = None,
    errors: Mapping[str, str] | None = None,
) -> dict[str, Any]:
    """The "Surface details" form: the stored text (or what was typed), messages per field,
    the pickers, and calc/house's own figures for this surface (behind, b, ground U)."""
    kind = (typed or {}).get("kind") or surface.kind
    if kind not in svc.SURFACE_KINDS:
        kind = surface.kind
    found = as_found(house, catalog)
    figures = found.by_id.get(surface.slug)
    ground = (surface.details or {}).get("ground") or {}
    below = None
    if surface.kind == "basement_wall" and is_ground(surface):
        below = float(ground.get("depth") or 0.0) * float(ground.get("exposed_perimeter") or 0.0)
    behind = (surface.details or {}).get("adjacent")
    return {
        "dt": {**details_svc.details_text(house, surface), **(typed or {})},
        "de": dict(errors or {}),
        "d_kind": kind,
        "d_ground_kinds": details_svc.GROUND_KINDS,
        "d_ground_shown": details_svc.GROUND_SHOWN.get(kind, ()),
        "d_rated": kind in details_svc.RATED_KINDS,
        "d_window": kind == "window",
        "d_soils": details_svc.soil_choices(_units(house)),
        "d_compass": details_svc.COMPASS,
        "d_spaces": [s for s in (house.spaces or []) if isinstance(s, dict) and s.get("id")],
        "d_help": details_svc.ground_help(_units(house)),
        "d_figures": figures,
        "d_figures_error": found.error,
        "d_is_ground": is_ground(surface),
        "d_behind": behind_label(house, surface),
        "d_b": figures.b if figures is not None and behind in found.spaces else None,
        "d_below_grade_area": below,
        "d_layered_u": None
        if details_svc.rated_u(surface.assembly or {}) is not None
        else _saved_u(house=house, surface=surface, catalog=catalog),
    }


def _saved_u(*, house: House, surface: Surface, catalog: Catalog) -> float | None:
    result = saved_result(house=house, surface=surface, catalog=catalog)
    return None if result is None else float(result.u_factor)


def surface_context(
    *,
    session: Session,
    organization_id: int,
    house: House,
    surface: Surface,
    form: AssemblyForm,
    result: AssemblyResult | None,
    catalog: Catalog,
    message: str = "",
    details_typed: Mapping[str, str] | None = None,
    details_errors: Mapping[str, str] | None = None,
) -> dict[str, Any]:
    """The layer editor with ``form`` (the saved assembly's, or what was typed), its result,
    the dew-point check, the code target's verdict and the cautions of the surface's kind;
    the details form (:func:`details_context`) with what was typed there and its messages."""
    return {
        **details_context(house=house, surface=surface, catalog=catalog, typed=details_typed,
                          errors=details_errors),
        **photos_context(session=session, organization_id=organization_id, house=house, surface=surface),
        "moisture": None if form.has_errors else moisture_context(
            house=house, surface=surface, result=result, catalog=catalog
        ),
        "code": code_verdict(
            house.climate, surface.kind, result, rows_for(session=session, organization_id=organization_id)
        ),
        "cautions": cautions_for([surface.kind]),
        "house": house,
        "surface": surface,
        "editor_url": f"/houses/{house.id}/surfaces/{surface.id}/assembly",
        "upgrades": [u for u in house.upgrades if u.surface_id == surface.id],
        "form": form,
        "result": result,
        "message": message,
        "layer_types": LAYER_TYPES,
        "cavity_types": CAVITY_TYPES,
        "materials": list_materials(session=session, organization_id=organization_id),
        "kinds": svc.SURFACE_KINDS,
        "typicals": typical_assemblies(),
        "units": house.units,
    }  # fmt: skip
