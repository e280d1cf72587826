"""Unit switch of a saved house's gains fields: the sun's table, typed internal gains."""

from __future__ import annotations

from typing import Any

from server.documents.common import Units
from server.physics.units import BTU_PER_HOUR_W, c_to_f, f_to_c
from server.services.gains import irradiation_from_si, irradiation_to_si

IRRADIATION_KEYS = ("beam_horizontal", "diffuse_horizontal", "global_horizontal")


def _temp(value: float, src: Units, dst: Units) -> float:
    return value if src == dst else (f_to_c(value) if src == "ip" else c_to_f(value))


def _irradiation(value: float, src: Units, dst: Units) -> float:
    return irradiation_from_si(irradiation_to_si(value, src), dst)


def convert_solar(solar: dict[str, Any], src: Units, dst: Units) -> dict[str, Any]:
    """``climate.solar`` (bases °F/°C, irradiation Btu/ft² / kWh/m²) from src to dst units."""
    out = dict(solar)
    if src == dst:
        return out
    rows = []
    for row in out.get("table", []):
        new = dict(row)
        new["base"] = _temp(row["base"], src, dst)
        for key in IRRADIATION_KEYS:
            new[key] = _irradiation(row[key], src, dst)
        new["beam_vertical"] = [_irradiation(v, src, dst) for v in row["beam_vertical"]]
        rows.append(new)
    out["table"] = rows
    return out


def climate_gains_fields(climate: dict[str, Any], src: Units, dst: Units) -> dict[str, Any]:
    """The climate's ``solar``, ``weather.solar`` and ``gains.internal_gains`` converted."""
    out = dict(climate)
    if src == dst:
        return out
    if isinstance(out.get("solar"), dict):
        out["solar"] = convert_solar(out["solar"], src, dst)
    weather = out.get("weather")
    if isinstance(weather, dict) and isinstance(weather.get("solar"), dict):
        out["weather"] = {**weather, "solar": convert_solar(weather["solar"], src, dst)}
    gains = out.get("gains")
    if isinstance(gains, dict) and gains.get("internal_gains") is not None:
        factor = BTU_PER_HOUR_W if src == "ip" else 1 / BTU_PER_HOUR_W
        out["gains"] = {**gains, "internal_gains": gains["internal_gains"] * factor}
    return out
