"""Upgrades of the newer kinds read from form text: ground, windows, ducts and pipe jackets.

Each form's text is read in the house's units (the document's units, so nothing is converted
except a leakage typed in % of the air handler's flow, stored as the fraction calc/house
reads). What is stored is the upgrade document exactly as ``calc/house`` takes it
(:func:`server.services.house_document.house_document` builds the document from the rows);
the ``kind`` column decides the kind. Before anything is stored, the whole house is computed
with the new document (:func:`check_in_house`), so a saved upgrade always computes.

Which form an upgrade is edited with (:func:`change_part`) follows its ``kind`` column; only
within kind ``assembly`` does a ground change without new layers (slab-edge insulation) get
its own fields instead of the layer editor.
"""

from __future__ import annotations

import copy
from collections.abc import Mapping
from typing import Any

from pydantic import ValidationError

from server.documents.house import HouseDocument, HouseResult, UpgradeIn
from server.errors import InputError
from server.models import House, Surface, Upgrade
from server.physics.units import FOOT_M, INCH_M
from server.services.catalog import Catalog
from server.services.comparison import compute_house
from server.services.house_document import house_document
from server.services.number_text import NumberTextError, read_decimal, read_length

#: what each form proposes -> the ``upgrades.kind`` column it is stored with
FORM_KINDS: dict[str, str] = {
    "interior_insulation": "assembly",
    "slab_edge": "assembly",
    "window": "window",
    "storm_panel": "window",
    "duct_sealing": "duct_sealing",
    "duct_insulation": "duct_insulation",
}
#: the surface kinds each surface form belongs to
PART_SURFACES: dict[str, tuple[str, ...]] = {
    "interior_insulation": ("basement_wall", "basement_floor", "slab"),
    "slab_edge": ("slab",),
    "window": ("window",),
    "storm_panel": ("window",),
}
#: expected life of each form's work, years (common practice; editable on the Upgrade page)
LIFE_YEARS: dict[str, float] = {
    "interior_insulation": 30.0,
    "slab_edge": 30.0,
    "window": 30.0,
    "storm_panel": 20.0,
    "duct_sealing": 20.0,
    "duct_insulation": 25.0,
}
DEFAULT_NAMES: dict[str, str] = {
    "interior_insulation": "{surface}: interior insulation",
    "slab_edge": "{surface}: slab-edge insulation",
    "window": "{surface}: replacement window",
    "storm_panel": "{surface}: storm panel",
    "duct_sealing": "Duct sealing",
    "duct_insulation": "Duct insulation",
}
#: the jacket's emissivity when none is typed (the calculator's own default, common practice)
JACKET_EMISSIVITY = 0.9


class ChangeError(Exception):
    """Form text that does not make an upgrade; ``errors`` maps each field to its message."""

    def __init__(self, errors: dict[str, str]) -> None:
        super().__init__(next(iter(errors.values()), "check the upgrade"))
        self.errors = errors


def _number(
    data: Mapping[str, str], key: str, errors: dict[str, str], *, units: str,
    low: float, high: float, low_open: bool = False, optional: bool = False,
) -> float | None:  # fmt: skip
    text = (data.get(key) or "").strip()
    if not text:
        if not optional:
            errors[key] = "required"
        return None
    try:
        return read_decimal(
            text, decimal_comma=units == "si", low=low, high=high, low_open=low_open
        )
    except NumberTextError as exc:
        errors[key] = str(exc)
        return None


def _length(
    data: Mapping[str, str], key: str, errors: dict[str, str], *, units: str, thickness: bool
) -> float | None:
    """A length typed as the trade does (``1-1/2``, ``2' 6"``), in inch / mm (``thickness``)
    or ft / m, the document's units for that field."""
    text = (data.get(key) or "").strip()
    if not text:
        errors[key] = "required"
        return None
    si = units == "si"
    default = ("mm" if si else "in") if thickness else ("m" if si else "ft")
    try:
        metres = read_length(text, default_unit=default, decimal_comma=si)
    except NumberTextError as exc:
        errors[key] = str(exc)
        return None
    if thickness:
        return metres * 1000.0 if si else metres / INCH_M
    return metres if si else metres / FOOT_M


def _r_words(units: str) -> str:
    return "h·ft²·°F/Btu" if units == "ip" else "m²·K/W"


