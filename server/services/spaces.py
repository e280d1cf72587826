"""A saved house's unconditioned buffer spaces (ISO 13789): add, save, delete, read a form.

Stored in ``House.spaces`` as the house document's ``spaces`` (:class:`SpaceIn` dumps, numbers
in the house's units); what each surface faces is ``Surface.details["adjacent"]``. The b of
each space is computed by :func:`server.services.comparison.compute_house` (see
:mod:`server.physics.buffer_spaces`), never here.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from functools import lru_cache
from typing import Any

from pydantic import ValidationError
from sqlalchemy.orm import Session

from server.documents.common import Units
from server.documents.house import SpaceIn
from server.errors import InputError, NotFound
from server.models import House
from server.services.assembly import evaluate_assembly
from server.services.convert import convert_value
from server.services.houses import check_version, touch
from server.services.number_text import NumberTextError, read_decimal
from server.services.slugs import unique_slug
from server.services.typical import typical_assemblies

SPACE_KINDS = {
    "vented_attic": "Vented attic",
    "crawlspace": "Crawlspace",
    "unheated_basement": "Unheated basement",
    "garage": "Garage",
    "other": "Other unheated space",
}
#: ids a space may not take: what else a surface, duct or pipe can lie in
RESERVED_IDS = frozenset({"outdoors", "ground", "conditioned", "unconditioned"})
#: how many exposed-part rows a form shows beyond the stored ones
BLANK_PART_ROWS = 3
MAX_PARTS = 50

#: ISO 13789:2017 Table 7, typical air change rates n_ue of an unconditioned space by its
#: airtightness [1/h] (table number and wording from memory: check against the standard)
AIR_CHANGE_PRESETS: dict[str, tuple[float, str]] = {
    "iso-0.1": (0.1, "No doors or windows, all joints well sealed, no vent openings"),
    "iso-0.5": (0.5, "All joints well sealed, no vent openings"),
    "iso-1": (1.0, "All joints well sealed, small vent openings"),
    "iso-3": (3.0, "Not airtight: some open joints or permanent vent openings"),
    "iso-10": (10.0, "Not airtight: many open joints, or large or many vent openings"),
}
AIR_CHANGE_SOURCE = (
    "ISO 13789:2017, table of typical air change rates of unconditioned spaces (values "
    "from memory: check them against the standard)"
)


class SpaceInUse(InputError):
    """A space that surfaces, ducts or pipe runs still lie in: it cannot simply be deleted."""

    def __init__(self, uses: list[SpaceUse]) -> None:
        names = ", ".join(use.name for use in uses)
        super().__init__("delete", f"it is still behind or around: {names}")
        self.uses = uses


@dataclass(frozen=True)
class SpaceUse:
    """Something of the house that lies in or faces a space."""

    what: str  # "surface", "pipe_run" or "ducts"
    name: str
    surface_id: int | None = None


@dataclass(frozen=True)
class TypicalPart:
    slug: str
    label: str
    u: float  # in the house's units, from the assembly calculator


@lru_cache(maxsize=2)
def typical_parts(units: Units) -> tuple[TypicalPart, ...]:
    """The typical assemblies as exposed parts, with the U the assembly calculator gives."""
    return tuple(
        TypicalPart(slug, t.label, evaluate_assembly(t.assembly(units), units=units).u_factor)
        for slug, t in typical_assemblies().items()
    )


def spaces_of(house: House) -> list[dict[str, Any]]:
    """The house's stored spaces (a copy of each)."""
    return [dict(space) for space in house.spaces or []]


# --- reading a form ------------------------------------------------------------------------


def _number(
    data: Mapping[str, str], key: str, errors: dict[str, str], units: str, *,
    low_open: bool = True, high: float | None = None, required: bool = True,
) -> float | None:  # fmt: skip
    text = str(data.get(key, "") or "").strip()
    if not text:
        if required:
            errors[key] = "required"
        return None
    try:
        return read_decimal(
            text, decimal_comma=units == "si", low=0.0, low_open=low_open, high=high
        )
    except NumberTextError as exc:
        errors[key] = str(exc)
        return None


