"""The House page's buffer spaces card (templates/partials/house_spaces.html).

Every figure comes from one :func:`server.services.comparison.compute_house` of the saved house
(the same result calc/house gives for its exported document).
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import Any

from sqlalchemy.orm import Session

from server.documents.house import HouseDocument, HouseResult, SpaceFigures
from server.errors import InputError
from server.models import House
from server.physics.buffer_spaces import space_temperature
from server.physics.units import temp_from_c, temp_to_c
from server.services import spaces as svc
from server.services.house_document import house_document
from server.services.library import catalog_for
from server.services.systems import indoor_c
from server.web.pages.house_run import HouseRun, house_run

#: the outdoor temperature a space's temperature is shown at when the house has no design
#: temperature: freezing, where pipes in the space start to matter (common practice)
FREEZING_C = 0.0


@dataclass
class SpaceView:
    """One space on the card: what is stored, its figures, its edit form."""

    id: str
    label: str
    kind: str
    stored: dict[str, Any]
    figures: SpaceFigures | None
    temperature: str  # e.g. "41 °F"
    uses: list[svc.SpaceUse]
    form: dict[str, str]
    errors: dict[str, str] = field(default_factory=dict)
    part_rows: int = 0
    refused: bool = False


def _result(
    session: Session, organization_id: int, house: House, run: HouseRun | None
) -> tuple[HouseResult | None, str]:
    """The House page's one run (``run``, else computed here), or None with the reason."""
    if run is None:
        catalog = catalog_for(session=session, organization_id=organization_id)
        run = house_run(house=house, catalog=catalog)
    return run.result, "" if run.result is not None else run.error


def _conditions(doc: HouseDocument) -> tuple[float, float, str]:
    """Indoor and outdoor °C the temperatures are shown at, and how the page names them."""
    inside = indoor_c(doc)
    design = doc.climate.heating_design_temperature
    units = doc.units
    sign = "°F" if units == "ip" else "°C"
    inside_text = f"{temp_from_c(inside, units):.0f} {sign} inside"  # type: ignore[arg-type]
    if design is not None:
        outside = temp_to_c(design, units)  # type: ignore[arg-type]
        return inside, outside, f"on the design day ({inside_text}, {design:.0f} {sign} outside)"
    freezing = temp_from_c(FREEZING_C, units)  # type: ignore[arg-type]
    return inside, FREEZING_C, f"on a freezing day ({inside_text}, {freezing:.0f} {sign} outside)"


def spaces_context(
    *,
    session: Session,
    organization_id: int,
    house: House,
    space_id: str = "",
    typed: Mapping[str, str] | None = None,
    errors: Mapping[str, str] | None = None,
    message: str = "",
    refused: bool = False,
    run: HouseRun | None = None,
) -> dict[str, Any]:
    """The spaces with b and temperature as found, what faces each, and the forms.

    ``run``: the House page's one calculation (computed here when not given, for htmx).

    ``space_id`` names the form ``typed`` and ``errors`` belong to (``"new"``: the add form);
    ``refused`` marks a delete refused because something still faces the space.
    """
    units = house.units
    problem = ""
    doc: HouseDocument | None = None
    try:
        doc = house_document(house)
    except InputError as exc:  # not computable yet (no surfaces, no climate): no figures
        problem = f"{exc.field}: {exc.message}"[:200]
    except ValueError as exc:  # a stored house the document model refuses
        problem = str(exc).splitlines()[0][:200]
    result = None
    if doc is not None and house.spaces:
        result, problem = _result(session, organization_id, house, run)
    figures = {f.id: f for f in result.as_found.spaces} if result is not None else {}
    inside, outside, conditions = _conditions(doc) if doc is not None else (0.0, 0.0, "")
    sign = "°F" if units == "ip" else "°C"
    views = []
    for space in svc.spaces_of(house):
        ident = str(space["id"])
        found = figures.get(ident)
        temperature = ""
        if found is not None:
            theta = space_temperature(found.b, inside, outside)
            temperature = f"{temp_from_c(theta, units):.0f} {sign}"  # type: ignore[arg-type]
        mine = ident == space_id
        form = dict(typed) if mine and typed is not None else svc.form_text(space, units)  # type: ignore[arg-type]
        stored_parts = len(space.get("exposed") or [])
        views.append(
            SpaceView(
                id=ident,
                label=str(space.get("label") or ident),
                kind=svc.SPACE_KINDS.get(str(space.get("kind") or ""), ""),
                stored=space,
                figures=found,
                temperature=temperature,
                uses=svc.space_uses(house, ident),
                form=form,
                errors=dict(errors or {}) if mine else {},
                part_rows=max(_typed_rows(form), stored_parts) + svc.BLANK_PART_ROWS,
                refused=mine and refused,
            )
        )
    new_form = dict(typed) if space_id == "new" and typed is not None else {"method": "parts"}
    return {
        "spaces": views,
        "spaces_problem": problem,
        "spaces_conditions": conditions,
        "spaces_message": message,
        "space_kinds": svc.SPACE_KINDS,
        "air_presets": svc.AIR_CHANGE_PRESETS,
        "air_source": svc.AIR_CHANGE_SOURCE,
        "typical_parts": svc.typical_parts(units),  # type: ignore[arg-type]
        "new_space": new_form,
        "new_space_errors": dict(errors or {}) if space_id == "new" else {},
        "new_space_rows": max(_typed_rows(new_form), 0) + svc.BLANK_PART_ROWS,
    }


def _typed_rows(form: Mapping[str, str]) -> int:
    """How many part rows a form's text fills (the highest row with any text, plus one)."""
    rows = 0
    for key, value in form.items():
        if key.startswith("part_") and str(value).strip():
            tail = key.rsplit("_", 1)[-1]
            if tail.isdigit():
                rows = max(rows, int(tail) + 1)
    return rows
