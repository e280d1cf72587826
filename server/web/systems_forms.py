"""The House page's systems cards (templates/partials/house_systems.html): form text <-> values.

Each card is a small form like the settings cards (:mod:`server.web.settings_forms`): its typed
text is kept on error, numbers are read by :mod:`server.services.number_text` (a decimal comma
only in a metric house), and the values it gives are checked and stored by
:mod:`server.services.system_sections` with the same pydantic models the house calculation uses.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from typing import Any

from server.models import House
from server.services.number_text import NumberTextError, read_decimal, read_integer
from server.services.system_sections import CARD_KEYS, card_stored
from server.web.settings_forms import Field_

LOCATIONS = "locations"  # a field whose choices are the house's own places (see location_choices)

SHIELDING = (("well_shielded", "well shielded (trees, close neighbours)"),
             ("normal", "normal (some trees or houses around)"),
             ("exposed", "exposed (open site, no shelter)"))  # fmt: skip
#: the LBL table's climate zones 1–4 (server/physics/ventilation.py)
N_ZONES = (("1", "1: mild winters, little wind"), ("2", "2"), ("3", "3"),
           ("4", "4: severe winters or much wind"))  # fmt: skip
N_SOURCES = (("default", "the usual 18 (common practice)"),
             ("table", "from the published table (below)"), ("typed", "typed (below)"))  # fmt: skip
VENT_KINDS = (("hrv", "HRV (heat recovery ventilator)"), ("erv", "ERV (energy recovery ventilator)"),
              ("exhaust", "exhaust fan only"), ("supply", "supply fan only"))  # fmt: skip
LOCATION_FIELD = ("supply_location", "return_location")

CARDS: dict[str, tuple[str, tuple[Field_, ...]]] = {
    "design": ("Design load and equipment", (
        Field_("output_capacity", "Heating equipment output", "Btu/h", "W", optional=True),
        Field_("heating_design_temperature", "Outdoor design temperature (99 %)", "°F", "°C",
               optional=True),
        Field_("indoor_design_temperature", "Indoor design temperature", "°F", "°C", optional=True),
    )),
    "ducts": ("Ducts", (
        Field_("supply_location", "Supply ducts run in", choices=((LOCATIONS, ""),)),
        Field_("return_location", "Return ducts run in", choices=((LOCATIONS, ""),)),
        Field_("supply_leakage", "Supply leakage, share of the air handler's flow", percent=True),
        Field_("return_leakage", "Return leakage, share of the air handler's flow", percent=True),
        Field_("supply_r", "Supply duct R (with films)", "h·ft²·°F/Btu", "m²·K/W"),
        Field_("return_r", "Return duct R (with films)", "h·ft²·°F/Btu", "m²·K/W"),
        Field_("supply_area", "Supply duct outer surface", "ft²", "m²"),
        Field_("return_area", "Return duct outer surface", "ft²", "m²"),
        Field_("air_flow", "Air handler flow", "ft³/min", "L/s", optional=True),
    )),
    "heat_pump": ("Heat pump ratings", (
        Field_("hspf", "HSPF", "Btu/Wh", "Btu/Wh", optional=True),
        Field_("hspf2", "or HSPF2", "Btu/Wh", "Btu/Wh", optional=True),
        Field_("cop_47", "or COP at 47 °F (8.3 °C)", optional=True),
        Field_("capacity_47", "Capacity at 47 °F (8.3 °C)", "Btu/h", "W", optional=True),
        Field_("capacity_17", "Capacity at 17 °F (−8.3 °C)", "Btu/h", "W", optional=True),
        Field_("cop_17", "COP at 17 °F (−8.3 °C)", optional=True),
        Field_("cutoff_temperature", "Compressor off below", "°F", "°C", optional=True),
        Field_("backup_efficiency", "Backup heat efficiency", "fraction", "fraction", optional=True),
    )),
    "ventilation": ("Mechanical ventilation", (
        Field_("kind", "Kind", choices=VENT_KINDS, optional=True),
        Field_("air_flow", "Air flow, running all the time", "ft³/min", "L/s", optional=True),
        Field_("sensible_recovery", "Sensible recovery efficiency", percent=True, optional=True),
    )),
    "n_factor": ("N-factor (blower door to a year's air changes)", (
        Field_("source", "N-factor", choices=N_SOURCES),
        Field_("zone", "Table: climate zone", choices=N_ZONES, optional=True),
        Field_("stories", "Table: stories", "1 to 3", "1 to 3", optional=True),
        Field_("shielding", "Table: shielding", choices=SHIELDING, optional=True),
        Field_("n_factor", "Typed N-factor", optional=True),
    )),
    "house": ("The house: size, occupants, site", (
        Field_("floor_area", "Conditioned floor area", "ft²", "m²", optional=True),
        Field_("bedrooms", "Bedrooms", integer=True, optional=True),
        Field_("internal_gains", "Internal gains", "Btu/h", "W", optional=True),
        Field_("elevation", "Elevation above sea level", "ft", "m", optional=True),
    )),
}  # fmt: skip
#: cards whose thing can be absent: every field blank removes it
REMOVABLE = {"ducts", "heat_pump"}
assert set(CARDS) == set(CARD_KEYS)


def location_choices(house: House) -> tuple[tuple[str, str], ...]:
    """Where ducts may run: the conditioned space, outdoors, or a buffer space of the house."""
    spaces = tuple(
        (str(s.get("id")), f"{s.get('label') or s.get('id')} (buffer space)")
        for s in house.spaces or []
        if isinstance(s, dict) and s.get("id")
    )
    return (("conditioned", "the heated space"), *spaces, ("outdoors", "outdoors"))


def choices_for(f: Field_, locations: Sequence[tuple[str, str]]) -> tuple[tuple[str, str], ...]:
    return tuple(locations) if f.choices == ((LOCATIONS, ""),) else f.choices


def _text(value: Any, f: Field_) -> str:
    if value is None:
        return ""
    if f.percent:
        return f"{value * 100:.6g}"
    if isinstance(value, float):
        return f"{value:.10g}"
    return str(value)


def card_values(house: House, card: str) -> dict[str, str]:
    """What the card's inputs show: the stored values as text."""
    stored = card_stored(house, card)
    return {f.key: _text(stored.get(f.key), f) for f in CARDS[card][1]}


