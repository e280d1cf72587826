"""Heat transfer via the ground: slab on ground, heated basement, suspended floor (steady state).

Everything is SI: lengths [m], areas [m²], conductivity [W/(m·K)], R [m²·K/W], U [W/(m²·K)],
Ψ [W/(m·K)], H [W/K], wind speed [m/s]. The methods are the simplified steady-state ones of
[1] for the annual mean; the periodic (monthly) terms of [1] are not included.

Symbols follow [1]: A floor area, P exposed perimeter (only the length next to outside air or
an unheated space outside the insulated envelope), B' = A / (0.5 P) characteristic dimension,
w full thickness of the walls round the floor, λ ground conductivity, d_t total equivalent
thickness of the floor, d_w of the basement walls, z depth of a basement floor below grade.

Decisions taken here (the standard is silent or leaves them to the user):

* P = 0 (a floor with no exposed perimeter) is refused: B' is then infinite and every U of
  [1] tends to zero, i.e. the method gives no heat flow to the ground; the caller should
  leave such a floor out (or give the short perimeter it really has) rather than get a U of 0.
* z = 0 in a heated basement is accepted: the floor is then exactly the slab on ground, and
  U_bw takes its limit 3λ / (π d_w) for a wall of zero buried height (area 0).
* Edge insulation so wide or deep that U_0 + 2 Ψ_ge / B' would not be above zero is refused
  (the formulas are for a band at the edge, not insulation under the whole floor).
* Inputs outside :data:`RANGES` are refused (generous bounds that keep every figure finite).
* Surface resistances are those [1] prescribes: R_si 0.17 m²·K/W for floors (downward heat
  flow), 0.13 for walls, R_se 0.04 m²·K/W.

References
----------
[1] ISO 13370:2017 Thermal performance of buildings — Heat transfer via the ground —
    Calculation methods. Cited by clause title; the clause and equation numbers given in
    brackets are those of the 2007 edition (EN ISO 13370:2007), from memory: characteristic
    dimension (8.1), equivalent thickness (8.2), slab-on-ground floor (9.1, Eq. 3 and 4),
    suspended floor (9.2, Eq. 6 to 9), heated basement (9.3, Eq. 10 to 15), edge insulation
    (Annex B, Eq. B.4 to B.6), thermal properties of the ground (Table 7). The 2017 edition
    keeps these formulas; check its numbering.
[2] ISO 6946:2017 Building components and building elements — Thermal resistance and thermal
    transmittance: surface resistances R_si 0.17 (downward), 0.13 (horizontal), R_se 0.04
    m²·K/W (Table 7).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
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


def _finite(parameter: str, value: float) -> None:
    if not math.isfinite(value):
        raise GroundInputError(parameter, "must be a finite number (not NaN or infinity)")


def _in_range(parameter: str, value: float) -> None:
    if parameter not in RANGES:
        return
    low, high, unit = RANGES[parameter]
    if value < low:
        raise GroundInputError(parameter, f"must be at least {low:g} {unit}".rstrip())
    if value > high:
        raise GroundInputError(parameter, f"must be at most {high:g} {unit}".rstrip())


def _positive(parameter: str, value: float) -> None:
    _finite(parameter, value)
    if value <= 0:
        raise GroundInputError(parameter, "must be greater than zero")
    _in_range(parameter, value)


def _non_negative(parameter: str, value: float) -> None:
    _finite(parameter, value)
    if value < 0:
        raise GroundInputError(parameter, "must not be negative")
    _in_range(parameter, value)


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
    _positive("area_m2", area_m2)
    _finite("exposed_perimeter_m", exposed_perimeter_m)
    if exposed_perimeter_m <= 0:
        raise GroundInputError(
            "exposed_perimeter_m",
            "must be greater than zero: a floor with no exposed perimeter has an infinite "
            "characteristic dimension and ISO 13370 gives it no heat flow to the ground; leave "
            "it out, or give the length of its edge that meets outside air",
        )
    _in_range("exposed_perimeter_m", exposed_perimeter_m)
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
    _non_negative("wall_thickness_m", wall_thickness_m)
    _positive("conductivity_w_mk", conductivity_w_mk)
    _non_negative("floor_r_m2k_w", floor_r_m2k_w)
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
    _positive("conductivity_w_mk", conductivity_w_mk)
    _non_negative("wall_r_m2k_w", wall_r_m2k_w)
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
    _positive("characteristic_m", characteristic_m)
    _positive("thickness_m", thickness_m)
    _positive("conductivity_w_mk", conductivity_w_mk)
    b, d, lam = characteristic_m, thickness_m, conductivity_w_mk
    if d < b:
        return 2.0 * lam / (math.pi * b + d) * math.log(math.pi * b / d + 1.0)
    return lam / (0.457 * b + d)


def floor_branch(characteristic_m: float, thickness_m: float) -> str:
    """Which branch of :func:`floor_u` applies: ``"d < B'"`` or ``"d >= B'"``."""
    return "d < B'" if thickness_m < characteristic_m else "d >= B'"


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
    _positive("conductivity_w_mk", conductivity_w_mk)
    _positive("floor_thickness_m", floor_thickness_m)
    _positive("extent_m", extent_m)
    _positive("insulation_r_m2k_w", insulation_r_m2k_w)
    _non_negative("insulation_thickness_m", insulation_thickness_m)
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
    _positive("conductivity_w_mk", conductivity_w_mk)
    _non_negative("depth_m", depth_m)
    _positive("floor_thickness_m", floor_thickness_m)
    _positive("wall_thickness_eq_m", wall_thickness_eq_m)
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
    _non_negative("depth_m", depth_m)
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
    _non_negative("ground_r_m2k_w", ground_r_m2k_w)
    d_g = floor_equivalent_thickness(wall_thickness_m, conductivity_w_mk, ground_r_m2k_w)
    _non_negative("floor_r_m2k_w", floor_r_m2k_w)
    _non_negative("height_above_grade_m", height_above_grade_m)
    _non_negative("underfloor_wall_u_w_m2k", underfloor_wall_u_w_m2k)
    _non_negative("vent_area_per_perimeter_m", vent_area_per_perimeter_m)
    _non_negative("wind_speed_m_s", wind_speed_m_s)
    _non_negative("shielding_factor", shielding_factor)
    lam = conductivity_w_mk
    u_g = 2.0 * lam / (math.pi * b + d_g) * math.log(math.pi * b / d_g + 1.0)
    u_x = (
        2.0 * height_above_grade_m * underfloor_wall_u_w_m2k / b
        + VENTILATION_CONSTANT * vent_area_per_perimeter_m * wind_speed_m_s * shielding_factor / b
    )
    u_f = 1.0 / (R_SI_FLOOR + floor_r_m2k_w + R_SI_FLOOR)
    u = 1.0 / (1.0 / u_f + 1.0 / (u_g + u_x))
    return SuspendedResult(b, d_g, u_f, u_g, u_x, u, area_m2 * u)