def read_change(
    part: str, data: Mapping[str, str], *, units: str, surface: Surface | None,
    ducts: Mapping[str, Any] | None,
) -> dict[str, Any]:  # fmt: skip
    """The upgrade document's own fields for form ``part``, read from the typed text.

    Raises
    ------
    ChangeError
        With a message per field (the form's field names), nothing stored.
    """
    errors: dict[str, str] = {}
    out: dict[str, Any] = {}
    if part == "interior_insulation":
        r = _number(data, "added_r", errors, units=units, low=0.0, high=100.0, low_open=True)
        if r is not None and surface is not None:
            assembly = copy.deepcopy(surface.assembly)
            layers = list(assembly.get("layers") or [])
            # the new layer goes on the inside (the last layer of an outside-to-inside list)
            layers.append({"name": "interior insulation", "r": r})
            out["assembly"] = {**assembly, "layers": layers}
    elif part == "slab_edge":
        orientation = data.get("edge_orientation", "")
        if orientation not in ("horizontal", "vertical"):
            errors["edge_orientation"] = "choose vertical (down the foundation) or horizontal"
        width = _length(data, "edge_width", errors, units=units, thickness=False)
        r = _number(data, "edge_r", errors, units=units, low=0.0, high=100.0, low_open=True)
        thick = _length(data, "edge_thickness", errors, units=units, thickness=True)
        if not errors:
            out["ground"] = {"edge_insulation": {"orientation": orientation, "width_or_depth": width,
                                                 "r": r, "thickness": thick}}  # fmt: skip
    elif part in ("window", "storm_panel"):
        out["u"] = _number(data, "u", errors, units=units, low=0.0, high=100.0, low_open=True)
        out["shgc"] = _number(data, "shgc", errors, units=units, low=0.0, high=1.0)
    elif part == "duct_sealing":
        for side in ("supply", "return"):
            key = f"{side}_leakage_after"
            pct = _number(data, key, errors, units=units, low=0.0, high=90.0, optional=True)
            found = float((ducts or {}).get(f"{side}_leakage", 0.0)) * 100.0
            if pct is not None and pct >= found and key not in errors:
                errors[key] = f"must be below the as-found {found:.3g} %"
            else:
                out[key] = None if pct is None else pct / 100.0  # None: unchanged (removed)
        if not errors and all(v is None for v in out.values()):
            errors["supply_leakage_after"] = "enter the supply or the return leakage after sealing"
    elif part == "duct_insulation":
        for side in ("supply", "return"):
            key = f"{side}_r_after"
            r = _number(data, key, errors, units=units, low=0.01, high=100.0, optional=True)
            found = float((ducts or {}).get(f"{side}_r", 0.0))
            if r is not None and r <= found and key not in errors:
                errors[key] = f"must be above the as-found R {found:.3g} {_r_words(units)}"
            else:
                out[key] = r  # None: unchanged (removed)
        if not errors and all(v is None for v in out.values()):
            errors["supply_r_after"] = "enter the supply or the return duct R after"
    elif part == "pipe_jacket":
        e = _number(data, "emissivity", errors, units=units, low=0.0, high=1.0, low_open=True,
                    optional=True)  # fmt: skip
        out["emissivity"] = e  # None: the jacket default
    else:
        errors["kind"] = "choose what the upgrade does"
    if errors:
        raise ChangeError(errors)
    return out


def change_part(upgrade: Upgrade) -> str | None:
    """The fields an upgrade is edited with on its page, from its ``kind`` column (None: the
    layer editor, or air sealing's own fields)."""
    if upgrade.kind in ("window", "duct_sealing", "duct_insulation"):
        return upgrade.kind
    if upgrade.kind == "pipe_insulation":
        return "pipe_jacket"
    doc = upgrade.document or {}
    if upgrade.kind == "assembly" and doc.get("assembly") is None and doc.get("ground"):
        return "slab_edge"
    return None


