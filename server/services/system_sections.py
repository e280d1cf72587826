"""Saving the House page's systems cards and what a pipe run carries.

A card's values (already read from text) are merged into the house's stored documents, the
parts they change are checked by the same pydantic models the house calculation uses, and the
house is written at once (:func:`~server.services.houses.touch`), so a stale form or a save
that lost a race raises :class:`~server.errors.Conflict` and stores nothing.

Where each card is stored (the house document of :mod:`server.services.house_document`):

* ``design``: ``heating.output_capacity``; ``climate.heating_design_temperature`` and
  ``climate.indoor_design_temperature``.
* ``ducts``: ``heating.ducts``; ``heat_pump``: ``heating.heat_pump``.
* ``ventilation``: ``air_leakage.mechanical_ventilation`` (the document's
  ``mechanical_ventilation``, kept beside the air as an imported house keeps it).
* ``n_factor``: ``air_leakage.n_factor`` or ``air_leakage.n_factor_table``.
* ``house``: the ``floor_area`` column, ``climate.gains`` (bedrooms, internal gains) and
  ``climate.elevation``.
"""

from __future__ import annotations

from typing import Annotated, Any

from pydantic import BaseModel, Field, ValidationError

from server.documents.common import Strict
from server.documents.house import AirLeakageIn, Area, ClimateIn, HeatingIn, PipeIn
from server.documents.systems import MechanicalVentilationIn
from server.errors import InputError
from server.models import House, Surface
from server.physics.gains import resnet_internal_gains_w
from server.physics.units import UnitSystem, from_si, to_si
from server.services.gains import RESNET_WORDS
from server.services.house_document import CLIMATE_KEYS
from server.services.houses import check_version, touch

CARD_KEYS = ("design", "ducts", "heat_pump", "ventilation", "n_factor", "house")
DESIGN_CLIMATE = ("heating_design_temperature", "indoor_design_temperature")
NO_HEATING = "save the heating system (fuel, efficiency, price) first, in its card above"
NO_CLIMATE = "save the climate's degree-days first (typed, or from a weather file)"
NO_BLOWER_DOOR = "save the air leakage (blower door CFM50 or ACH50 and the volume) first"


class HouseFactsIn(Strict):
    """The house card's own fields, with the bounds of the house document."""

    floor_area: Area | None = None
    bedrooms: Annotated[int, Field(ge=0, le=100)] | None = None
    internal_gains: Annotated[float, Field(ge=0, le=1e7, allow_inf_nan=False)] | None = None


def resnet_default(house: House) -> tuple[float, str] | None:
    """The published default internal gains [Btu/h or W] from the floor area and bedrooms,
    with its source, or None until both are saved (what the house document uses when no
    internal gains are typed)."""
    gains = (house.climate or {}).get("gains")
    bedrooms = gains.get("bedrooms") if isinstance(gains, dict) else None
    if not house.floor_area or bedrooms is None:
        return None
    units: UnitSystem = "si" if house.units == "si" else "ip"
    watts = resnet_internal_gains_w(to_si(house.floor_area, "area", units), bedrooms)
    return from_si(watts, "power", units), RESNET_WORDS


def card_stored(house: House, card: str) -> dict[str, Any]:
    """The stored values a card shows, by its field keys."""
    heating, climate = house.heating or {}, house.climate or {}
    air = house.air_leakage or {}
    if card == "design":
        return {"output_capacity": heating.get("output_capacity"),
                **{k: climate.get(k) for k in DESIGN_CLIMATE}}  # fmt: skip
    if card == "ducts":
        return dict(heating.get("ducts") or {})
    if card == "heat_pump":
        return dict(heating.get("heat_pump") or {})
    if card == "ventilation":
        return dict(air.get("mechanical_ventilation") or {})
    if card == "n_factor":
        table = air.get("n_factor_table") or {}
        typed = air.get("n_factor")
        source = "table" if table else ("typed" if typed not in (None, 18, 18.0) else "default")
        return {"source": source, **table, "n_factor": typed if source == "typed" else None}
    if card == "house":
        stored = climate.get("gains")
        gains: dict[str, Any] = stored if isinstance(stored, dict) else {}
        return {"floor_area": house.floor_area, "bedrooms": gains.get("bedrooms"),
                "internal_gains": gains.get("internal_gains"), "elevation": climate.get("elevation")}  # fmt: skip
    raise KeyError(card)