def _parts(data: Mapping[str, str], units: Units, errors: dict[str, str]) -> list[dict[str, Any]]:
    typicals = {part.slug: part for part in typical_parts(units)}
    parts: list[dict[str, Any]] = []
    for i in range(MAX_PARTS):
        keys = [f"part_{name}_{i}" for name in ("name", "area", "u", "typical")]
        if not any(key in data for key in keys):
            break
        name, area_text, u_text, typical = (str(data.get(k, "") or "").strip() for k in keys)
        if not (name or area_text or u_text or typical):
            continue  # a blank row
        if typical and typical not in typicals:
            errors[f"part_typical_{i}"] = "choose a typical part from the list"
            continue
        area = _number(data, f"part_area_{i}", errors, units, high=1e7)
        if u_text:
            u = _number(data, f"part_u_{i}", errors, units, high=100)
        elif typical:
            u = typicals[typical].u
        else:
            errors[f"part_u_{i}"] = "give its U-factor, or pick a typical part"
            u = None
        if area is not None and u is not None:
            label = name or (typicals[typical].label if typical else f"Part {i + 1}")
            parts.append({"name": label[:200], "area": area, "u": u})
    return parts


def read_space_form(data: Mapping[str, str], units: Units) -> tuple[dict[str, Any], dict[str, str]]:
    """The space document a form describes (no id), and a message per field that is wrong.

    Fields: ``kind``, ``label``, ``method`` (``parts`` or ``b``), ``b``; ``volume``,
    ``air_changes`` (typed, wins) or ``air_preset`` (a key of :data:`AIR_CHANGE_PRESETS`);
    exposed parts ``part_name_<i>``, ``part_area_<i>``, ``part_u_<i>``, ``part_typical_<i>``.
    """
    errors: dict[str, str] = {}
    kind = str(data.get("kind", "") or "")
    if kind not in SPACE_KINDS:
        errors["kind"] = "choose what kind of space this is"
    label = str(data.get("label", "") or "").strip()[:200] or SPACE_KINDS.get(kind, "Space")
    space: dict[str, Any] = {"label": label, "kind": kind}
    if data.get("method") == "b":
        space["b"] = _number(data, "b", errors, units, low_open=False, high=1.0)
    else:
        space["exposed"] = _parts(data, units, errors)
        space["volume"] = _number(data, "volume", errors, units, high=1e9)
        preset = str(data.get("air_preset", "") or "")
        if str(data.get("air_changes", "") or "").strip():
            space["air_changes"] = _number(
                data, "air_changes", errors, units, low_open=False, high=1000
            )
        elif preset in AIR_CHANGE_PRESETS:
            space["air_changes"] = AIR_CHANGE_PRESETS[preset][0]
        else:
            errors["air_changes"] = "type the air changes per hour, or pick how airtight it is"
    if not errors:
        try:
            SpaceIn.model_validate({"id": "space", **space})
        except ValidationError as exc:
            first = exc.errors()[0]
            errors[str(first["loc"][0])] = str(first["msg"]).removeprefix("Value error, ")
    return space, errors


def form_text(space: Mapping[str, Any], units: Units) -> dict[str, str]:
    """A stored space as the text its edit form shows."""

    def text(value: Any) -> str:
        if value is None:
            return ""
        shown = f"{float(value):.6g}"
        return shown.replace(".", ",") if units == "si" and "e" not in shown else shown

    out = {
        "kind": str(space.get("kind") or "other"),
        "label": str(space.get("label") or ""),
        "method": "b" if space.get("b") is not None else "parts",
        "b": text(space.get("b")),
        "volume": text(space.get("volume")),
        "air_changes": text(space.get("air_changes")),
        "air_preset": "",
    }
    for i, part in enumerate(space.get("exposed") or []):
        out[f"part_name_{i}"] = str(part.get("name") or "")
        out[f"part_area_{i}"] = text(part.get("area"))
        out[f"part_u_{i}"] = text(part.get("u"))
    return out


# --- verbs -----------------------------------------------------------------------------------


