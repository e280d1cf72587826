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
