"""Ground-contact service: request units -> SI physics (:mod:`server.physics.ground`) -> units.

The one code path for ``POST /api/v1/calc/ground`` and for the ground surfaces of a house
document (``slab``, ``basement_floor``, ``basement_wall`` with a ``ground`` object), so the
calculator, the saved houses and their upgrades give the same U. Physics errors
(``ValueError``) come back as :class:`server.errors.InputError` naming the request field.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

from server.documents.common import Units
from server.documents.ground import EdgeInsulationIn, GroundIn, GroundRequest, GroundResult
from server.errors import InputError
from server.physics import ground as physics
from server.physics.units import R_LENGTH_IP_IN_SI, from_si, to_si

_MM_M = 1e-3  # the API's SI thickness is in mm; physics takes m
#: 1 mph in m/s (exact: 1609.344 m / 3600 s; NIST SP 811 appendix B)
MPH_M_S = 0.44704
#: 1 Btu/(h·ft·°F) (linear thermal transmittance) in W/(m·K)
PSI_IP_IN_SI = 1.0 / R_LENGTH_IP_IN_SI
#: a soil_conductivity within this share of the named category's λ agrees with it
SOIL_TOLERANCE = 0.01

#: physics parameter -> request field
_FIELDS = {
    "area_m2": "floor_area",
    "exposed_perimeter_m": "exposed_perimeter",
    "wall_thickness_m": "wall_thickness",
    "conductivity_w_mk": "soil_conductivity",
    "floor_r_m2k_w": "floor_r",
    "depth_m": "depth",
    "wall_r_m2k_w": "wall_r",
    "extent_m": "edge_insulation.width_or_depth",
    "insulation_r_m2k_w": "edge_insulation.r",
    "insulation_thickness_m": "edge_insulation.thickness",
    "orientation": "edge_insulation.orientation",
    "height_above_grade_m": "height_above_grade",
    "underfloor_wall_u_w_m2k": "underfloor_wall_u",
    "vent_area_per_perimeter_m": "vent_area_per_perimeter",
    "wind_speed_m_s": "wind_speed",
    "shielding_factor": "shielding",
    "ground_r_m2k_w": "ground_r",
}


def _input_error(
    error: ValueError, prefix: str = "", renamed: dict[str, str] | None = None
) -> InputError:
    parameter = getattr(error, "parameter", None)
    name = _FIELDS.get(parameter or "")
    if name is None:
        return InputError(prefix.rstrip(".") or "body", str(error))
    if renamed and name in renamed:
        return InputError(renamed[name], str(error))
    return InputError(prefix + name, str(error))


def _length_m(value: float, units: Units) -> float:
    return to_si(value, "length", units)


def _thickness_m(value: float, units: Units) -> float:
    return to_si(value, "thickness", units) * _MM_M


def soil_conductivity_si(
    soil: str | None, conductivity: float | None, units: Units, prefix: str = ""
) -> float:
    """λ [W/(m·K)] from ``soil`` and/or ``soil_conductivity`` (request units); 422 if they
    disagree. Neither given: sand or gravel, 2.0 W/(m·K)."""
    given = None if conductivity is None else to_si(conductivity, "conductivity", units)
    if soil is None:
        return physics.DEFAULT_SOIL_CONDUCTIVITY_W_MK if given is None else given
    table = physics.SOIL_CONDUCTIVITY_W_MK[soil]
    if given is not None and abs(given - table) > SOIL_TOLERANCE * table:
        unit = "Btu·in/(h·ft²·°F)" if units == "ip" else "W/(m·K)"
        raise InputError(
            f"{prefix}soil_conductivity",
            f"soil '{soil}' means λ = {from_si(table, 'conductivity', units):.4g} {unit} (ISO "
            f"13370 soil categories); give soil or soil_conductivity, or make them agree",
        )
    return table


def _edge(edge: EdgeInsulationIn, units: Units) -> physics.EdgeInsulation:
    return physics.EdgeInsulation(
        orientation=edge.orientation,
        extent_m=_length_m(edge.width_or_depth, units),
        r_m2k_w=to_si(edge.r, "r", units),
        thickness_m=_thickness_m(edge.thickness, units),
    )


def _shielding(value: str | float | None) -> tuple[float, str | None]:
    if value is None:
        return physics.SHIELDING_FACTOR["average"], (
            "shielding not given: average (suburban, f_w = 0.05) assumed"
        )
    if isinstance(value, str):
        return physics.SHIELDING_FACTOR[value], None
    return float(value), None


_ONLY = {
    "depth": "heated_basement",
    "wall_r": "heated_basement",
    "edge_insulation": "slab",
    "height_above_grade": "suspended_floor",
    "underfloor_wall_u": "suspended_floor",
    "vent_area_per_perimeter": "suspended_floor",
    "wind_speed": "suspended_floor",
    "shielding": "suspended_floor",
    "ground_r": "suspended_floor",
}
_NEEDED = {
    "slab": (),
    "heated_basement": ("depth", "wall_r"),
    "suspended_floor": (
        "height_above_grade",
        "underfloor_wall_u",
        "vent_area_per_perimeter",
        "wind_speed",
    ),
}


def compute_ground(request: GroundRequest) -> GroundResult:
    """Floor (and basement-wall) U and H_g by ISO 13370, in the request's units."""
    units = request.units
    kind = request.type
    warnings: list[str] = []
    for name, belongs in _ONLY.items():
        if belongs != kind and getattr(request, name) is not None:
            warnings.append(f"{name} is used only for a {belongs}; ignored for a {kind}")
    for name in _NEEDED[kind]:
        if getattr(request, name) is None:
            raise InputError(name, f"is required for a {kind}")
    if request.floor_r is None:
        warnings.append("floor_r not given: 0 assumed (an uninsulated floor)")
    lam = soil_conductivity_si(request.soil, request.soil_conductivity, units)
    area = to_si(request.floor_area, "area", units)
    perimeter = _length_m(request.exposed_perimeter, units)
    w = _thickness_m(request.wall_thickness, units)
    floor_r = to_si(request.floor_r or 0.0, "r", units)

    def length(value_m: float) -> float:
        return from_si(value_m, "length", units)

    def u_out(value: float) -> float:
        return from_si(value, "u", units)

    common: dict[str, Any] = {
        "units": units,
        "type": kind,
        "soil_conductivity": from_si(lam, "conductivity", units),
        "warnings": warnings,
    }
    try:
        if kind == "slab":
            edge = (
                None if request.edge_insulation is None else _edge(request.edge_insulation, units)
            )
            slab = physics.slab_on_ground(area, perimeter, w, lam, floor_r, edge)
            return GroundResult(
                **common,
                characteristic_dimension=length(slab.characteristic_m),
                floor_equivalent_thickness=length(slab.floor_thickness_m),
                u_floor=u_out(slab.u),
                u_overall=u_out(slab.u),
                heat_transfer_coefficient=from_si(slab.heat_transfer_w_k, "ua", units),
                floor_branch=slab.branch.replace("d ", "d_t "),
                u_floor_without_edge_insulation=u_out(slab.u_without_edge),
                edge_psi=None
                if slab.edge_psi_w_mk is None
                else (slab.edge_psi_w_mk if units == "si" else slab.edge_psi_w_mk / PSI_IP_IN_SI),
            )
        if kind == "heated_basement":
            assert request.depth is not None and request.wall_r is not None  # checked above
            base = physics.heated_basement(
                area,
                perimeter,
                w,
                lam,
                floor_r,
                _length_m(request.depth, units),
                to_si(request.wall_r, "r", units),
            )
            if request.depth == 0:
                warnings.append("depth 0: no wall below grade; the floor is a slab on ground")
            return GroundResult(
                **common,
                characteristic_dimension=length(base.characteristic_m),
                floor_equivalent_thickness=length(base.floor_thickness_m),
                u_floor=u_out(base.u_floor),
                wall_equivalent_thickness=length(base.wall_thickness_eq_m),
                u_wall=u_out(base.u_wall),
                u_overall=u_out(base.u_overall),
                heat_transfer_coefficient=from_si(base.heat_transfer_w_k, "ua", units),
                floor_branch=base.floor_branch,
                wall_branch=base.wall_branch,
                wall_area=from_si(base.wall_area_m2, "area", units),
            )
        factor, note = _shielding(request.shielding)
        if note:
            warnings.append(note)
        speed = request.wind_speed or 0.0
        floor = physics.suspended_floor(
            area,
            perimeter,
            w,
            lam,
            floor_r,
            height_above_grade_m=_length_m(request.height_above_grade or 0.0, units),
            underfloor_wall_u_w_m2k=to_si(request.underfloor_wall_u or 0.0, "u", units),
            vent_area_per_perimeter_m=_length_m(request.vent_area_per_perimeter or 0.0, units),
            wind_speed_m_s=speed if units == "si" else speed * MPH_M_S,
            shielding_factor=factor,
            ground_r_m2k_w=to_si(request.ground_r or 0.0, "r", units),
        )
    except ValueError as error:
        raise _input_error(error) from None
    return GroundResult(
        **common,
        characteristic_dimension=length(floor.characteristic_m),
        floor_equivalent_thickness=length(floor.ground_thickness_m),
        u_floor=u_out(floor.u),
        u_overall=u_out(floor.u),
        heat_transfer_coefficient=from_si(floor.heat_transfer_w_k, "ua", units),
        u_deck=u_out(floor.u_deck),
        u_underfloor_ground=u_out(floor.u_ground),
        u_ventilation=u_out(floor.u_ventilation),
        shielding_factor=factor,
    )


