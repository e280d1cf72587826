"""A heated basement: its floor and its walls below grade (ISO 13370 9.3) [1].

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
    SHALLOW_DEPTH_M,
    characteristic_dimension,
    check_non_negative,
    check_positive,
    floor_branch,
    floor_equivalent_thickness,
    floor_u,
    wall_equivalent_thickness,
)


def basement_wall_u(
    conductivity_w_mk: float, depth_m: float, floor_thickness_m: float, wall_thickness_eq_m: float
) -> float:
    """U of heated-basement walls, [1] 9.3 (Eq. 14).

    ``U_bw = (2λ / (π z)) (1 + 0.5 d / (d + z)) ln(z / d_w + 1)`` with ``d = d_t`` when
    ``d_w ≥ d_t`` and ``d = d_w`` when ``d_w < d_t``. At z = 0 (below 1 nm) the limit
    ``(2λ / π)(1 + 0.5) / d_w = 3λ / (π d_w)`` is returned.

    Parameters
    ----------
    conductivity_w_mk : float
        λ [W/(m·K)].
    depth_m : float
        z [m], depth of the basement floor below grade.
    floor_thickness_m : float
        d_t of the basement floor [m].
    wall_thickness_eq_m : float
        d_w of the walls [m].

    Returns
    -------
    float
        U_bw [W/(m²·K)].
    """
    check_positive("conductivity_w_mk", conductivity_w_mk)
    check_non_negative("depth_m", depth_m)
    check_positive("floor_thickness_m", floor_thickness_m)
    check_positive("wall_thickness_eq_m", wall_thickness_eq_m)
    lam, z, d_w = conductivity_w_mk, depth_m, wall_thickness_eq_m
    d = floor_thickness_m if d_w >= floor_thickness_m else d_w
    if z < SHALLOW_DEPTH_M:
        return 2.0 * lam / math.pi * (1.0 + 0.5) / d_w
    return (2.0 * lam / (math.pi * z)) * (1.0 + 0.5 * d / (d + z)) * math.log1p(z / d_w)


@dataclass(frozen=True, slots=True)
class BasementResult:
    """A heated basement: B', d_t, d_w [m]; U_bf, U_bw, U' [W/(m²·K)]; H_g [W/K]."""

    characteristic_m: float
    floor_thickness_m: float
    wall_thickness_eq_m: float
    u_floor: float
    u_wall: float
    u_overall: float
    heat_transfer_w_k: float
    floor_branch: str
    wall_branch: str
    wall_area_m2: float


def heated_basement(
    area_m2: float,
    exposed_perimeter_m: float,
    wall_thickness_m: float,
    conductivity_w_mk: float,
    floor_r_m2k_w: float,
    depth_m: float,
    wall_r_m2k_w: float,
) -> BasementResult:
    """Heated basement, [1] 9.3 (Eq. 10 to 15).

    Floor: :func:`floor_u` at ``d = d_t + 0.5 z`` (Eq. 11 when ``d_t + 0.5 z < B'``, else
    Eq. 12); walls: :func:`basement_wall_u`; ``U' = (A U_bf + z P U_bw) / (A + z P)``;
    ``H_g = A U_bf + z P U_bw``.

    Parameters
    ----------
    area_m2, exposed_perimeter_m : float
        A [m²] of the basement floor, P [m].
    wall_thickness_m : float
        w [m].
    conductivity_w_mk : float
        λ [W/(m·K)].
    floor_r_m2k_w, wall_r_m2k_w : float
        R_f and R_w [m²·K/W], films excluded.
    depth_m : float
        z [m] (0 gives the slab on ground).

    Returns
    -------
    BasementResult
        All the intermediate figures.
    """
    b = characteristic_dimension(area_m2, exposed_perimeter_m)
    d_t = floor_equivalent_thickness(wall_thickness_m, conductivity_w_mk, floor_r_m2k_w)
    check_non_negative("depth_m", depth_m)
    d_w = wall_equivalent_thickness(conductivity_w_mk, wall_r_m2k_w)
    d_floor = d_t + 0.5 * depth_m
    u_bf = floor_u(b, d_floor, conductivity_w_mk)
    u_bw = basement_wall_u(conductivity_w_mk, depth_m, d_t, d_w)
    wall_area = depth_m * exposed_perimeter_m
    h_g = area_m2 * u_bf + wall_area * u_bw
    return BasementResult(
        characteristic_m=b,
        floor_thickness_m=d_t,
        wall_thickness_eq_m=d_w,
        u_floor=u_bf,
        u_wall=u_bw,
        u_overall=h_g / (area_m2 + wall_area),
        heat_transfer_w_k=h_g,
        floor_branch=floor_branch(b, d_floor).replace("d ", "d_t + 0.5 z "),
        wall_branch="d_w >= d_t" if d_w >= d_t else "d_w < d_t",
        wall_area_m2=wall_area,
    )
