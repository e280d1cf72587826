"""Convert stored assembly documents between unit systems (ip <-> si), field by field."""

from __future__ import annotations

from typing import Any

from server.documents.common import Units
from server.physics.units import from_si, to_si

#: (path inside a layer, quantity name in server.physics.units.IP_TO_SI)
_LAYER_FIELDS: tuple[tuple[tuple[str, ...], str], ...] = (
    (("r",), "r"),
    (("thickness",), "thickness"),
    (("conductivity",), "conductivity"),
    (("cavity", "r"), "r"),
    (("cavity", "conductivity"), "conductivity"),
    (("cavity", "batt", "r_nominal"), "r"),
    (("cavity", "batt", "thickness_nominal"), "thickness"),
    (("framing", "conductivity"), "conductivity"),
    (("framing", "spacing"), "thickness"),
)


def convert_value(value: float, quantity: str, src: Units, dst: Units) -> float:
    if src == dst:
        return value
    return from_si(to_si(value, quantity, src), quantity, dst)


def convert_layer(layer: dict[str, Any], src: Units, dst: Units) -> dict[str, Any]:
    """A copy of one layer dict with every dimensional number converted from src to dst."""
    out: dict[str, Any] = {k: (dict(v) if isinstance(v, dict) else v) for k, v in layer.items()}
    if isinstance(out.get("cavity"), dict) and isinstance(out["cavity"].get("batt"), dict):
        out["cavity"]["batt"] = dict(out["cavity"]["batt"])
    if src == dst:
        return out
    for path, quantity in _LAYER_FIELDS:
        holder: Any = out
        for key in path[:-1]:
            holder = holder.get(key) if isinstance(holder, dict) else None
        if isinstance(holder, dict) and isinstance(holder.get(path[-1]), int | float):
            holder[path[-1]] = convert_value(float(holder[path[-1]]), quantity, src, dst)
    return out


def convert_assembly(doc: dict[str, Any], src: Units, dst: Units) -> dict[str, Any]:
    """A copy of an AssemblyInput dict in ``dst`` units."""
    out = dict(doc)
    out["layers"] = [convert_layer(layer, src, dst) for layer in doc.get("layers", [])]
    return out


def _temp(value: float | None, src: Units, dst: Units) -> float | None:
    from server.physics.units import temp_from_c, temp_to_c

    return None if value is None else temp_from_c(temp_to_c(value, src), dst)


def convert_pipe(pipe: dict[str, Any], src: Units, dst: Units) -> dict[str, Any]:
    """A pipe spec (as /calc/pipe without units) in ``dst`` units."""
    out = dict(pipe)
    if src == dst:
        return out
    if "pipe_outer_diameter" in out:
        out["pipe_outer_diameter"] = convert_value(out["pipe_outer_diameter"], "diameter", src, dst)
    out["layers"] = [convert_pipe_layer(layer, src, dst) for layer in out.get("layers", [])]
    for key in ("fluid_temperature", "ambient_temperature"):
        if out.get(key) is not None:
            out[key] = _temp(out[key], src, dst)
    if out.get("surface_coefficient") is not None:
        out["surface_coefficient"] = convert_value(out["surface_coefficient"], "h", src, dst)
    return out


def convert_pipe_layer(layer: dict[str, Any], src: Units, dst: Units) -> dict[str, Any]:
    out = dict(layer)
    out["thickness"] = convert_value(out["thickness"], "thickness", src, dst)
    out["conductivity"] = convert_value(out["conductivity"], "conductivity", src, dst)
    return out


def convert_cost(cost: dict[str, Any], src: Units, dst: Units) -> dict[str, Any]:
    """Money per ft² / per ft becomes money per m² / per m (and back): divide by the factor."""
    out = dict(cost)
    if src == dst:
        return out
    if out.get("per_area"):
        out["per_area"] = out["per_area"] / convert_value(1.0, "area", src, dst)
    if out.get("per_length"):
        out["per_length"] = out["per_length"] / convert_value(1.0, "length", src, dst)
    return out


def convert_upgrade(document: dict[str, Any], src: Units, dst: Units) -> dict[str, Any]:
    """An upgrade document (API.md shape) in ``dst`` units. CFM50 stays in ft³/min."""
    out = dict(document)
    if out.get("assembly"):
        out["assembly"] = convert_assembly(out["assembly"], src, dst)
    if out.get("pipe_layers"):
        out["pipe_layers"] = [convert_pipe_layer(layer, src, dst) for layer in out["pipe_layers"]]
    if out.get("cost"):
        out["cost"] = convert_cost(out["cost"], src, dst)
    from server.services.convert_envelope import upgrade_envelope_fields
    from server.services.convert_systems import upgrade_fields

    return upgrade_envelope_fields(upgrade_fields(out, src, dst), src, dst)


def _degree_day_row(row: dict[str, Any], src: Units, dst: Units) -> dict[str, Any]:
    """One row of a degree-days-by-base table: base temperature, HDD, CDD."""
    return {
        "base": _temp(row["base"], src, dst),
        "hdd": convert_value(row["hdd"], "degree_days", src, dst),
        "cdd": convert_value(row.get("cdd", 0.0), "degree_days", src, dst),
    }


def convert_climate(climate: dict[str, Any], src: Units, dst: Units) -> dict[str, Any]:
    """Degree-days, bases, the balance-point table and the weather file's temperatures."""
    out = dict(climate)
    if src == dst:
        return out
    for key in ("hdd", "cdd"):
        if out.get(key) is not None:
            out[key] = convert_value(out[key], "degree_days", src, dst)
    for key in ("heating_base", "cooling_base"):
        if out.get(key) is not None:
            out[key] = _temp(out[key], src, dst)
    vb = out.get("variable_base")
    if vb:
        from server.physics.units import BTU_PER_HOUR_W

        gains_factor = BTU_PER_HOUR_W if src == "ip" else 1 / BTU_PER_HOUR_W
        out["variable_base"] = {
            **({"setpoint": _temp(vb["setpoint"], src, dst)} if vb.get("setpoint") is not None else {}),
            **({"internal_gains": vb["internal_gains"] * gains_factor}
               if vb.get("internal_gains") is not None else {}),
            "table": [_degree_day_row(row, src, dst) for row in vb["table"]],
        }  # fmt: skip
    weather = out.get("weather")
    if weather:
        weather = dict(weather)
        for key in ("heating_design_temperature", "cooling_design_temperature"):
            if weather.get(key) is not None:
                weather[key] = _temp(weather[key], src, dst)
        weather["degree_days_by_base"] = [
            _degree_day_row(row, src, dst) for row in weather.get("degree_days_by_base", [])
        ]
        out["weather"] = weather
    from server.services.convert_gains import climate_gains_fields
    from server.services.convert_systems import climate_fields

    return climate_fields(climate_gains_fields(out, src, dst), src, dst)