# --- ground surfaces of a house document ---------------------------------------------------

GROUND_KINDS = ("slab", "basement_floor", "basement_wall")


@dataclass(frozen=True)
class GroundSurface:
    """A house surface against the ground, SI: the U its UA uses and how it was found.

    ``u_si`` [W/(m²·K)] is the U over the surface's own ``area`` (UA / area), so the house
    model's ``U × A`` is the ground UA; ``u_ground_si`` is U, U_bf or U_bw itself.
    """

    u_si: float
    u_ground_si: float
    below_grade_area_m2: float | None
    warnings: list[str] = field(default_factory=list)


def merge_ground(base: GroundIn | None, change: GroundIn | None) -> GroundIn | None:
    """An upgrade's ``ground``: the fields it gives (not null) replace the surface's."""
    if change is None:
        return base
    if base is None:
        return change
    merged = base.model_dump(exclude_none=True)
    merged.update(change.model_dump(exclude_none=True))
    return GroundIn.model_validate(merged)


def construction_r_from_total(total_r_si: float, kind: str) -> float:
    """R_f / R_w [m²·K/W] from a whole-construction R [m²·K/W] that includes surface films:
    minus ISO 13370's own R_si (0.17 floor, 0.13 wall) and R_se (0.04). ValueError below 0."""
    films = (physics.R_SI_WALL if kind == "basement_wall" else physics.R_SI_FLOOR) + physics.R_SE
    if total_r_si < films - 1e-12:
        raise ValueError(
            f"is below the surface resistances alone ({films:.2f} m²·K/W): give the "
            "construction's R with films included, or its assembly"
        )
    return max(total_r_si - films, 0.0)