def _check(model: type[BaseModel], doc: dict[str, Any], units: str, keys: dict[str, str]) -> None:
    """Validate ``doc`` with ``model``; the first problem as an InputError on the card's field
    (``keys`` maps a document field to the card's; anything else is the card's ``form``)."""
    try:
        model.model_validate(doc, context={"units": units})
    except ValidationError as exc:
        err = exc.errors()[0]
        loc = [str(p) for p in err.get("loc", ())]
        field = next((keys[p] for p in reversed(loc) if p in keys), "form")
        raise InputError(field, str(err.get("msg", "")).removeprefix("Value error, ")) from None


def _set(doc: dict[str, Any], key: str, value: Any) -> None:
    if value is None:
        doc.pop(key, None)
    else:
        doc[key] = value


def _calc_climate(climate: dict[str, Any]) -> dict[str, Any]:
    return {k: v for k, v in climate.items() if k in CLIMATE_KEYS and v is not None}


def card_changes(house: House, card: str, values: dict[str, Any]) -> dict[str, Any]:
    """The house attributes the card changes, {attribute: new value}, checked.

    Raises
    ------
    InputError
        On the card's field (or ``form``) when the values do not make a valid document.
    KeyError
        ``card`` is not one of :data:`CARD_KEYS` (routes 404 it first).
    """
    units = house.units
    heating, climate = dict(house.heating or {}), dict(house.climate or {})
    air = dict(house.air_leakage or {})
    if card in ("design", "ducts", "heat_pump"):
        given = [k for k, v in values.items() if v is not None and k not in DESIGN_CLIMATE]
        if given and not heating.get("fuel"):
            raise InputError(given[0] if card == "design" else "form", NO_HEATING)
    if card == "design":
        _set(heating, "output_capacity", values.get("output_capacity"))
        for key in DESIGN_CLIMATE:
            _set(climate, key, values.get(key))
        if any(values.get(k) is not None for k in DESIGN_CLIMATE) and "hdd" not in climate:
            raise InputError("heating_design_temperature", NO_CLIMATE)
        if heating.get("fuel"):
            _check(HeatingIn, heating, units, {"output_capacity": "output_capacity"})
        if "hdd" in climate:
            _check(ClimateIn, _calc_climate(climate), units, {k: k for k in DESIGN_CLIMATE})
        return {"heating": heating, "climate": climate}
    if card in ("ducts", "heat_pump"):
        _set(heating, card, values or None)
        if card == "heat_pump" and values and heating.get("fuel") != "heat_pump":
            raise InputError(
                "form", "set the heating system's fuel to heat pump first (Heating system card)"
            )
        if card == "ducts" and values and not values.get("air_flow"):
            if not heating.get("output_capacity"):
                raise InputError(
                    "air_flow",
                    "give the air handler's flow, or the equipment output in the design-load card",
                )
        if heating.get("fuel"):
            _check(HeatingIn, heating, units, {k: k for k in values})
        return {"heating": heating}
    if card == "ventilation":
        if values.get("kind") is None:
            air.pop("mechanical_ventilation", None)
        else:
            vent = {k: v for k, v in values.items() if v is not None}
            if "air_flow" not in vent:
                raise InputError("air_flow", "required")
            _check(MechanicalVentilationIn, vent, units, {k: k for k in vent})
            air["mechanical_ventilation"] = vent
        return {"air_leakage": air or None}
    if card == "n_factor":
        source = values.get("source", "default")
        air.pop("n_factor", None)
        air.pop("n_factor_table", None)
        if source == "typed":
            if values.get("n_factor") is None:
                raise InputError("n_factor", "type the N-factor, or choose another source")
            air["n_factor"] = values["n_factor"]
        elif source == "table":
            missing = [k for k in ("zone", "stories") if values.get(k) is None]
            if missing:
                raise InputError(missing[0], "required for the table")
            air["n_factor_table"] = {"zone": values["zone"], "stories": values["stories"],
                                     "shielding": values.get("shielding") or "normal"}  # fmt: skip
        leak = {k: v for k, v in air.items() if k != "mechanical_ventilation"}
        if not (leak.get("volume") and ("cfm50" in leak or "n50" in leak)):
            raise InputError("source", NO_BLOWER_DOOR)
        _check(AirLeakageIn, leak, units, {"n_factor": "n_factor", "zone": "zone",
                                           "stories": "stories", "shielding": "shielding"})  # fmt: skip
        return {"air_leakage": air}
    if card == "house":
        facts = {k: values.get(k) for k in ("floor_area", "bedrooms", "internal_gains")}
        _check(HouseFactsIn, {k: v for k, v in facts.items() if v is not None}, units,
               {k: k for k in facts})  # fmt: skip
        gains = {k: facts[k] for k in ("bedrooms", "internal_gains") if facts[k] is not None}
        _set(climate, "gains", gains or None)
        _set(climate, "elevation", values.get("elevation"))
        if values.get("elevation") is not None:
            if "hdd" not in climate:
                raise InputError("elevation", NO_CLIMATE)
            _check(ClimateIn, _calc_climate(climate), units, {"elevation": "elevation"})
        return {"floor_area": facts["floor_area"], "climate": climate}
    raise KeyError(card)