def _stored(space: Mapping[str, Any], ident: str) -> dict[str, Any]:
    doc = SpaceIn.model_validate({**space, "id": ident})
    return doc.model_dump(exclude_none=True)


def add_space(
    *, session: Session, house: House, space: Mapping[str, Any], expected_version: int | None
) -> str:
    """Add a space (a document of :func:`read_space_form`); returns its new id."""
    check_version(house, expected_version)
    spaces = spaces_of(house)
    taken = {str(s.get("id")) for s in spaces} | set(RESERVED_IDS)
    ident = unique_slug(str(space.get("label") or "space"), taken, fallback="space")
    house.spaces = [*spaces, _stored(space, ident)]
    touch(house)
    session.flush()
    return ident


def save_space(
    *, session: Session, house: House, space_id: str, space: Mapping[str, Any],
    expected_version: int | None,
) -> None:  # fmt: skip
    """Replace the space ``space_id`` with ``space`` (its id kept)."""
    check_version(house, expected_version)
    spaces = spaces_of(house)
    index = next((i for i, s in enumerate(spaces) if s.get("id") == space_id), None)
    if index is None:
        raise NotFound
    spaces[index] = _stored(space, space_id)
    house.spaces = spaces
    touch(house)
    session.flush()


def space_uses(house: House, space_id: str) -> list[SpaceUse]:
    """Surfaces facing the space, pipe runs in it and the ducts in it."""
    uses: list[SpaceUse] = []
    for row in house.surfaces:
        details = row.details or {}
        if row.kind == "pipe_run":
            if (details.get("pipe") or {}).get("location") == space_id:
                uses.append(SpaceUse("pipe_run", row.name, row.id))
        elif details.get("adjacent") == space_id:
            uses.append(SpaceUse("surface", row.name, row.id))
    ducts = (house.heating or {}).get("ducts") or {}
    if space_id in (ducts.get("supply_location"), ducts.get("return_location")):
        uses.append(SpaceUse("ducts", "the heating ducts"))
    return uses


def delete_space(
    *, session: Session, house: House, space_id: str, expected_version: int | None,
    release: bool = False,
) -> None:  # fmt: skip
    """Delete a space. While anything faces or lies in it, raise :class:`SpaceInUse`, unless
    ``release``: then those surfaces face the outdoors, pipe runs count as in unconditioned
    space and ducts as outdoors (the answer the user confirmed)."""
    check_version(house, expected_version)
    spaces = spaces_of(house)
    if not any(s.get("id") == space_id for s in spaces):
        raise NotFound
    uses = space_uses(house, space_id)
    if uses and not release:
        raise SpaceInUse(uses)
    for row in house.surfaces:
        details = dict(row.details or {})
        if details.get("adjacent") == space_id:
            details.pop("adjacent")
            row.details = details
        elif (details.get("pipe") or {}).get("location") == space_id:
            row.details = {**details, "pipe": {**details["pipe"], "location": "unconditioned"}}
    heating = dict(house.heating or {})
    if isinstance(heating.get("ducts"), dict):
        ducts = dict(heating["ducts"])
        for key in ("supply_location", "return_location"):
            if ducts.get(key) == space_id:
                ducts[key] = "outdoors"
        if ducts != heating["ducts"]:
            house.heating = {**heating, "ducts": ducts}
    house.spaces = [s for s in spaces if s.get("id") != space_id] or None
    touch(house)
    session.flush()


def convert_spaces(spaces: list[dict[str, Any]], src: Units, dst: Units) -> list[dict[str, Any]]:
    """Stored spaces with their volume, exposed areas and U-factors in the other units."""
    out = []
    for space in spaces:
        space = dict(space)
        if space.get("volume") is not None:
            space["volume"] = convert_value(float(space["volume"]), "volume", src, dst)
        if space.get("exposed"):
            space["exposed"] = [
                {
                    **part,
                    "area": convert_value(float(part["area"]), "area", src, dst),
                    "u": convert_value(float(part["u"]), "u", src, dst),
                }
                for part in space["exposed"]
            ]
        out.append(space)
    return out
