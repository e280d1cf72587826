"""The House page's systems section (templates/partials/house_systems.html).

Its figures come from :func:`server.services.comparison.compute_house` on the saved house's
document (:func:`server.services.house_document.house_document`): the same code as the JSON
API's calc/house.
"""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

from server.documents.house import HouseResult
from server.errors import InputError
from server.models import House
from server.services.catalog import Catalog
from server.services.comparison import OVERSIZED_RATIO, compute_house
from server.services.house_document import house_document
from server.services.system_sections import resnet_default
from server.web.pages.house_run import HouseRun, house_run
from server.web.systems_forms import CARDS, card_values, choices_for, location_choices

#: the start of the sentence compute_house adds to a package that oversizes the equipment
OVERSIZED_WORDS = "after this package the heating equipment's output"


def _result(
    house: House, catalog: Catalog | None, run: HouseRun | None
) -> tuple[HouseResult | None, str]:
    """The page's one run (``run``, else computed here), or None with what to do."""
    if not any(s.kind != "pipe_run" for s in house.surfaces):
        return None, "Add the envelope's surfaces (below) to see the design heat loss."
    if run is None and catalog is not None:
        run = house_run(house=house, catalog=catalog)
    if run is None:
        try:
            return compute_house(house_document(house), catalog=catalog, upgrades_alone=False), ""
        except InputError as exc:
            return None, f"The house cannot be computed yet: {exc.message} ({exc.field})."
    if run.result is None:
        return None, f"The house cannot be computed yet: {run.error}."
    if not run.with_packages:
        return run.result, f"As found only: the saved packages cannot be computed ({run.error})."
    return run.result, ""


def _design(house: House, result: HouseResult | None) -> dict[str, Any]:
    """The design load as found and per package, the capacity and what to do when missing."""
    climate, heating = house.climate or {}, house.heating or {}
    stored = climate.get("weather")
    weather: dict[str, Any] = stored if isinstance(stored, dict) else {}
    t_unit = "°F" if house.units == "ip" else "°C"
    out: dict[str, Any] = {"capacity": heating.get("output_capacity"), "margin": OVERSIZED_RATIO,
                           "missing": "", "rows": [], "as_found": None, "ratio": None,
                           "source": ""}  # fmt: skip
    typed = climate.get("heating_design_temperature")
    offered = weather.get("heating_design_temperature")
    if typed is None and offered is not None:
        out["source"] = (f"Outdoor design temperature {offered:.1f} {t_unit}: the weather file's "
                         "99 % figure (type another in the Design load card to replace it).")  # fmt: skip
    elif typed is not None:
        out["source"] = f"Outdoor design temperature {typed:g} {t_unit}, as typed."
    if result is None or result.as_found.design_heat_loss is None:
        out["missing"] = (
            "Give the 99 % outdoor design temperature in the Design load card below, or read a "
            "weather file above (its 99 % figure is then used), to see the design heat loss."
        )
    if result is None:
        return out
    out["as_found"] = result.as_found.design_heat_loss
    out["ratio"] = result.as_found.capacity_ratio
    out["ducts_loss"] = (
        None if result.as_found.distribution is None else result.as_found.distribution.design_loss
    )
    for package in result.packages:
        sentence = next((w for w in package.warnings if w.startswith(OVERSIZED_WORDS)), "")
        out["rows"].append({"name": package.name or package.id, "loss": package.design_heat_loss,
                            "ratio": package.capacity_ratio, "oversized": sentence})  # fmt: skip
    return out


