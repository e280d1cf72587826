"""The House page's settings sections: climate, systems, air leakage, economics.

Each section is a small form whose typed text is kept on error; the parsed values are checked by
the same pydantic models the house calculation uses (server/documents/house.py), then stored on
the house's JSON columns.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from pydantic import BaseModel, ValidationError

from server.documents.common import UnitSpan
from server.documents.house import (
    DEGREE_DAYS,
    VOLUME,
    AirLeakageIn,
    ClimateIn,
    CoolingIn,
    EconomicsIn,
    HeatingIn,
)
from server.errors import field_path
from server.physics.fuels import FUELS
from server.services.house_sections import SECTION_COLUMNS
from server.services.number_text import NumberTextError, read_decimal, read_integer


@dataclass(frozen=True)
class Field_:
    key: str  # dotted path inside the section's document, e.g. "loan.apr"
    label: str
    unit_ip: str = ""
    unit_si: str = ""
    percent: bool = False  # shown and typed as %, stored as a fraction
    integer: bool = False
    optional: bool = False
    choices: tuple[tuple[str, str], ...] = ()

    def unit(self, units: str) -> str:
        return "%" if self.percent else (self.unit_ip if units == "ip" else self.unit_si)


FUEL_CHOICES = tuple((slug, f"{fuel.label} (per {fuel.unit})") for slug, fuel in FUELS.items())

SECTIONS: dict[str, tuple[str, type[BaseModel], tuple[Field_, ...]]] = {
    "climate": ("Climate", ClimateIn, (
        Field_("hdd", "Heating degree-days", "°F·day", "K·day"),
        Field_("cdd", "Cooling degree-days", "°F·day", "K·day", optional=True),
        Field_("heating_base", "Heating base", "°F", "°C", optional=True),
        Field_("cooling_base", "Cooling base", "°F", "°C", optional=True),
    )),
    "heating": ("Heating system", HeatingIn, (
        Field_("fuel", "Fuel", choices=FUEL_CHOICES),
        Field_("efficiency", "Seasonal efficiency (AFUE) or COP", "fraction or COP", "fraction or COP"),
        Field_("price", "Price per fuel unit", "$", "per unit"),
    )),
    "cooling": ("Cooling", CoolingIn, (
        Field_("seer", "SEER", "Btu/Wh", "Btu/Wh", optional=True),
        Field_("cop", "or seasonal COP", "", "", optional=True),
        Field_("electricity_price", "Electricity price", "$/kWh", "per kWh"),
    )),
    "air_leakage": ("Air leakage", AirLeakageIn, (
        Field_("cfm50", "Blower door CFM50", "ft³/min", "ft³/min", optional=True),
        Field_("n50", "or ACH50", "1/h", "1/h", optional=True),
        Field_("volume", "Conditioned volume", "ft³", "m³"),
    )),
    "economics": ("Money", EconomicsIn, (
        Field_("discount_rate", "Discount rate", percent=True),
        Field_("fuel_escalation", "Fuel price escalation", percent=True),
        Field_("years", "Study period", "years", "years", integer=True),
        Field_("loan.apr", "Loan APR", percent=True, optional=True),
        Field_("loan.years", "Loan term", "years", "years", integer=True, optional=True),
    )),
}  # fmt: skip
COLUMNS = SECTION_COLUMNS  # the House column each section is stored in


def _get(doc: dict[str, Any] | None, path: str) -> Any:
    value: Any = doc or {}
    for part in path.split("."):
        value = value.get(part) if isinstance(value, dict) else None
    return value


def _set(doc: dict[str, Any], path: str, value: Any) -> None:
    parts = path.split(".")
    for part in parts[:-1]:
        doc = doc.setdefault(part, {})
    doc[parts[-1]] = value


#: fields whose bounds depend on the unit system (server/documents/house.py)
UNIT_SPANS: dict[str, UnitSpan] = {"hdd": DEGREE_DAYS, "cdd": DEGREE_DAYS, "volume": VOLUME}


def _shown(value: float, key: str, units: str | None) -> str:
    """Ten significant digits, or every digit when rounding would carry a value at its bound
    (1 ft³ switched to m³) outside it, so the form takes back what it shows."""
    text = f"{value:.10g}"
    span = UNIT_SPANS.get(key)
    if span is not None and units is not None:
        try:
            span.check(float(text), units)
        except ValueError:
            return repr(value)
    return text


def form_values(
    section: str, stored: dict[str, Any] | None, units: str | None = None
) -> dict[str, str]:
    """Stored document -> text shown in the section's inputs."""
    out: dict[str, str] = {}
    for f in SECTIONS[section][2]:
        value = _get(stored, f.key)
        if value is None:
            out[f.key] = ""
        elif f.percent:
            out[f.key] = f"{value * 100:.6g}"
        elif isinstance(value, float):
            out[f.key] = _shown(value, f.key, units)
        else:
            out[f.key] = str(value)
    return out


def parse_section(
    section: str, data: dict[str, str], *, units: str = "ip"
) -> tuple[dict[str, Any] | None, dict[str, str]]:
    """Posted text -> (validated document or None, {field key: message}).

    Numbers are read by :mod:`server.services.number_text` (a decimal comma only in a metric
    house); bounds that depend on the unit system are checked in ``units``."""
    _, model, fields = SECTIONS[section]
    doc: dict[str, Any] = {}
    errors: dict[str, str] = {}
    for f in fields:
        text = (data.get(f.key) or "").strip().rstrip("%").strip()
        if not text:
            if not f.optional:
                errors[f.key] = "required"
            continue
        if f.choices:
            if text not in dict(f.choices):
                errors[f.key] = "choose one of the list"
            else:
                _set(doc, f.key, text)
            continue
        try:
            if f.integer:
                _set(doc, f.key, read_integer(text))
                continue
            number = read_decimal(text, decimal_comma=units == "si")
        except NumberTextError as exc:
            errors[f.key] = str(exc)
            continue
        _set(doc, f.key, number / 100 if f.percent else number)
    if section == "economics" and "loan" in doc and len(doc["loan"]) == 1:
        missing = "loan.years" if "apr" in doc["loan"] else "loan.apr"
        errors.setdefault(missing, "give both the loan APR and its term, or neither")
    if errors:
        return None, errors
    try:
        validated = model.model_validate(doc, context={"units": units})
    except ValidationError as exc:
        for err in exc.errors():
            key = field_path(err.get("loc", ())).replace("[", ".").replace("]", "") or "form"
            errors[key] = str(err.get("msg", "")).removeprefix("Value error, ")
        return None, errors
    return validated.model_dump(exclude_none=True), errors
