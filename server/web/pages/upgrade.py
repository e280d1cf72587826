"""The Upgrade page (templates/pages/upgrade.html; partials/layer_editor.html for htmx)."""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any, cast

from sqlalchemy.orm import Session

from server.documents.assembly import AssemblyInput, AssemblyResult
from server.documents.common import Units
from server.errors import InputError
from server.models import House, Upgrade
from server.services.assembly import evaluate_assembly
from server.services.catalog import Catalog
from server.services.cautions import cautions_for
from server.services.code_check import code_verdict
from server.services.library import catalog_for, list_materials
from server.services.organization_code_targets import rows_for
from server.services.price_book import list_items
from server.services.typical import typical_assemblies
from server.services.upgrade_forms import KIND_CAUTIONS, change_part, form_values, upgrade_effect
from server.services.upgrades import PRICED_PER, edits_assembly
from server.web.layer_form import CAVITY_TYPES, LAYER_TYPES, AssemblyForm, form_from_document


def upgrade_context(
    *,
    session: Session,
    organization_id: int,
    house: House,
    upgrade: Upgrade,
    form: AssemblyForm | None = None,
    result: AssemblyResult | None = None,
    message: str = "",
    errors: Mapping[str, str] | None = None,
    catalog: Catalog | None = None,
) -> dict[str, Any]:
    """The upgrade with the surface's assembly before it, the new assembly's editor (``form``
    and ``result`` when just typed, else the stored ones), code verdict, cautions, price items."""
    units = cast(Units, house.units)  # the column holds only 'ip' or 'si'
    if catalog is None:
        catalog = catalog_for(session=session, organization_id=organization_id)
    surface = next((s for s in house.surfaces if s.id == upgrade.surface_id), None)
    before = None
    if surface is not None:
        try:
            before = evaluate_assembly(
                AssemblyInput.model_validate(surface.assembly), units=units, catalog=catalog
            )
        except (InputError, ValueError):
            before = None
    if edits_assembly(upgrade):
        if form is None:
            form = form_from_document(upgrade.document["assembly"], units)
        if result is None and not form.has_errors:
            try:
                result = evaluate_assembly(AssemblyInput.model_validate(upgrade.document["assembly"]),
                                           units=units, catalog=catalog)  # fmt: skip
            except (InputError, ValueError):
                result = None
    kinds = [surface.kind] if surface else []
    topics: tuple[str, ...] = ("air_sealing",) if upgrade.kind == "air_sealing" else ()
    if surface is not None and surface.kind in ("slab", "basement_floor", "basement_wall"):
        topics += ("foam",)  # ground insulation is foam board as a rule (common practice)
    cautions = cautions_for(kinds, extra_topics=topics)
    cautions += [c for c in KIND_CAUTIONS.get(upgrade.kind, ()) if c not in cautions]
    effect, effect_error = upgrade_effect(house, upgrade, catalog=catalog)
    return {
        "house": house, "upgrade": upgrade, "surface": surface, "before": before, "form": form,
        "result": result, "message": message, "errors": errors or {}, "units": house.units,
        "editor_url": f"/houses/{house.id}/upgrades/{upgrade.id}/assembly",
        "layer_types": LAYER_TYPES, "cavity_types": CAVITY_TYPES,
        "materials": list_materials(session=session, organization_id=organization_id),
        "typicals": typical_assemblies(), "moisture": None,
        "cautions": cautions,
        "part": change_part(upgrade),  # the kind's own fields (None: layers or air sealing)
        "change_values": form_values(upgrade, house.units),
        "ducts": (house.heating or {}).get("ducts"),
        "window_found": ((surface.details or {}).get("window") or {}) if surface else {},
        "effect": effect,  # calc/house of the house with this upgrade alone
        "effect_error": effect_error,
        "code": code_verdict(house.climate, surface.kind, result, rows_for(session=session, organization_id=organization_id)) if surface else None,
        "price_items": list_items(session=session, organization_id=organization_id),
        "priced_per": PRICED_PER.get(upgrade.kind),  # area | length | None (fixed only)
    }  # fmt: skip
