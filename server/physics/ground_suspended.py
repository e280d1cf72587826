"""A suspended floor over a ventilated underfloor space (ISO 13370 9.2) [1].

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
    R_SI_FLOOR,
    VENTILATION_CONSTANT,
    characteristic_dimension,
    check_non_negative,
    floor_equivalent_thickness,
)


@dataclass(frozen=True, slots=True)
class SuspendedResult:
    """A suspended floor over a ventilated space: B', d_g [m]; U_f, U_g, U_x, U [W/(m²·K)]."""

    characteristic_m: float
    ground_thickness_m: float
    u_deck: float
    u_ground: float
    u_ventilation: float
    u: float
    heat_transfer_w_k: float


def suspended_floor(
    area_m2: float,
    exposed_perimeter_m: float,
    wall_thickness_m: float,
    conductivity_w_mk: float,
    floor_r_m2k_w: float,
    height_above_grade_m: float,
    underfloor_wall_u_w_m2k: float,
    vent_area_per_perimeter_m: float,
    wind_speed_m_s: float,
    shielding_factor: float,
    ground_r_m2k_w: float = 0.0,
) -> SuspendedResult:
    """Suspended floor over a naturally ventilated underfloor space, [1] 9.2 (Eq. 6 to 9).

    ``U = 1 / (1/U_f + 1/(U_g + U_x))``;
    ``U_g = 2λ / (π B' + d_g) · ln(π B' / d_g + 1)``, ``d_g = w + λ (R_si + R_g + R_se)``;
    ``U_x = 2 h U_w / B' + 1450 ε v f_w / B'``;
    ``U_f = 1 / (R_si + R_f + R_si)``: the deck between the room and the underfloor space,
    with the internal surface resistance 0.17 m²·K/W on both faces (both face still indoor-like
    air, downward heat flow; [1] 9.2 refers U_f to [2], from memory).

    Parameters
    ----------
    area_m2, exposed_perimeter_m : float
        A [m²], P [m] of the floor.
    wall_thickness_m : float
        w [m].
    conductivity_w_mk : float
        λ [W/(m·K)].
    floor_r_m2k_w : float
        R_f of the suspended deck, films excluded [m²·K/W].
    height_above_grade_m : float
        h, height of the floor's top above the outside ground [m].
    underfloor_wall_u_w_m2k : float
        U_w of the underfloor space's walls above grade [W/(m²·K)].
    vent_area_per_perimeter_m : float
        ε, ventilation openings per length of the underfloor space's perimeter [m²/m].
    wind_speed_m_s : float
        v, mean wind speed at 10 m height [m/s].
    shielding_factor : float
        f_w [-] (:data:`SHIELDING_FACTOR`).
    ground_r_m2k_w : float, optional
        R_g of insulation on the underfloor ground [m²·K/W], default 0.

    Returns
    -------
    SuspendedResult
        B', d_g [m], U_f, U_g, U_x and U [W/(m²·K)], H = A U [W/K].
    """
    b = characteristic_dimension(area_m2, exposed_perimeter_m)
    check_non_negative("ground_r_m2k_w", ground_r_m2k_w)
    d_g = floor_equivalent_thickness(wall_thickness_m, conductivity_w_mk, ground_r_m2k_w)
    check_non_negative("floor_r_m2k_w", floor_r_m2k_w)
    check_non_negative("height_above_grade_m", height_above_grade_m)
    check_non_negative("underfloor_wall_u_w_m2k", underfloor_wall_u_w_m2k)
    check_non_negative("vent_area_per_perimeter_m", vent_area_per_perimeter_m)
    check_non_negative("wind_speed_m_s", wind_speed_m_s)
    check_non_negative("shielding_factor", shielding_factor)
    lam = conductivity_w_mk
    u_g = 2.0 * lam / (math.pi * b + d_g) * math.log(math.pi * b / d_g + 1.0)
    u_x = (
        2.0 * height_above_grade_m * underfloor_wall_u_w_m2k / b
        + VENTILATION_CONSTANT * vent_area_per_perimeter_m * wind_speed_m_s * shielding_factor / b
    )
    u_f = 1.0 / (R_SI_FLOOR + floor_r_m2k_w + R_SI_FLOOR)
    u = 1.0 / (1.0 / u_f + 1.0 / (u_g + u_x))
    return SuspendedResult(b, d_g, u_f, u_g, u_x, u, area_m2 * u)