def save_system_card(
    *, house: House, card: str, values: dict[str, Any], expected_version: int | None
) -> None:
    """Check the card's values and store them on the house.

    Raises
    ------
    InputError
        The values do not make a valid document (nothing stored).
    Conflict
        The form was loaded from an older version, or another save came first.
    """
    changes = card_changes(house, card, values)
    check_version(house, expected_version)
    for attribute, value in changes.items():
        setattr(house, attribute, value)
    touch(house)


#: the pipe-run fields a pipe's "what it carries" form sets (server/documents/house.py PipeIn)
PIPE_SERVICE_KEYS = ("service", "location", "water_heater", "material", "emissivity",
                     "heating_season_share")  # fmt: skip


def save_pipe_service(
    *, house: House, surface: Surface, values: dict[str, Any], expected_version: int | None
) -> None:
    """What a pipe run carries, where it runs and its bare surface, onto its stored pipe.

    ``values`` holds :data:`PIPE_SERVICE_KEYS` (None: not given, removed). The location must be
    ``conditioned``, ``unconditioned`` or one of the house's buffer spaces.

    Raises
    ------
    InputError
        On the form's field (``water_heater.fuel`` and so on) when the pipe is not valid.
    Conflict
        The form was loaded from an older version, or another save came first.
    """
    pipe = {k: v for k, v in (surface.details or {}).get("pipe", {}).items()
            if k not in PIPE_SERVICE_KEYS}  # fmt: skip
    pipe.update({k: v for k, v in values.items() if k in PIPE_SERVICE_KEYS and v is not None})
    spaces = {str(s.get("id")) for s in house.spaces or [] if isinstance(s, dict)}
    where = pipe.get("location")
    if where is not None and where not in {"conditioned", "unconditioned", *spaces}:
        raise InputError("location", "choose one of the list")
    try:
        spec = PipeIn.model_validate(pipe).model_dump(exclude_none=True)
    except ValidationError as exc:
        err = exc.errors()[0]
        field = ".".join(str(p) for p in err.get("loc", ())) or "form"
        raise InputError(field, str(err.get("msg", "")).removeprefix("Value error, ")) from None
    check_version(house, expected_version)
    surface.details = {**(surface.details or {}), "pipe": spec}
    touch(house)
