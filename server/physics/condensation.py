"""Steady-state interstitial condensation screening by the Glaser method (ISO 13788).

One winter (or summer) design condition, layers given outside to inside. The temperature falls
through the assembly in proportion to thermal resistance; the water-vapour pressure falls in
proportion to the vapour-diffusion-equivalent air layer thickness sd. Where the straight
vapour-pressure line would rise above the saturation pressure, the Glaser construction bends
the line down so it just touches saturation at the condensation plane(s), and the difference
in vapour flow into and out of each plane is the condensation rate.

Choices made here (and why):

* Every layer is split into sub-layers of at most 0.25 m²·K/W ([1], from memory) so that
  condensation inside a thick insulation layer is found, not only at the layer's faces.
* A layer never resists vapour less than still air of the same thickness (mu >= 1), so its sd
  is taken as max(sd, thickness). With that floor an assembly whose layers were all given
  sd = 0 still has a defined, linear-in-thickness vapour profile. If the total sd is still
  zero (no layer has a thickness either) the profile is undefined and ValueError is raised:
  [1] needs sd > 0 somewhere.
* Surface vapour resistances are neglected, as in [1].
* Saturation pressure comes from the ASHRAE formulation [2] (over ice at or below 0.01 °C),
  not the Magnus-type formulae of [1], annex; the two differ by a few tenths of a percent.

References
----------
[1] ISO 13788:2012, Hygrothermal performance of building components and building elements —
    Internal surface temperature to avoid critical surface humidity and interstitial
    condensation — Calculation methods, clause 7 (Glaser method); delta_0 = 2e-10 kg/(m·s·Pa).
[2] ASHRAE Handbook—Fundamentals (2017), ch. 1 "Psychrometrics", eq. 5 and 6.
[3] ASHRAE Handbook—Fundamentals (2017), ch. 26 "Heat, Air, and Moisture Control in Building
    Assemblies—Material Properties" (permeance units: 1 perm = 57.2 ng/(s·m²·Pa)).
[4] NIST Special Publication 811 (2008), appendix B (grain, conventional inch of mercury; the
    perm factor is :data:`server.physics.units.US_PERM_NG_PER_PA_S_M2`).

The words said about a result are built in :mod:`server.services.condensation_words`.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

from server.physics.psychrometrics import (
    dew_point_from_vapour_pressure_c,
    saturation_vapour_pressure_pa,
    vapour_pressure_pa,
)
from server.physics.units import us_perms_to_permeance

__all__ = [
    "DELTA_0_KG_M_S_PA",
    "CondensationPlane",
    "CondensationResult",
    "Plane",
    "VapourLayer",
    "glaser_check",
    "permeance_from_sd",
    "sd_from_mu",
    "sd_from_permeance",
    "sd_from_us_perms",
]

#: Water-vapour permeability of still air, ISO 13788:2012 [1] [kg/(m·s·Pa)].
DELTA_0_KG_M_S_PA = 2.0e-10
#: Largest sub-layer thermal resistance, ISO 13788 [1] (from memory) [m²·K/W].
MAX_SUBLAYER_R_M2K_W = 0.25
#: Default surface resistances, ISO 6946 (horizontal heat flow) [m²·K/W].
DEFAULT_INSIDE_SURFACE_R = 0.13
DEFAULT_OUTSIDE_SURFACE_R = 0.04


def sd_from_mu(mu: float, thickness_m: float) -> float:
    """Vapour-diffusion-equivalent air layer thickness sd = mu × d [m] ([1], clause 3).

    Parameters
    ----------
    mu : float
        Water-vapour resistance factor [-], 1 or more (still air is 1).
    thickness_m : float
        Layer thickness d [m], greater than zero.
    """
    if not math.isfinite(mu) or mu < 1.0:
        raise ValueError("a vapour resistance factor mu must be 1 or more (still air is 1)")
    if not math.isfinite(thickness_m) or thickness_m <= 0.0:
        raise ValueError("a thickness must be greater than zero")
    return mu * thickness_m


def sd_from_permeance(permeance_ng_per_pa_s_m2: float) -> float:
    """sd [m] of a layer from its vapour permeance W [ng/(Pa·s·m²)]: sd = delta_0 / W ([1]).

    With delta_0 = 2e-10 kg/(m·s·Pa) = 200 ng/(m·s·Pa): sd = 200 / W.
    """
    if not math.isfinite(permeance_ng_per_pa_s_m2) or permeance_ng_per_pa_s_m2 <= 0.0:
        raise ValueError("a vapour permeance must be greater than zero")
    return DELTA_0_KG_M_S_PA * 1e12 / permeance_ng_per_pa_s_m2


def permeance_from_sd(sd_m: float) -> float:
    """Vapour permeance W [ng/(Pa·s·m²)] of a layer from its sd [m]: W = delta_0 / sd ([1]).

    The inverse of :func:`sd_from_permeance`: W = 200 / sd.
    """
    if not math.isfinite(sd_m) or sd_m <= 0.0:
        raise ValueError("an sd must be greater than zero")
    return DELTA_0_KG_M_S_PA * 1e12 / sd_m


def sd_from_us_perms(perms: float) -> float:
    """sd [m] of a layer from its permeance in US perms [grain/(h·ft²·inHg)] ([1], [3])."""
    return sd_from_permeance(us_perms_to_permeance(perms))


@dataclass(frozen=True, slots=True)
class VapourLayer:
    """One layer for the check: thermal resistance [m²·K/W], sd [m], thickness [m] or None."""

    name: str
    thermal_resistance_m2k_w: float
    sd_m: float
    thickness_m: float | None = None


@dataclass(frozen=True, slots=True)
class Plane:
    """One plane through the assembly (a surface, a layer interface, or inside a layer).

    ``cumulative_*`` run from the outdoor air inward (the resistance includes the outside
    surface resistance). ``straight_line_vapour_pressure_pa`` is the profile without
    condensation; ``vapour_pressure_pa`` the profile after the Glaser construction.
    ``dew_point_c`` is the dew point of the straight-line value (None for perfectly dry air);
    ``margin_k`` = temperature - dew point; ``flagged`` = straight line above saturation.
    """

    index: int
    kind: str  # "outside surface" | "interface" | "within layer" | "inside surface"
    label: str
    layer_index: int  # the layer this plane belongs to (its outside face, for interfaces)
    position_m: float | None
    cumulative_r_m2k_w: float
    cumulative_sd_m: float
    temperature_c: float
    saturation_pressure_pa: float
    straight_line_vapour_pressure_pa: float
    vapour_pressure_pa: float
    dew_point_c: float | None
    margin_k: float | None
    flagged: bool


@dataclass(frozen=True, slots=True)
class CondensationPlane:
    """A plane where the Glaser line touches saturation; rate g_c [kg/(m²·s)], > 0."""

    plane_index: int
    label: str
    temperature_c: float
    saturation_pressure_pa: float
    rate_kg_m2_s: float


@dataclass(frozen=True, slots=True)
class CondensationResult:
    """Everything the Glaser check found for one condition (see :func:`glaser_check`)."""

    layers: tuple[VapourLayer, ...]
    effective_sd_m: tuple[float, ...]
    indoor_temp_c: float
    indoor_rh: float
    outdoor_temp_c: float
    outdoor_rh: float
    indoor_vapour_pressure_pa: float
    outdoor_vapour_pressure_pa: float
    inside_surface_resistance_m2k_w: float
    outside_surface_resistance_m2k_w: float
    total_resistance_m2k_w: float
    total_sd_m: float
    planes: tuple[Plane, ...]
    condensation_planes: tuple[CondensationPlane, ...]
    inside_surface_condensation: bool
    outside_surface_condensation: bool

    @property
    def still_air_floored_layers(self) -> tuple[int, ...]:
        """Indices of the layers whose sd was raised to their thickness (mu >= 1 floor)."""
        return tuple(
            k for k, layer in enumerate(self.layers) if self.effective_sd_m[k] > layer.sd_m
        )

    @property
    def flagged(self) -> tuple[Plane, ...]:
        """Planes where the straight vapour-pressure line is above saturation."""
        return tuple(plane for plane in self.planes if plane.flagged)

    @property
    def total_rate_kg_m2_s(self) -> float:
        """Sum of the condensation rates of all planes [kg/(m²·s)]."""
        return sum(plane.rate_kg_m2_s for plane in self.condensation_planes)

    @property
    def has_condensation(self) -> bool:
        return bool(self.condensation_planes) or self.inside_surface_condensation


def _finite(value: float, message: str, *, minimum: float = 0.0, strict: bool = False) -> float:
    number = float(value)
    if not math.isfinite(number) or number < minimum or (strict and number == minimum):
        raise ValueError(message)
    return number


def _air(where: str, temp_c: float, rh: float) -> float:
    try:
        return vapour_pressure_pa(temp_c, rh)
    except (TypeError, ValueError) as error:
        raise ValueError(f"{where} air: {error}") from None


def _validate_layers(layers: Sequence[VapourLayer]) -> list[float]:
    if not layers:
        raise ValueError("give at least one layer")
    effective: list[float] = []
    for number, layer in enumerate(layers, start=1):
        where = f"layer {number} ({layer.name or 'unnamed'})"
        _finite(layer.thermal_resistance_m2k_w, f"{where}: thermal resistance must be 0 or more")
        sd = _finite(layer.sd_m, f"{where}: the vapour resistance sd must be 0 or more")
        if layer.thickness_m is not None:
            thickness = _finite(
                layer.thickness_m, f"{where}: thickness must be greater than zero", strict=True
            )
            sd = max(sd, thickness)  # still-air floor: mu >= 1
        effective.append(sd)
    if sum(effective) <= 0.0:
        raise ValueError(
            "no layer resists water vapour and none has a thickness, so the vapour-pressure "
            "profile is undefined; give a thickness or an sd for at least one layer"
        )
    return effective


_Row = tuple[str, str, int, float | None, float, float]


def _geometry(layers: Sequence[VapourLayer], sds: list[float], rse: float) -> list[_Row]:
    """Planes as (kind, label, layer index, position [m], cumulative R, cumulative sd)."""
    widths = [layer.thickness_m for layer in layers]
    known = all(width is not None for width in widths)
    name = [layer.name.strip() or f"layer {k + 1}" for k, layer in enumerate(layers)]
    first = f"outside face of the {name[0]}"
    rows: list[_Row] = [("outside surface", first, 0, 0.0 if known else None, rse, 0.0)]
    r_cum, sd_cum, x_cum = rse, 0.0, 0.0
    for k, layer in enumerate(layers):
        r_layer, width = layer.thermal_resistance_m2k_w, widths[k] or 0.0
        parts = max(1, math.ceil(r_layer / MAX_SUBLAYER_R_M2K_W - 1e-9))
        for j in range(1, parts + 1):
            share = j / parts
            at = (x_cum + share * width) if known else None
            if j < parts:
                percent = round(100 * share)
                kind = "within layer"
                label = f"{percent} % of the way through the {name[k]} from its outside face"
            elif k + 1 < len(layers):
                kind, label = (
                    "interface",
                    f"inside face of the {name[k]} (against the {name[k + 1]})",
                )
            else:
                kind, label = "inside surface", f"room-side face of the {name[k]}"
            rows.append((kind, label, k, at, r_cum + share * r_layer, sd_cum + share * sds[k]))
        r_cum, sd_cum, x_cum = r_cum + r_layer, sd_cum + sds[k], x_cum + width
    return rows


def _lower_hull(points: list[tuple[float, float, int]]) -> list[tuple[float, float, int]]:
    """Lower convex hull (Andrew's monotone chain) of points sorted by (s, p)."""
    hull: list[tuple[float, float, int]] = []
    for point in points:
        while len(hull) >= 2:
            (x0, y0, _), (x1, y1, _) = hull[-2], hull[-1]
            if (x1 - x0) * (point[1] - y0) - (y1 - y0) * (point[0] - x0) <= 0.0:
                hull.pop()
            else:
                break
        hull.append(point)
    return hull


def _interpolate(hull: list[tuple[float, float, int]], s: float) -> float:
    for (x0, y0, _), (x1, y1, _) in zip(hull, hull[1:], strict=False):
        if x0 <= s <= x1:
            return y0 if x1 == x0 else y0 + (y1 - y0) * (s - x0) / (x1 - x0)
    return hull[-1][1]


def glaser_check(
    layers: Sequence[VapourLayer],
    *,
    indoor_temp_c: float,
    indoor_rh: float,
    outdoor_temp_c: float,
    outdoor_rh: float,
    inside_surface_resistance_m2k_w: float = DEFAULT_INSIDE_SURFACE_R,
    outside_surface_resistance_m2k_w: float = DEFAULT_OUTSIDE_SURFACE_R,
) -> CondensationResult:
    """Glaser steady-state condensation check of a layered assembly ([1], clause 7).

    Parameters
    ----------
    layers : sequence of VapourLayer
        Layers from outside to inside: thermal resistance R_j [m²·K/W] (0 or more), sd_j [m]
        (0 or more) and thickness [m] (None when not known).
    indoor_temp_c, outdoor_temp_c : float
        Air temperatures theta_i, theta_e [°C].
    indoor_rh, outdoor_rh : float
        Relative humidities phi_i, phi_e [-], fractions from 0 to 1.
    inside_surface_resistance_m2k_w, outside_surface_resistance_m2k_w : float
        R_si, R_se [m²·K/W] (defaults: ISO 6946 horizontal heat flow, 0.13 and 0.04).

    Returns
    -------
    CondensationResult
        Every plane's temperature [°C], p_sat [Pa], straight-line and constructed vapour
        pressure [Pa], dew point [°C], the flags, and each condensation plane's rate
        [kg/(m²·s)].

    Notes
    -----
    theta_n = theta_e + (theta_i - theta_e) R'_n / R_T, with R'_n the resistance from the
    outdoor air to plane n and R_T = R_se + sum R_j + R_si ([1], clause 7).
    Straight line: p_n = p_e + (p_i - p_e) s'_n / s_T, p_i = phi_i p_sat(theta_i) ([2]).
    Construction: the lower convex hull of (0, p_e), (s'_n, p_sat,n), (s_T, p_i), which is the
    line that touches but never crosses saturation. At each touching plane c, between the
    neighbouring hull points a (outward) and b (inward), the rate is ([1], clause 7)

        g_c = delta_0 [ (p_b - p_c) / (s_b - s_c) - (p_c - p_a) / (s_c - s_a) ],

    which for one plane is delta_0 [(p_i - p_c)/(s_T - s_c) - (p_c - p_e)/s_c].
    """
    sds = _validate_layers(layers)
    rsi = _finite(
        inside_surface_resistance_m2k_w, "the inside surface resistance must be 0 or more"
    )
    rse = _finite(
        outside_surface_resistance_m2k_w, "the outside surface resistance must be 0 or more"
    )
    p_in = _air("indoor", indoor_temp_c, indoor_rh)
    p_out = _air("outdoor", outdoor_temp_c, outdoor_rh)
    r_total = rse + sum(layer.thermal_resistance_m2k_w for layer in layers) + rsi
    if r_total <= 0.0:
        raise ValueError("the assembly and its surfaces have no thermal resistance at all")
    sd_total = sum(sds)
    rows = _geometry(layers, sds, rse)
    temps = [outdoor_temp_c + (indoor_temp_c - outdoor_temp_c) * row[4] / r_total for row in rows]
    psats = [saturation_vapour_pressure_pa(temp) for temp in temps]
    lines = [p_out + (p_in - p_out) * row[5] / sd_total for row in rows]

    tol = 1e-12 * sd_total
    inner = [(row[5], psats[n], n) for n, row in enumerate(rows) if tol < row[5] < sd_total - tol]
    hull = _lower_hull([(0.0, p_out, -1), *sorted(inner), (sd_total, p_in, -2)])
    condensing: list[CondensationPlane] = []
    for a, c, b in zip(hull, hull[1:], hull[2:], strict=False):
        slope_in, slope_out = (b[1] - c[1]) / (b[0] - c[0]), (c[1] - a[1]) / (c[0] - a[0])
        if slope_in - slope_out > 1e-9 * (abs(slope_in) + abs(slope_out) + 1.0):
            rate = DELTA_0_KG_M_S_PA * (slope_in - slope_out)
            n = c[2]
            condensing.append(CondensationPlane(n, rows[n][1], temps[n], psats[n], rate))

    planes = []
    for n, row in enumerate(rows):
        s = row[5]
        vapour = p_out if s <= tol else p_in if s >= sd_total - tol else _interpolate(hull, s)
        dew = dew_point_from_vapour_pressure_c(max(lines[n], 0.0))
        margin = None if dew is None else temps[n] - dew
        flagged = lines[n] > psats[n]
        planes.append(Plane(n, *row, temps[n], psats[n], lines[n], vapour, dew, margin, flagged))

    return CondensationResult(
        layers=tuple(layers),
        effective_sd_m=tuple(sds),
        indoor_temp_c=float(indoor_temp_c),
        indoor_rh=float(indoor_rh),
        outdoor_temp_c=float(outdoor_temp_c),
        outdoor_rh=float(outdoor_rh),
        indoor_vapour_pressure_pa=p_in,
        outdoor_vapour_pressure_pa=p_out,
        inside_surface_resistance_m2k_w=rsi,
        outside_surface_resistance_m2k_w=rse,
        total_resistance_m2k_w=r_total,
        total_sd_m=sd_total,
        planes=tuple(planes),
        condensation_planes=tuple(condensing),
        inside_surface_condensation=planes[-1].flagged,
        outside_surface_condensation=planes[0].flagged,
    )
