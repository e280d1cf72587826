"""What every ISO 13370 case shares: surface resistances, soils, input checks, the
characteristic dimension B', the equivalent thicknesses and the floor U [1].

Everything is SI; the decisions taken where the standard is silent are listed in :mod:`.ground`.

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
from typing import Literal

#: internal surface resistance of a floor, downward heat flow [m²·K/W] ([1] 8.2, [2])
R_SI_FLOOR = 0.17
#: internal surface resistance of a wall, horizontal heat flow [m²·K/W] ([1] 9.3, [2])
R_SI_WALL = 0.13
#: external surface resistance [m²·K/W] ([1] 8.2, [2])
R_SE = 0.04
#: ground conductivity by category [W/(m·K)]: [1] Table 7 (from memory)
SOIL_CONDUCTIVITY_W_MK: dict[str, float] = {
    "clay_silt": 1.5,  # category 1, clay or silt
    "sand_gravel": 2.0,  # category 2, sand or gravel
    "rock": 3.5,  # category 3, homogeneous rock
}
#: [1] advises sand or gravel (2.0 W/(m·K)) when the ground is not known (from memory)
DEFAULT_SOIL_CONDUCTIVITY_W_MK = 2.0
#: wind shielding factor f_w of a ventilated underfloor space, [1] 9.2 (from memory)
SHIELDING_FACTOR: dict[str, float] = {
    "sheltered": 0.02,  # city centre
    "average": 0.05,  # suburban
    "exposed": 0.10,  # rural
}
#: the constant of the ventilation term of [1] Eq. 9 (U_x), from memory
VENTILATION_CONSTANT = 1450.0

Orientation = Literal["horizontal", "vertical"]


class GroundInputError(ValueError):
    """A value the ground calculation cannot use; ``parameter`` names the input at fault."""

    def __init__(self, parameter: str, message: str) -> None:
        super().__init__(message)
        self.parameter = parameter


#: accepted ranges of the inputs, SI, with their unit for messages (common practice: they keep
#: every result finite and bind no real building; soils lie within 0.2 to 5 W/(m·K))
RANGES: dict[str, tuple[float, float, str]] = {
    "area_m2": (1e-4, 1e8, "m²"),
    "exposed_perimeter_m": (1e-3, 1e7, "m"),
    "wall_thickness_m": (0.0, 10.0, "m"),
    "conductivity_w_mk": (0.01, 100.0, "W/(m·K)"),
    "floor_r_m2k_w": (0.0, 1000.0, "m²·K/W"),
    "wall_r_m2k_w": (0.0, 1000.0, "m²·K/W"),
    "ground_r_m2k_w": (0.0, 1000.0, "m²·K/W"),
    "depth_m": (0.0, 100.0, "m"),
    "extent_m": (1e-3, 100.0, "m"),
    "insulation_r_m2k_w": (0.0, 1000.0, "m²·K/W"),
    "insulation_thickness_m": (0.0, 10.0, "m"),
    "height_above_grade_m": (0.0, 100.0, "m"),
    "underfloor_wall_u_w_m2k": (0.0, 100.0, "W/(m²·K)"),
    "vent_area_per_perimeter_m": (0.0, 10.0, "m²/m"),
    "wind_speed_m_s": (0.0, 100.0, "m/s"),
    "shielding_factor": (0.0, 1.0, ""),
}
#: largest characteristic dimension B' [m] accepted (common practice: far beyond any building)
MAX_CHARACTERISTIC_M = 1e7
#: below this buried depth [m] a basement wall takes the z → 0 limit of its U (rounding guard)
SHALLOW_DEPTH_M = 1e-9


def check_finite(parameter: str, value: float) -> None:
    if not math.isfinite(value):
        raise GroundInputError(parameter, "must be a finite number (not NaN or infinity)")


def check_in_range(parameter: str, value: float) -> None:
    if parameter not in RANGES:
        return
    low, high, unit = RANGES[parameter]
    if value < low:
        raise GroundInputError(parameter, f"must be at least {low:g} {unit}".rstrip())
    if value > high:
        raise GroundInputError(parameter, f"must be at most {high:g} {unit}".rstrip())


def check_positive(parameter: str, value: float) -> None:
    check_finite(parameter, value)
    if value <= 0:
        raise GroundInputError(parameter, "must be greater than zero")
    check_in_range(parameter, value)


def check_non_negative(parameter: str, value: float) -> None:
    check_finite(parameter, value)
    if value < 0:
        raise GroundInputError(parameter, "must not be negative")
    check_in_range(parameter, value)


def characteristic_dimension(area_m2: float, exposed_perimeter_m: float) -> float:
    """Characteristic dimension of a floor, [1] 8.1.

    ``B' = A / (0.5 P)``

    Parameters
    ----------
    area_m2 : float
        Floor area A [m²].
    exposed_perimeter_m : float
        Exposed perimeter P [m]; must be above zero (see the module's decisions).

    Returns
    -------
    float
        B' [m].
    """
    check_positive("area_m2", area_m2)
    check_finite("exposed_perimeter_m", exposed_perimeter_m)
    if exposed_perimeter_m <= 0:
        raise GroundInputError(
            "exposed_perimeter_m",
            "must be greater than zero: a floor with no exposed perimeter has an infinite "
            "characteristic dimension and ISO 13370 gives it no heat flow to the ground; leave "
            "it out, or give the length of its edge that meets outside air",
        )
    check_in_range("exposed_perimeter_m", exposed_perimeter_m)
    characteristic = area_m2 / (0.5 * exposed_perimeter_m)
    if characteristic > MAX_CHARACTERISTIC_M:
        raise GroundInputError(
            "exposed_perimeter_m",
            f"is too small for the floor area (B' = A / (0.5 P) above {MAX_CHARACTERISTIC_M:g} m)",
        )
    return characteristic


def floor_equivalent_thickness(
    wall_thickness_m: float, conductivity_w_mk: float, floor_r_m2k_w: float
) -> float:
    """Total equivalent thickness of a floor, [1] 8.2 (basement floor: 9.3, Eq. 10).

    ``d_t = w + λ (R_si + R_f + R_se)``, R_si = 0.17, R_se = 0.04 m²·K/W.

    Parameters
    ----------
    wall_thickness_m : float
        w, full thickness of the walls round the floor [m].
    conductivity_w_mk : float
        λ of the ground [W/(m·K)].
    floor_r_m2k_w : float
        R_f of the floor construction, films excluded [m²·K/W] (a dense slab may be
        neglected, [1]).

    Returns
    -------
    float
        d_t [m].
    """
    check_non_negative("wall_thickness_m", wall_thickness_m)
    check_positive("conductivity_w_mk", conductivity_w_mk)
    check_non_negative("floor_r_m2k_w", floor_r_m2k_w)
    return wall_thickness_m + conductivity_w_mk * (R_SI_FLOOR + floor_r_m2k_w + R_SE)


def wall_equivalent_thickness(conductivity_w_mk: float, wall_r_m2k_w: float) -> float:
    """Equivalent thickness of basement walls, [1] 9.3 (Eq. 13).

    ``d_w = λ (R_si + R_w + R_se)``, R_si = 0.13, R_se = 0.04 m²·K/W.

    Parameters
    ----------
    conductivity_w_mk : float
        λ of the ground [W/(m·K)].
    wall_r_m2k_w : float
        R_w of the basement wall, films excluded [m²·K/W].

    Returns
    -------
    float
        d_w [m].
    """
    check_positive("conductivity_w_mk", conductivity_w_mk)
    check_non_negative("wall_r_m2k_w", wall_r_m2k_w)
    return conductivity_w_mk * (R_SI_WALL + wall_r_m2k_w + R_SE)


def floor_u(characteristic_m: float, thickness_m: float, conductivity_w_mk: float) -> float:
    """U of a floor on the ground by its two branches, [1] 9.1 (Eq. 3, 4) and 9.3 (Eq. 11, 12).

    Uninsulated or moderately insulated, ``d < B'``:
    ``U = 2λ / (π B' + d) · ln(π B' / d + 1)``;
    well insulated, ``d ≥ B'``: ``U = λ / (0.457 B' + d)``.
    For a slab ``d = d_t``; for a basement floor ``d = d_t + 0.5 z``.

    Parameters
    ----------
    characteristic_m : float
        B' [m].
    thickness_m : float
        d [m], the equivalent thickness of the branch test.
    conductivity_w_mk : float
        λ [W/(m·K)].

    Returns
    -------
    float
        U [W/(m²·K)].
    """
    check_positive("characteristic_m", characteristic_m)
    check_positive("thickness_m", thickness_m)
    check_positive("conductivity_w_mk", conductivity_w_mk)
    b, d, lam = characteristic_m, thickness_m, conductivity_w_mk
    if d < b:
        return 2.0 * lam / (math.pi * b + d) * math.log(math.pi * b / d + 1.0)
    return lam / (0.457 * b + d)


def floor_branch(characteristic_m: float, thickness_m: float) -> str:
    """Which branch of :func:`floor_u` applies: ``"d < B'"`` or ``"d >= B'"``."""
    return "d < B'" if thickness_m < characteristic_m else "d >= B'"
