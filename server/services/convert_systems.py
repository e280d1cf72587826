"""Unit switching (ip <-> si) of the systems fields of a saved house (issue 14).

Companion of :mod:`server.services.convert`: climate bins, elevation and temperatures, the
heating system's capacity, ducts and heat-pump rating, mechanical ventilation's air flow, and
duct-insulation upgrades' R. Air flows are ft³/min (ip) and L/s (si).
"""

from __future__ import annotations

from typing import Any

from server.documents.common import Units
from server.physics.energy import CFM_M3_PER_S
from server.physics.units import from_si, temp_from_c, temp_to_c, to_si

LITRE_PER_S_M3 = 1e-3


def convert_number(value: Any, quantity: str, src: Units, dst: Units) -> Any:
    """A stored number of ``quantity`` in ``dst`` units; anything else (None, text, a flag)
    comes back as it is."""
    if not isinstance(value, int | float) or isinstance(value, bool) or src == dst:
        return value
    return from_si(to_si(float(value), quantity, src), quantity, dst)


def _temp(value: Any, src: Units, dst: Units) -> Any:
    if not isinstance(value, int | float) or src == dst:
        return value
    return temp_from_c(temp_to_c(float(value), src), dst)


def _flow(value: Any, src: Units, dst: Units) -> Any:
    if not isinstance(value, int | float) or src == dst:
        return value
    m3_s = value * (CFM_M3_PER_S if src == "ip" else LITRE_PER_S_M3)
    return m3_s / (CFM_M3_PER_S if dst == "ip" else LITRE_PER_S_M3)


def climate_fields(climate: dict[str, Any], src: Units, dst: Units) -> dict[str, Any]:
    """Design, season and bin temperatures and the elevation of a stored climate."""
    out = dict(climate)
    if out.get("indoor_design_temperature") is None and src != dst:
        # the default differs by unit system (70 °F vs 21 °C): keep the one the figures used
        from server.services.house_design import INDOOR_DESIGN_C

        out["indoor_design_temperature"] = temp_from_c(INDOOR_DESIGN_C[src], src)
    for key in (
        "heating_design_temperature",
        "indoor_design_temperature",
        "heating_season_temperature",
    ):
        if key in out:
            out[key] = _temp(out[key], src, dst)
    if "elevation" in out:
        out["elevation"] = convert_number(out["elevation"], "length", src, dst)
    for holder in (out, out.get("weather") if isinstance(out.get("weather"), dict) else None):
        if holder is not None and isinstance(holder.get("temperature_bins"), list):
            holder["temperature_bins"] = [
                {**row, "temperature": _temp(row.get("temperature"), src, dst)}
                for row in holder["temperature_bins"]
            ]
    return out


def heating_fields(heating: dict[str, Any], src: Units, dst: Units) -> dict[str, Any]:
    """Output capacity, ducts and heat-pump rating of a stored heating system."""
    out = dict(heating)
    if "output_capacity" in out:
        out["output_capacity"] = convert_number(out["output_capacity"], "power", src, dst)
    ducts = out.get("ducts")
    if isinstance(ducts, dict):
        ducts = dict(ducts)
        for key in ("supply_r", "return_r"):
            ducts[key] = convert_number(ducts.get(key), "r", src, dst)
        for key in ("supply_area", "return_area"):
            ducts[key] = convert_number(ducts.get(key), "area", src, dst)
        if "air_flow" in ducts:
            ducts["air_flow"] = _flow(ducts["air_flow"], src, dst)
        if "temperature_rise" in ducts:
            ducts["temperature_rise"] = convert_number(
                ducts["temperature_rise"], "delta_t", src, dst
            )
        out["ducts"] = ducts
    rating = out.get("heat_pump")
    if isinstance(rating, dict):
        rating = dict(rating)
        for key in ("capacity_47", "capacity_17"):
            if key in rating:
                rating[key] = convert_number(rating[key], "power", src, dst)
        if "cutoff_temperature" in rating:
            rating["cutoff_temperature"] = _temp(rating["cutoff_temperature"], src, dst)
        out["heat_pump"] = rating
    return out


def ventilation_fields(ventilation: dict[str, Any], src: Units, dst: Units) -> dict[str, Any]:
    """Mechanical ventilation's air flow."""
    return {**ventilation, "air_flow": _flow(ventilation.get("air_flow"), src, dst)}


def upgrade_fields(document: dict[str, Any], src: Units, dst: Units) -> dict[str, Any]:
    """A duct-insulation upgrade's R after; a pipe upgrade's fields need nothing more."""
    out = dict(document)
    for key in ("supply_r_after", "return_r_after"):
        if key in out:
            out[key] = convert_number(out[key], "r", src, dst)
    return out
