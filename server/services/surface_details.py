"""A surface's details form: name, kind, area, what lies behind it, ground and window inputs.

The form's text is read here (every number through :mod:`server.services.number_text`) into
what a saved surface stores, in the house's units, as the house document expects
(:mod:`server.services.house_document`):

* ``details["adjacent"]``: "outdoors" is not stored (the document's default), a buffer
  space's id is. Ground surfaces (slab, basement floor, basement wall) take no picker: what
  lies behind them is the ground, through their ``ground`` object.
* ``details["ground"]``: the :class:`~server.documents.ground.GroundIn` object (ISO 13370):
  ``exposed_perimeter`` and ``depth`` in ft / m, ``wall_thickness`` in inch / mm,
  ``floor_area`` in ft² / m², ``floor_r`` in h·ft²·°F/Btu / m²·K/W, ``soil`` the standard's
  category. All ground fields left blank = no ground object (the surface then keeps the
  air-to-air U of its layers, as before ground contact existed).
* ``details["window"]``: ``shgc``, ``orientation`` (8 compass points) or ``azimuth``, ``tilt``.
* A window's or door's rated U-factor (films included, as rated) is stored as its assembly:
  one layer of R = 1/U with no films, so calc/house reads U back exactly. Left blank, the
  layers already entered are kept.

Before anything is stored the surface is computed alone through
:func:`server.services.comparison.compute_house` (the calc/house code path), so a save never stores
what the house cannot compute.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import Any, cast

from pydantic import ValidationError
from sqlalchemy.orm import Session

from server.documents.common import Units
from server.documents.house import HouseDocument
from server.errors import Conflict, FieldError, InputError
from server.models import House, Surface
from server.physics import ground as ground_physics
from server.physics.units import INCH_M, from_si
from server.services import houses as svc
from server.services.catalog import Catalog
from server.services.comparison import compute_house
from server.services.house_document import DEFAULT_CLIMATE, DEFAULT_HEATING
from server.services.number_text import NumberTextError, read_decimal, read_length

GROUND_KINDS = ("slab", "basement_floor", "basement_wall")
#: kinds whose rated U-factor is typed on the details form
RATED_KINDS = ("window", "door")
COMPASS = ("N", "NE", "E", "SE", "S", "SW", "W", "NW")
#: the form's value of the orientation picker that means "the azimuth typed below"
AZIMUTH = "azimuth"
#: ISO 13370 soil categories (physics table, "from memory" there): slug -> label
SOIL_LABELS = {
    "clay_silt": "Clay or silt",
    "sand_gravel": "Sand or gravel",
    "rock": "Homogeneous rock",
}
DEFAULT_SOIL = "sand_gravel"
#: ground form fields: form name -> (document name, how it is read)
GROUND_FIELDS = {
    "g_exposed_perimeter": ("exposed_perimeter", "length"),
    "g_wall_thickness": ("wall_thickness", "thickness"),
    "g_depth": ("depth", "length0"),
    "g_floor_area": ("floor_area", "area"),
    "g_floor_r": ("floor_r", "r"),
}
#: fields each ground kind shows, in page order
GROUND_SHOWN = {
    "slab": ("g_exposed_perimeter", "g_wall_thickness", "g_floor_area"),
    "basement_floor": ("g_exposed_perimeter", "g_depth", "g_wall_thickness", "g_floor_area"),
    "basement_wall": ("g_exposed_perimeter", "g_depth", "g_wall_thickness", "g_floor_r"),
}
#: fields left blank that the ground object needs (the rest have a default)
GROUND_REQUIRED = {
    "slab": ("g_exposed_perimeter", "g_wall_thickness"),
    "basement_floor": ("g_exposed_perimeter", "g_depth", "g_wall_thickness"),
    "basement_wall": ("g_exposed_perimeter", "g_depth", "g_wall_thickness"),
}
#: a document path inside the one-surface check -> the form field it belongs to
_DOC_TO_FORM = {doc: form for form, (doc, _) in GROUND_FIELDS.items()} | {
    "soil": "g_soil",
    "soil_conductivity": "g_soil",
}
#: the name of the single layer that holds a rated U-factor
RATED_LAYER = "rated U-factor (films included)"


def soil_choices(units: Units) -> list[tuple[str, str, float, float]]:
    """(slug, label, λ in the house's units, λ in W/(m·K)) of the standard's soil categories."""
    table = ground_physics.SOIL_CONDUCTIVITY_W_MK
    return [
        (slug, label, from_si(table[slug], "conductivity", units), table[slug])
        for slug, label in SOIL_LABELS.items()
    ]


def rated_u(assembly: Mapping[str, Any]) -> float | None:
    """The U-factor of an assembly stored as a rated one (one layer R = 1/U, no films)."""
    layers = assembly.get("layers") or []
    if assembly.get("films") != "none" or len(layers) != 1:
        return None
    r = layers[0].get("r")
    if not isinstance(r, int | float) or r <= 0 or set(layers[0]) - {"name", "r"}:
        return None
    return 1.0 / float(r)


def rated_assembly(u: float) -> dict[str, Any]:
    """The assembly that holds a rated U-factor: one layer R = 1/U, films none."""
    return {
        "heat_flow": "horizontal",
        "films": "none",
        "layers": [{"name": RATED_LAYER, "r": 1.0 / u}],
    }


def _text(value: Any, digits: int = 4) -> str:
    if value is None:
        return ""
    return f"{float(value):.{digits}g}"


def details_text(house: House, surface: Surface) -> dict[str, str]:
    """The form's text for the stored surface (what the page shows before anything is typed)."""
    details = surface.details or {}
    ground = details.get("ground") or {}
    window = details.get("window") or {}
    out = {
        "name": surface.name,
        "kind": surface.kind,
        "area": _text(surface.area, 6),
        "adjacent": details.get("adjacent") or "outdoors",
        "g_soil": ground.get("soil") or DEFAULT_SOIL,
        "w_shgc": _text(window.get("shgc"), 3),
        "w_orientation": window.get("orientation") or (AZIMUTH if "azimuth" in window else ""),
        "w_azimuth": _text(window.get("azimuth"), 5),
        "w_tilt": _text(window.get("tilt"), 4),
        "u": _text(rated_u(surface.assembly or {}), 4),
    }
    for name, (key, _) in GROUND_FIELDS.items():
        out[name] = _text(ground.get(key), 6)
    return out


@dataclass
class Details:
    """What a details form asks to store (house units)."""

    name: str
    kind: str
    area: float
    details: dict[str, Any]
    assembly: dict[str, Any] | None = None  # a new rated assembly, or None to keep the layers
    errors: dict[str, str] = field(default_factory=dict)


def _number(text: str, how: str, units: Units) -> float:
    comma = units == "si"
    if how == "thickness":  # a wall's thickness, typed as the trade says it: 8", 300 mm
        if read_decimal_or_none(text, comma) == 0:
            return 0.0
        metres = read_length(
            text, default_unit="in" if units == "ip" else "mm", decimal_comma=comma
        )
        return metres / INCH_M if units == "ip" else metres * 1e3
    if how == "length":
        return read_decimal(text, decimal_comma=comma, low=0.0, low_open=True, high=1e6)
    if how == "length0":
        return read_decimal(text, decimal_comma=comma, low=0.0, high=1e4)
    if how == "area":
        return read_decimal(text, decimal_comma=comma, low=0.0, low_open=True, high=1e7)
    return read_decimal(text, decimal_comma=comma, low=0.0, high=1000.0)  # an R


def read_decimal_or_none(text: str, comma: bool) -> float | None:
    try:
        return read_decimal(text, decimal_comma=comma)
    except NumberTextError:
        return None


def _read_ground(
    data: Mapping[str, str], kind: str, units: Units, errors: dict[str, str]
) -> dict[str, Any] | None:
    shown = GROUND_SHOWN[kind]
    typed = {name: (data.get(name) or "").strip() for name in shown}
    if not any(typed.values()):
        return None
    ground: dict[str, Any] = {}
    for name in shown:
        if not typed[name]:
            if name in GROUND_REQUIRED[kind]:
                errors[name] = "required for ISO 13370 (or leave every ground field blank)"
            continue
        doc_name, how = GROUND_FIELDS[name]
        try:
            ground[doc_name] = _number(typed[name], how, units)
        except NumberTextError as exc:
            errors[name] = str(exc)
    soil = data.get("g_soil") or DEFAULT_SOIL
    if soil not in SOIL_LABELS:
        errors["g_soil"] = "choose one of the soil types"
    else:
        ground["soil"] = soil
    return ground


def _read_window(data: Mapping[str, str], units: Units, errors: dict[str, str]) -> dict[str, Any]:
    comma = units == "si"
    window: dict[str, Any] = {}
    shgc = (data.get("w_shgc") or "").strip()
    if shgc:
        try:
            window["shgc"] = read_decimal(shgc, decimal_comma=comma, low=0.0, high=1.0)
        except NumberTextError as exc:
            errors["w_shgc"] = f"{exc} (SHGC is a fraction from 0 to 1, e.g. 0.40)"
    facing = data.get("w_orientation") or ""
    if facing in COMPASS:
        window["orientation"] = facing
    elif facing == AZIMUTH:
        try:
            window["azimuth"] = read_decimal(
                data.get("w_azimuth", ""), decimal_comma=comma, low=0.0, high=360.0
            )
        except NumberTextError as exc:
            errors["w_azimuth"] = f"{exc} (degrees from north, clockwise: east 90, south 180)"
    elif facing:
        errors["w_orientation"] = "choose a compass point, or type an azimuth"
    tilt = (data.get("w_tilt") or "").strip()
    if tilt:
        try:
            window["tilt"] = read_decimal(tilt, decimal_comma=comma, low=0.0, high=90.0)
        except NumberTextError as exc:
            errors["w_tilt"] = f"{exc} (degrees from horizontal: 90 upright, 0 flat)"
    return window


def read_details(house: House, surface: Surface, data: Mapping[str, str]) -> Details:
    """The form's text -> what to store; messages per form field in ``errors``."""
    units = cast(Units, house.units)  # the column holds only 'ip' or 'si'
    errors: dict[str, str] = {}
    kind = data.get("kind") or surface.kind
    if kind not in svc.SURFACE_KINDS:
        errors["kind"] = "choose what kind of surface this is"
        kind = surface.kind
    area = 0.0
    try:
        area = read_decimal(data.get("area", ""), decimal_comma=units == "si", low=0.0,
                            low_open=True, high=1e7)  # fmt: skip
    except NumberTextError as exc:
        errors["area"] = str(exc)
    stored = dict(surface.details or {})
    changed_kind = kind != surface.kind
    details: dict[str, Any] = {
        k: v for k, v in stored.items() if k not in ("adjacent", "ground", "window")
    }
    assembly = None
    if kind in GROUND_KINDS:
        if changed_kind:  # the form showed the old kind's fields: keep what still applies
            ground = dict(stored.get("ground") or {}) or None
            if ground is not None and kind != "basement_wall":
                ground.pop("floor_r", None)
        else:
            ground = _read_ground(data, kind, units, errors)
        if ground:
            details["ground"] = ground
    else:
        behind = data.get("adjacent") or "outdoors"
        spaces = {s.get("id") for s in (house.spaces or []) if isinstance(s, dict)}
        if behind not in spaces and behind != "outdoors":
            errors["adjacent"] = "choose outdoors or one of the house's spaces"
        elif behind != "outdoors":
            details["adjacent"] = behind
    if kind == "window":
        window = (
            dict(stored.get("window") or {}) if changed_kind else _read_window(data, units, errors)
        )
        if window:
            details["window"] = window
    typed_u = (data.get("u") or "").strip()
    if kind in RATED_KINDS and not changed_kind and typed_u:
        try:
            u = read_decimal(typed_u, decimal_comma=units == "si", low=0.0, low_open=True,
                             high=100.0 if units == "si" else 17.6)  # fmt: skip
            if typed_u != details_text(house, surface)["u"]:  # unchanged text: keep as stored
                assembly = rated_assembly(u)
        except NumberTextError as exc:
            errors["u"] = str(exc)
    name = (data.get("name") or "").strip() or svc.SURFACE_KINDS.get(kind, kind)
    return Details(name[:200], kind, area, details, assembly, errors)


def _check_computes(
    house: House, surface: Surface, found: Details, catalog: Catalog
) -> dict[str, str]:
    """The surface alone through calc/house's code path; messages per form field."""
    item: dict[str, Any] = {
        "id": surface.slug or "surface",
        "kind": found.kind,
        "name": found.name,
        "area": found.area,
        "assembly": found.assembly or surface.assembly,
    }
    if found.details.get("adjacent"):
        item["adjacent"] = found.details["adjacent"]
    if found.details.get("ground"):
        item["ground"] = found.details["ground"]
    item.update(found.details.get("window") or {})
    body: dict[str, Any] = {"units": house.units, "climate": DEFAULT_CLIMATE,
                            "heating": DEFAULT_HEATING, "surfaces": [item]}  # fmt: skip
    if house.spaces:
        body["spaces"] = house.spaces
    try:
        compute_house(HouseDocument.model_validate(body), catalog=catalog, upgrades_alone=False)
    except ValidationError as exc:
        first = exc.errors()[0]
        return {"form": f"cannot be computed: {str(first['msg']).removeprefix('Value error, ')}"}
    except InputError as exc:
        return {_form_field(e): e.message for e in reversed(exc.errors())}
    return {}


def _form_field(error: FieldError) -> str:
    path = error.field
    for prefix in ("surfaces[0].ground.",):
        if path.startswith(prefix):
            return _DOC_TO_FORM.get(path[len(prefix) :].split(".")[0], "form")
    if path.startswith("surfaces[0].assembly"):
        error.message = f"the layers below cannot be computed with these details: {error.message}"
    elif path.startswith("surfaces[0].adjacent"):
        return "adjacent"
    return "form"


def save_surface_details(
    *,
    session: Session,
    house: House,
    surface: Surface,
    data: Mapping[str, str],
    catalog: Catalog,
    expected_version: int | None,
) -> None:
    """Read, check (the surface computed alone by calc/house's code) and store the details.

    Raises :class:`Conflict` for a form loaded before another save, and :class:`InputError`
    (every message, each naming its form field) when something cannot be stored; nothing is
    changed then.
    """
    svc.check_version(house, expected_version)
    if surface.kind == "pipe_run":
        raise InputError("kind", "a pipe run stays a pipe run: delete it to add a surface instead")
    found = read_details(house, surface, data)
    errors = found.errors or _check_computes(house, surface, found, catalog)
    if errors:
        (first, message), *rest = errors.items()
        raise InputError(first, message, [FieldError(f, m) for f, m in rest])
    surface.name = found.name
    surface.kind = found.kind
    surface.area = found.area
    surface.details = found.details
    if found.assembly is not None:
        surface.assembly = found.assembly
    svc.touch(house)
    session.flush()


def ground_help(units: Units) -> dict[str, str]:
    """The defaults the page says beside the ground inputs (house units)."""
    lam = from_si(ground_physics.DEFAULT_SOIL_CONDUCTIVITY_W_MK, "conductivity", units)
    unit = "Btu·in/(h·ft²·°F)" if units == "ip" else "W/(m·K)"
    foot = "ft" if units == "ip" else "m"
    return {
        "soil": f"Not known? ISO 13370 advises sand or gravel, λ = {lam:.3g} {unit}.",
        "films": "Surface resistances are ISO 13370's: inside 0.17 m²·K/W for a floor (0.13 for a "
        "wall), outside 0.04 m²·K/W; the layers below give the construction's own R.",
        "depth": f"From outside ground level down to the basement floor ({foot}).",
        "perimeter": "Only the length of floor edge next to outside air (not to a heated "
        "neighbour or an attached garage counted as a space).",
    }


__all__ = [
    "AZIMUTH",
    "COMPASS",
    "Conflict",
    "GROUND_KINDS",
    "GROUND_SHOWN",
    "RATED_KINDS",
    "Details",
    "details_text",
    "ground_help",
    "read_details",
    "rated_assembly",
    "rated_u",
    "save_surface_details",
    "soil_choices",
]
