"""A slab on ground, with or without edge insulation (ISO 13370 9.1 and Annex B) [1].

References
----------
[1] ISO 13370:2017 Thermal performance of buildings — Heat transfer via the ground —
    Calculation methods (clause and equation numbers of the 2007 edition, from memory; see
    :mod:`.ground`).
[2] ISO 6946:2017 Building components and building elements — Thermal resistance and thermal
    transmittance (surface resistances, Table 7).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from server.physics.ground_terms import (
    GroundInputError,
    Orientation,
    characteristic_dimension,
    check_non_negative,
    check_positive,
    floor_branch,
    floor_equivalent_thickness,
    floor_u,
)


def edge_insulation_psi(
    conductivity_w_mk: float,
    floor_thickness_m: float,
    orientation: Orientation,
    extent_m: float,
    insulation_r_m2k_w: float,
    insulation_thickness_m: float,
) -> float:
    """Linear thermal transmittance of slab edge insulation, [1] Annex B (Eq. B.4 to B.6).

    ``R' = R_n − d_n / λ`` (the resistance the insulation adds over the soil it displaces),
    ``d' = R' λ``;
    horizontal, width D: ``Ψ_ge = −(λ/π) [ln(D/d_t + 1) − ln(D/(d_t + d') + 1)]``;
    vertical, depth D below grade: ``Ψ_ge = −(λ/π) [ln(2D/d_t + 1) − ln(2D/(d_t + d') + 1)]``.

    Parameters
    ----------
    conductivity_w_mk : float
        λ of the ground [W/(m·K)].
    floor_thickness_m : float
        d_t of the floor [m].
    orientation : {"horizontal", "vertical"}
        Insulation laid flat round the edge, or standing down the foundation.
    extent_m : float
        D: width (horizontal) or depth below grade (vertical) [m].
    insulation_r_m2k_w : float
        R_n of the edge insulation (or foundation) [m²·K/W].
    insulation_thickness_m : float
        d_n, its thickness [m].

    Returns
    -------
    float
        Ψ_ge [W/(m·K)], negative when the insulation lowers the heat flow.
    """
    check_positive("conductivity_w_mk", conductivity_w_mk)
    check_positive("floor_thickness_m", floor_thickness_m)
    check_positive("extent_m", extent_m)
    check_positive("insulation_r_m2k_w", insulation_r_m2k_w)
    check_non_negative("insulation_thickness_m", insulation_thickness_m)
    lam, d_t = conductivity_w_mk, floor_thickness_m
    r_added = insulation_r_m2k_w - insulation_thickness_m / lam
    if r_added <= 0:
        raise GroundInputError(
            "insulation_r_m2k_w",
            "must be more than the insulation's thickness divided by the soil conductivity "
            f"({insulation_thickness_m / lam:.3g} m²·K/W): otherwise it insulates no better "
            "than the soil it replaces",
        )
    d_added = r_added * lam
    if orientation == "horizontal":
        span = extent_m
    elif orientation == "vertical":
        span = 2.0 * extent_m
    else:
        raise GroundInputError("orientation", "must be horizontal or vertical")
    return -(lam / math.pi) * (math.log(span / d_t + 1.0) - math.log(span / (d_t + d_added) + 1.0))


@dataclass(frozen=True, slots=True)
class EdgeInsulation:
    """Slab edge insulation: orientation, D [m], R_n [m²·K/W], d_n [m]."""

    orientation: Orientation
    extent_m: float
    r_m2k_w: float
    thickness_m: float


@dataclass(frozen=True, slots=True)
class SlabResult:
    """A slab on ground: B' [m], d_t [m], U without and with edge insulation [W/(m²·K)]."""

    characteristic_m: float
    floor_thickness_m: float
    u_without_edge: float
    edge_psi_w_mk: float | None
    u: float
    branch: str
    heat_transfer_w_k: float


def slab_on_ground(
    area_m2: float,
    exposed_perimeter_m: float,
    wall_thickness_m: float,
    conductivity_w_mk: float,
    floor_r_m2k_w: float,
    edge: EdgeInsulation | None = None,
) -> SlabResult:
    """Slab-on-ground floor, [1] 9.1 (Eq. 3, 4) with edge insulation by [1] Annex B (Eq. B.4).

    ``U = U_0 + 2 Ψ_ge / B'`` where U_0 is :func:`floor_u` at d = d_t; ``H_g = A U``.

    Parameters
    ----------
    area_m2, exposed_perimeter_m : float
        A [m²], P [m].
    wall_thickness_m : float
        w [m].
    conductivity_w_mk : float
        λ [W/(m·K)].
    floor_r_m2k_w : float
        R_f [m²·K/W], films excluded.
    edge : EdgeInsulation, optional
        Horizontal or vertical edge insulation.

    Returns
    -------
    SlabResult
        B' [m], d_t [m], U_0 and U [W/(m²·K)], Ψ_ge [W/(m·K)], H_g [W/K].
    """
    b = characteristic_dimension(area_m2, exposed_perimeter_m)
    d_t = floor_equivalent_thickness(wall_thickness_m, conductivity_w_mk, floor_r_m2k_w)
    u0 = floor_u(b, d_t, conductivity_w_mk)
    psi = None
    u = u0
    if edge is not None:
        psi = edge_insulation_psi(
            conductivity_w_mk, d_t, edge.orientation, edge.extent_m, edge.r_m2k_w, edge.thickness_m
        )
        u = u0 + 2.0 * psi / b
        if u <= 0:
            raise GroundInputError(
                "extent_m",
                "is too large for this floor: U_0 + 2 Ψ_ge / B' would not be above zero. The "
                "edge-insulation formulas hold for a band at the edge; insulation under the "
                "whole floor belongs in the floor's own R",
            )
    return SlabResult(b, d_t, u0, psi, u, floor_branch(b, d_t), area_m2 * u)