def _notes(house: House, result: HouseResult | None) -> dict[str, str]:
    """A sentence under each card: what the calculation made of it."""
    notes: dict[str, str] = {}
    heating = house.heating or {}
    ip = house.units == "ip"
    power, ua = ("Btu/h", "Btu/(h·°F)") if ip else ("W", "W/K")
    if heating.get("fuel") == "heat_pump":
        notes["heat_pump"] = (
            "With these ratings and a weather file, the heat pump's energy is computed bin by "
            "bin; until they are given, the seasonal COP typed in the Heating system card is used."
        )
    else:
        notes["heat_pump"] = "For a heat pump: set the Heating system's fuel to heat pump first."
    default = resnet_default(house)
    notes["house"] = (
        f"Published default internal gains: {default[0]:,.0f} {power}, {default[1]}. Leave "
        "the internal gains blank to use it; they set the balance point when the weather file "
        "gives degree-days by base."
        if default is not None
        else "With the floor area and bedrooms, the internal gains default to the ANSI/RESNET/"
        "ICC 301 figure (17,900 + 23.8 × ft² + 4,104 × bedrooms Btu/day, from memory)."
    )
    notes["n_factor"] = "The LBL table by climate zone, stories and shielding (values from memory)."
    if result is None:
        return notes
    found = result.as_found
    dist = found.distribution
    if dist is not None:
        design = (
            ""
            if dist.design_loss is None
            else (f"; at design the ducts lose {dist.design_loss:,.0f} {power}")
        )
        notes["ducts"] = (f"Seasonal distribution efficiency {dist.efficiency:.0%} (ASHRAE "
                          f"Standard 152){design}.")  # fmt: skip
    pump = found.heat_pump
    if pump is not None:
        notes["heat_pump"] = (
            f"Seasonal COP {pump.seasonal_cop:.2f} over the weather file's temperature bins, "
            f"{pump.backup_share:.0%} of the heat from the backup ({pump.curves})."
            if pump.bins_used and pump.seasonal_cop is not None
            else "No weather file: the heat pump falls back to the seasonal COP typed in the "
            "Heating system card. Read a weather file above to compute it bin by bin."
        )
    if found.ua_ventilation:
        notes["ventilation"] = f"Adds {found.ua_ventilation:,.1f} {ua} to the house's heat loss."
    if found.n_factor is not None:
        notes["n_factor"] = f"N-factor used: {found.n_factor:.1f} ({found.n_factor_source})."
    return notes


def _placeholders(house: House, result: HouseResult | None) -> dict[str, str]:
    """What a blank input stands for (shown greyed in it), by ``card.field``."""
    ip = house.units == "ip"
    weather = (house.climate or {}).get("weather")
    offered = weather.get("heating_design_temperature") if isinstance(weather, dict) else None
    hints = {"design.indoor_design_temperature": "blank: 70" if ip else "blank: 21",
             "n_factor.stories": "e.g. 1.5"}  # fmt: skip
    if offered is not None:
        hints["design.heating_design_temperature"] = f"blank: {offered:.1f} (weather file)"
    if result is not None and result.as_found.distribution is None:
        hints["ducts.air_flow"] = "blank: from the output"
    default = resnet_default(house)
    if default is not None:
        hints["house.internal_gains"] = f"blank: {default[0]:,.0f} (default)"
    return hints


def systems_context(
    *,
    house: House,
    catalog: Catalog | None,
    card: str = "",
    typed: Mapping[str, str] | None = None,
    errors: Mapping[str, str] | None = None,
    message: str = "",
    run: HouseRun | None = None,
) -> dict[str, Any]:
    """Each systems card with its values (for ``card`` what was typed and its ``errors``),
    the design load as found and per package, and a sentence of figures under each card.

    ``run``: the House page's one calculation (computed here when not given, for a card's
    htmx answer)."""
    locations = location_choices(house)
    result, reason = _result(house, catalog, run)
    notes = _notes(house, result)
    hints = _placeholders(house, result)
    cards = []
    for key, (title, fields) in CARDS.items():
        values = typed if (key == card and typed is not None) else card_values(house, key)
        cards.append({
            "key": key, "title": title, "values": values, "note": notes.get(key, ""),
            "errors": (errors or {}) if key == card else {},
            "fields": [{"key": f.key, "label": f.label, "unit": f.unit(house.units),
                        "optional": f.optional, "choices": choices_for(f, locations),
                        "placeholder": hints.get(f"{key}.{f.key}", "")}
                       for f in fields],
            "collapsed": key == "heat_pump" and (house.heating or {}).get("fuel") != "heat_pump"
            and not (house.heating or {}).get("heat_pump") and key != card,
        })  # fmt: skip
    return {"sys_cards": cards, "sys_message": message, "sys_card": card, "sys_design": _design(house, result),
            "sys_reason": reason, "sys_warnings": [] if result is None else result.warnings}  # fmt: skip