def form_values(upgrade: Upgrade, units: str) -> dict[str, str]:
    """The stored fields as the form shows them (leakage in %)."""
    doc = upgrade.document or {}
    out: dict[str, str] = {}
    for key in ("u", "shgc", "supply_r_after", "return_r_after", "emissivity"):
        if doc.get(key) is not None:
            out[key] = f"{doc[key]:g}"
    for key in ("supply_leakage_after", "return_leakage_after"):
        if doc.get(key) is not None:
            out[key] = f"{doc[key] * 100:.4g}"
    edge = (doc.get("ground") or {}).get("edge_insulation") or {}
    if edge:
        out["edge_orientation"] = edge.get("orientation", "")
        for key, name in (("width_or_depth", "edge_width"), ("r", "edge_r"),
                          ("thickness", "edge_thickness")):  # fmt: skip
            if edge.get(key) is not None:
                out[name] = f"{edge[key]:.4g}"
    return out


def check_in_house(
    house: House, *, slug: str, kind: str, document: Mapping[str, Any], catalog: Catalog
) -> None:
    """Compute the house with upgrade ``slug`` as ``document`` (added or replaced), through
    calc/house's own code, and raise the upgrade's first problem as an InputError.

    Problems elsewhere in the house are not this form's to report and are ignored here.
    """
    try:
        body = house_document(house).model_dump(exclude_none=True)
    except InputError:
        return  # the saved house does not compute yet: its own page says why
    # the new upgrade alone (as the Upgrade page computes it): its problems are upgrades[0]'s
    body["upgrades"] = [{"id": slug, "name": slug, **document, "kind": kind}]
    body["packages"] = []
    try:
        doc = HouseDocument.model_validate(body)
    except ValidationError as exc:
        raise InputError("change", _words(exc)) from None
    try:
        compute_house(doc, catalog=catalog, upgrades_alone=False)
    except InputError as exc:
        if exc.field.startswith("upgrades"):
            raise InputError("change", exc.message) from None


def _words(exc: ValidationError) -> str:
    return str(exc.errors()[0]["msg"]).removeprefix("Value error, ")


def upgrade_effect(
    house: House, upgrade: Upgrade, *, catalog: Catalog
) -> tuple[HouseResult | None, str]:
    """The house with the upgrade done alone, computed by calc/house's code
    (``compute_house``) on the saved house's document: the result (as found and
    ``upgrades[0]``), or (None, the reason) when the house cannot be computed."""
    try:
        doc = house_document(house)
        own = [u for u in doc.upgrades if u.id == upgrade.slug]
        result = compute_house(
            doc.model_copy(update={"upgrades": own, "packages": []}),
            catalog=catalog,
            upgrades_alone=True,
        )
    except InputError as exc:
        return None, exc.message
    if not result.upgrades:
        return None, "this upgrade is not part of the house's document"
    return result, ""


#: cautions for the work of each kind (DESIGN.md §7; common practice), beside the surface's own
KIND_CAUTIONS: dict[str, tuple[str, ...]] = {
    "window": (
        "Old window sashes, frames and sills may carry lead paint: in a house built before 1978 "
        "test before cutting or sanding, and use lead-safe work practices.",
        "Bedroom windows are emergency exits: a replacement must keep the opening size the "
        "local code requires, and glass near doors, floors and tubs must be safety glazing.",
    ),
    "duct_sealing": (
        "Sealing return ducts near a furnace or water heater changes the pressure round them: "
        "test combustion safety (spillage, CO) after the work.",
        "Old duct wrap or tape can contain asbestos: have it tested before it is disturbed.",
    ),
    "duct_insulation": (
        "Old duct wrap or tape can contain asbestos: have it tested before it is disturbed.",
        "Keep insulation the listed clearance away from flues and furnace vents.",
    ),
}


def new_document(
    part: str, change: dict[str, Any], *, surface: Surface | None, costs: dict[str, Any]
) -> dict[str, Any]:
    """The stored upgrade document (without id, name and kind: those are columns)."""
    doc: dict[str, Any] = {}
    if surface is not None:
        doc["surface"] = surface.slug
    doc.update({k: v for k, v in change.items() if v is not None})
    doc.update(costs)
    try:
        UpgradeIn.model_validate({"id": "check", "kind": FORM_KINDS[part], **doc})
    except ValidationError as exc:
        raise InputError("change", _words(exc)) from None
    return doc


__all__ = [
    "DEFAULT_NAMES",
    "FORM_KINDS",
    "JACKET_EMISSIVITY",
    "KIND_CAUTIONS",
    "LIFE_YEARS",
    "PART_SURFACES",
    "ChangeError",
    "change_part",
    "check_in_house",
    "form_values",
    "new_document",
    "read_change",
    "upgrade_effect",
]