def ground_surface(
    *,
    kind: str,
    area_m2: float,
    ground: GroundIn,
    construction_r_si: float,
    air_u_si: float,
    units: Units,
    path: str,
    construction_field: str,
) -> GroundSurface:
    """U of a slab, basement floor or basement wall of a house, by ISO 13370.

    ``construction_r_si`` is the surface's own R_f or R_w, films excluded [m²·K/W];
    ``air_u_si`` its air-to-air U [W/(m²·K)], used for a basement wall's part above grade.
    Raises :class:`InputError` naming ``{path}.<field>`` (``construction_field`` for R).
    """
    prefix = f"{path}."
    warnings: list[str] = []
    needed = ["exposed_perimeter", "wall_thickness"]
    if kind != "slab":
        needed.append("depth")
    for name in needed:
        if getattr(ground, name) is None:
            raise InputError(f"{prefix}{name}", f"is required for a {kind} against the ground")
    if kind != "basement_wall" and ground.floor_r is not None:
        raise InputError(
            f"{prefix}floor_r",
            f"a {kind}'s R_f comes from its own assembly; floor_r is for a basement_wall (the "
            "floor of its basement)",
        )
    if kind != "slab" and ground.edge_insulation is not None:
        warnings.append("edge_insulation is used only for a slab; ignored")
    if kind == "slab" and ground.depth is not None:
        warnings.append("depth is not used for a slab; ignored")
    if kind == "basement_wall" and ground.floor_area is not None:
        warnings.append("floor_area is not used for a basement wall (U_bw does not need B')")
    lam = soil_conductivity_si(ground.soil, ground.soil_conductivity, units, prefix)
    assert ground.exposed_perimeter is not None and ground.wall_thickness is not None
    perimeter = _length_m(ground.exposed_perimeter, units)
    w = _thickness_m(ground.wall_thickness, units)
    floor_area = area_m2 if ground.floor_area is None else to_si(ground.floor_area, "area", units)
    renamed = {
        "floor_r": construction_field if kind != "basement_wall" else f"{prefix}floor_r",
        "wall_r": construction_field,
    }
    try:
        if kind == "slab":
            edge = None if ground.edge_insulation is None else _edge(ground.edge_insulation, units)
            slab = physics.slab_on_ground(floor_area, perimeter, w, lam, construction_r_si, edge)
            return GroundSurface(slab.u, slab.u, None, warnings)
        assert ground.depth is not None
        depth = _length_m(ground.depth, units)
        if kind == "basement_floor":
            b = physics.characteristic_dimension(floor_area, perimeter)
            d_t = physics.floor_equivalent_thickness(w, lam, construction_r_si)
            u_bf = physics.floor_u(b, d_t + 0.5 * depth, lam)
            return GroundSurface(u_bf, u_bf, None, warnings)
        if ground.floor_r is None:
            warnings.append("ground.floor_r not given: the basement floor taken as uninsulated")
        floor_r = to_si(ground.floor_r or 0.0, "r", units)
        d_t = physics.floor_equivalent_thickness(w, lam, floor_r)
        d_w = physics.wall_equivalent_thickness(lam, construction_r_si)
        u_bw = physics.basement_wall_u(lam, depth, d_t, d_w)
    except ValueError as error:
        raise _input_error(error, prefix, renamed) from None
    below = depth * perimeter
    if area_m2 < below * (1 - SOIL_TOLERANCE):
        unit = "ft²" if units == "ip" else "m²"
        warnings.append(
            f"area {from_si(area_m2, 'area', units):.4g} {unit} is less than the below-grade "
            f"area depth × exposed_perimeter = {from_si(below, 'area', units):.4g} {unit}; the "
            "wall's UA counts the below-grade area at U_bw"
        )
        ua = below * u_bw
    else:
        ua = below * u_bw + max(area_m2 - below, 0.0) * air_u_si
    return GroundSurface(ua / area_m2, u_bw, below, warnings)
