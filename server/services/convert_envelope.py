"""Unit switching (ip <-> si) of a saved house's ground, buffer-space and window fields.

Companion of :mod:`server.services.convert`: a ground surface's ``ground`` object (ISO 13370
inputs: lengths in ft / m, wall and insulation thickness in inch / mm, soil conductivity, R),
the same object on an upgrade, and an upgrade's whole-unit ``u`` or ``r`` (a window's). The
buffer spaces are converted by :func:`server.services.spaces.convert_spaces`; SHGC,
orientation and tilt carry no unit.
"""

from __future__ import annotations

from typing import Any

from server.documents.common import Units
from server.services.convert_systems import convert_number

#: the ground object's fields and their quantity (server/documents/ground.py GroundIn)
GROUND_QUANTITIES = {
    "floor_area": "area",
    "exposed_perimeter": "length",
    "wall_thickness": "thickness",
    "soil_conductivity": "conductivity",
    "depth": "length",
    "floor_r": "r",
}
EDGE_QUANTITIES = {"width_or_depth": "length", "r": "r", "thickness": "thickness"}


def _fields(doc: dict[str, Any], quantities: dict[str, str], src: Units, dst: Units) -> dict:
    return {
        k: convert_number(v, quantities[k], src, dst) if k in quantities else v
        for k, v in doc.items()
    }


def ground_fields(ground: dict[str, Any], src: Units, dst: Units) -> dict[str, Any]:
    """A ``ground`` object (a surface's or an upgrade's) in ``dst`` units."""
    out = _fields(ground, GROUND_QUANTITIES, src, dst)
    if isinstance(out.get("edge_insulation"), dict):
        out["edge_insulation"] = _fields(out["edge_insulation"], EDGE_QUANTITIES, src, dst)
    return out


def upgrade_envelope_fields(document: dict[str, Any], src: Units, dst: Units) -> dict[str, Any]:
    """An upgrade's whole-unit ``u`` / ``r`` and its ``ground`` object in ``dst`` units."""
    out = _fields(document, {"u": "u", "r": "r"}, src, dst)
    if isinstance(out.get("ground"), dict):
        out["ground"] = ground_fields(out["ground"], src, dst)
    return out


def surface_details_fields(details: dict[str, Any], src: Units, dst: Units) -> dict[str, Any]:
    """A surface's stored details with its ``ground`` object in ``dst`` units."""
    out = dict(details)
    if isinstance(out.get("ground"), dict):
        out["ground"] = ground_fields(out["ground"], src, dst)
    return out