def parse_card(
    card: str, data: Mapping[str, str], *, units: str, locations: Sequence[tuple[str, str]]
) -> tuple[dict[str, Any] | None, dict[str, str]]:
    """Posted text -> ({field: value} of the fields given, or None; {field: message}).

    Every field left blank on a removable card (ducts, heat pump) gives ``{}``: remove it."""
    fields = CARDS[card][1]
    texts = {f.key: (data.get(f.key) or "").strip().rstrip("%").strip() for f in fields}
    if card in REMOVABLE and not any(texts.values()):
        return {}, {}
    values: dict[str, Any] = {}
    errors: dict[str, str] = {}
    for f in fields:
        text = texts[f.key]
        if not text:
            if not f.optional:
                errors[f.key] = "required"
            continue
        choices = choices_for(f, locations)
        if choices:
            if text not in dict(choices):
                errors[f.key] = "choose one of the list"
            else:
                values[f.key] = int(text) if f.key == "zone" else text
            continue
        try:
            if f.integer:
                values[f.key] = read_integer(text, low=0)
                continue
            number = read_decimal(text, decimal_comma=units == "si")
        except NumberTextError as exc:
            errors[f.key] = str(exc)
            continue
        values[f.key] = number / 100 if f.percent else number
    return (None if errors else values), errors


PIPE_SERVICES = (("heating_water", "heating water (boiler loop)"),
                 ("domestic_hot_water", "domestic hot water"))  # fmt: skip
PIPE_MATERIALS = (("copper", "copper"), ("steel", "steel"), ("plastic", "plastic (PEX, CPVC)"),
                  ("other", "other"))  # fmt: skip


def pipe_locations(house: House) -> tuple[tuple[str, str], ...]:
    """Where a pipe may run: heated space, a buffer space of the house, or unheated space."""
    spaces = location_choices(house)[1:-1]
    return (("conditioned", "the heated space"), *spaces,
            ("unconditioned", "unheated space or outdoors"))  # fmt: skip


def pipe_service_values(pipe: Mapping[str, Any]) -> dict[str, str]:
    """A stored pipe's service fields as the form's text."""
    heater = pipe.get("water_heater") or {}
    out = {
        k: "" if pipe.get(k) is None else str(pipe[k]) for k in ("service", "location", "material")
    }
    out["emissivity"] = "" if pipe.get("emissivity") is None else f"{pipe['emissivity']:.10g}"
    for k in ("fuel", "efficiency", "price"):
        value = heater.get(k)
        out[f"heater_{k}"] = "" if value is None else (f"{value:.10g}" if k != "fuel" else value)
    return out


def parse_pipe_service(
    data: Mapping[str, str], *, units: str, house: House
) -> tuple[dict[str, Any] | None, dict[str, str]]:
    """The pipe-run form -> the pipe's service fields (None: not said), or the messages."""
    from server.web.settings_forms import FUEL_CHOICES

    errors: dict[str, str] = {}
    values: dict[str, Any] = {}
    lists = {
        "service": PIPE_SERVICES,
        "location": pipe_locations(house),
        "material": PIPE_MATERIALS,
    }
    for key, choices in lists.items():
        text = (data.get(key) or "").strip()
        if text and text not in dict(choices):
            errors[key] = "choose one of the list"
        values[key] = text or None

    def number(key: str) -> float | None:
        text = (data.get(key) or "").strip()
        if not text:
            return None
        try:
            return read_decimal(text, decimal_comma=units == "si")
        except NumberTextError as exc:
            errors[key] = str(exc)
            return None

    values["emissivity"] = number("emissivity")
    heater = {"fuel": (data.get("heater_fuel") or "").strip(), "efficiency": number("heater_efficiency"),
              "price": number("heater_price")}  # fmt: skip
    if values["service"] == "domestic_hot_water":
        if heater["fuel"] not in dict(FUEL_CHOICES):
            errors["heater_fuel"] = "choose the water heater's fuel"
        for key in ("efficiency", "price"):
            if heater[key] is None:
                errors.setdefault(f"heater_{key}", "required for domestic hot water")
        values["water_heater"] = heater
    else:
        values["water_heater"] = None
    return (None if errors else values), errors
