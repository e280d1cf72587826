"""Air-source heat pump heating by outdoor temperature bins, with electric backup.

The heat pump's capacity and input power change with the outdoor dry-bulb temperature. Both
follow published performance curves, cubic in the outdoor dry-bulb t [°C] [1]::

    CapFT(t) = c1 + c2·t + c3·t² + c4·t³      (capacity ratio)
    EIRFT(t) = c1 + c2·t + c3·t² + c4·t³      (electric input ratio, 1/COP ratio)

normalised at the rating point of 47 °F (8.33 °C). Outside the curves' range of t the
curves are evaluated at the range's end (the usual convention for performance curves). They
are scaled to the rated figures [2]::

    Q(t)   = Q_47 · CapFT(t) / CapFT(t_47) · k_Q(t)
    COP(t) = COP_47 · EIRFT(t_47) / EIRFT(t) / k_E(t)

where k = 1 unless a rating at 17 °F (−8.33 °C) is also given: then k(t) = 1 + α·(t − t_47)
with α chosen so that Q(t_17) = Q_17 (and COP(t_17) = COP_17): the curve's shape between
and beyond the two rating points, through both of them.

Each bin of outdoor temperature t (hours n) asks for ``L = UA · max(0, T_balance − t) / η_dist``
(the house's load, grown by the duct losses). The heat pump covers ``min(L, Q(t))`` at COP(t)
(none below a cut-off temperature, when one is given); the rest comes from the electric
resistance backup at its efficiency (1 unless given)::

    E = Σ n · [min(L, Q) / COP + (L − min(L, Q)) / η_backup]

The seasonal COP is the heat delivered over the electricity used, backup included. Not
counted: cycling (part-load) losses, defrost beyond what the curves hold, the fan's power
beyond the rating.

HSPF to a rated COP at 47 °F: the regression of ASHRAE research project RP-1197 (with fan),
``COP_47 = −0.0255·HSPF² + 0.6239·HSPF`` [3]; HSPF2 (the 2023 test procedure) to HSPF:
``HSPF = HSPF2 / 0.85`` [4] (the ratio for ducted split systems; from memory).

References
----------
[1] building-energy-standards-data 0.3.3, ``support_performance_curves.json``: curves
    ``HPACHeatCapFT`` and ``HPACHeatEIRFT`` (DX heating coil, cubic in outdoor dry-bulb °C);
    copied in ``server/data/heat_pump_curves.json``.
[2] AHRI Standard 210/240: ratings at 47 °F and 17 °F outdoor dry-bulb (H1 and H3 tests).
[3] ASHRAE RP-1197 regression of COP (with fan) on HSPF, as used for ASHRAE Standard
    90.1 Appendix G modelling.
[4] 10 CFR 430 Subpart B, Appendix M1 (HSPF2); the 0.85 ratio of HSPF2 to HSPF for ducted
    systems from memory.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

from server.physics.units import HOUR_S, f_to_c

#: rating points [°C]: 47 °F and 17 °F (AHRI 210/240 [2])
T47_C = f_to_c(47.0)
T17_C = f_to_c(17.0)
#: HSPF2 / HSPF for ducted split systems [-] (from memory, see [4])
HSPF2_PER_HSPF = 0.85


@dataclass(frozen=True, slots=True)
class Cubic:
    """A cubic performance curve ``c1 + c2·x + c3·x² + c4·x³`` on [x_min, x_max]."""

    name: str
    coefficients: tuple[float, float, float, float]
    x_min: float
    x_max: float

    def __call__(self, x: float) -> float:
        """The curve at x, with x held inside [x_min, x_max] [1]."""
        x = min(max(x, self.x_min), self.x_max)
        c1, c2, c3, c4 = self.coefficients
        return c1 + x * (c2 + x * (c3 + x * c4))


@dataclass(frozen=True, slots=True)
class Curves:
    """Capacity ratio and electric input ratio curves, both of outdoor dry-bulb [°C]."""

    capacity: Cubic
    eir: Cubic


@dataclass(frozen=True, slots=True)
class HeatPumpRating:
    """Rated heating figures: capacity [W] and COP [-] at 47 °F, optionally at 17 °F.

    ``backup_efficiency`` [-] of the electric resistance backup; ``cutoff_c`` [°C]: below it
    the compressor is off and the backup carries the whole load (None: no cut-off).
    """

    capacity_47_w: float
    cop_47: float
    capacity_17_w: float | None = None
    cop_17: float | None = None
    backup_efficiency: float = 1.0
    cutoff_c: float | None = None


@dataclass(frozen=True, slots=True)
class HeatPumpSeason:
    """A heating season of the heat pump over the bins: heat [J], electricity [J], COP [-].

    ``seasonal_cop`` is None when the season asks for no heat. ``balance_point_c`` is the
    outdoor temperature where the heat pump's capacity meets the load [°C] (None when it
    meets it in every bin's range or the load is zero).
    """

    heat_j: float
    heat_pump_heat_j: float
    backup_heat_j: float
    electricity_j: float
    heat_pump_electricity_j: float
    backup_electricity_j: float
    seasonal_cop: float | None
    backup_share: float
    balance_point_c: float | None


def hspf_to_cop47(hspf: float) -> float:
    """Rated COP at 47 °F from HSPF [Btu/Wh] by the RP-1197 regression [3].

    ``COP_47 = −0.0255 · HSPF² + 0.6239 · HSPF`` (with fan), for HSPF 5 to 12.
    """
    if not (math.isfinite(hspf) and 5.0 <= hspf <= 12.0):
        raise ValueError("HSPF must be from 5 to 12 for the HSPF-to-COP relation")
    return -0.0255 * hspf * hspf + 0.6239 * hspf


def hspf2_to_hspf(hspf2: float) -> float:
    """HSPF [Btu/Wh] from HSPF2 [Btu/Wh]: ``HSPF = HSPF2 / 0.85`` [4] (from memory)."""
    if not (math.isfinite(hspf2) and hspf2 > 0):
        raise ValueError("HSPF2 must be greater than zero")
    return hspf2 / HSPF2_PER_HSPF


def _slope(ratio_at_17: float) -> float:
    """α of k(t) = 1 + α·(t − t_47) so that k(t_17) = ratio_at_17."""
    return (ratio_at_17 - 1.0) / (T17_C - T47_C)


def capacity_w(rating: HeatPumpRating, curves: Curves, outdoor_c: float) -> float:
    """Heating capacity [W] at outdoor dry-bulb ``outdoor_c`` [°C] [1], [2]."""
    shape = curves.capacity(outdoor_c) / curves.capacity(T47_C)
    q = rating.capacity_47_w * shape
    if rating.capacity_17_w is not None:
        at_17 = rating.capacity_47_w * curves.capacity(T17_C) / curves.capacity(T47_C)
        q *= 1.0 + _slope(rating.capacity_17_w / at_17) * (outdoor_c - T47_C)
    return max(q, 0.0)


def cop(rating: HeatPumpRating, curves: Curves, outdoor_c: float) -> float:
    """COP [-] at outdoor dry-bulb ``outdoor_c`` [°C] [1], [2]."""
    value = rating.cop_47 * curves.eir(T47_C) / curves.eir(outdoor_c)
    if rating.cop_17 is not None:
        at_17 = rating.cop_47 * curves.eir(T47_C) / curves.eir(T17_C)
        value /= 1.0 + _slope(at_17 / rating.cop_17) * (outdoor_c - T47_C)
    return value


def check_rating(rating: HeatPumpRating, curves: Curves) -> None:
    """Refuse a rating the bins cannot use (non-positive figures, a COP that turns ≤ 0)."""
    for value, name in (
        (rating.capacity_47_w, "the capacity at 47 °F"),
        (rating.cop_47, "the COP at 47 °F"),
    ):
        if not (math.isfinite(value) and value > 0):
            raise ValueError(f"{name} must be greater than zero")
    for maybe, name in (
        (rating.capacity_17_w, "the capacity at 17 °F"),
        (rating.cop_17, "the COP at 17 °F"),
    ):
        if maybe is not None and not (math.isfinite(maybe) and maybe > 0):
            raise ValueError(f"{name} must be greater than zero")
    if not (math.isfinite(rating.backup_efficiency) and 0 < rating.backup_efficiency <= 1):
        raise ValueError("the backup efficiency must be above 0 and at most 1")
    for t in (curves.eir.x_min, curves.eir.x_max, -40.0, 30.0):
        if not cop(rating, curves, t) > 0:
            raise ValueError(
                "the 17 °F rating makes the COP fall to zero within the weather's range"
            )


def season(
    rating: HeatPumpRating,
    curves: Curves,
    bins: Sequence[tuple[float, float]],
    ua_w_per_k: float,
    balance_c: float,
    distribution_efficiency: float = 1.0,
) -> HeatPumpSeason:
    """Heat and electricity of a heating season over temperature bins.

    Parameters
    ----------
    rating : HeatPumpRating
        Rated capacity [W] and COP [-].
    curves : Curves
        Capacity and EIR curves of outdoor dry-bulb [°C].
    bins : sequence of (float, float)
        (outdoor dry-bulb [°C], hours in the bin [h]).
    ua_w_per_k : float
        Whole-house conductance [W/K].
    balance_c : float
        Balance-point temperature [°C]: no load at or above it.
    distribution_efficiency : float
        η_dist of the ducts [-]: the heat pump delivers the load over it.

    Returns
    -------
    HeatPumpSeason
        ``E = Σ n·[min(L, Q)/COP + (L − min(L, Q))/η_backup]`` with
        ``L = UA·max(0, T_balance − t)/η_dist``.
    """
    check_rating(rating, curves)
    if not (math.isfinite(ua_w_per_k) and ua_w_per_k >= 0):
        raise ValueError("UA must be a finite number, zero or more")
    if not (math.isfinite(distribution_efficiency) and 0 < distribution_efficiency <= 1):
        raise ValueError("the distribution efficiency must be above 0 and at most 1")
    heat = hp_heat = backup = hp_elec = 0.0
    for t, hours in bins:
        if not (math.isfinite(t) and math.isfinite(hours) and hours >= 0):
            raise ValueError("each bin needs a finite temperature and hours of zero or more")
        load = ua_w_per_k * max(0.0, balance_c - t) / distribution_efficiency
        if load == 0 or hours == 0:
            continue
        off = rating.cutoff_c is not None and t < rating.cutoff_c
        covered = 0.0 if off else min(load, capacity_w(rating, curves, t))
        seconds = hours * HOUR_S
        heat += load * seconds
        hp_heat += covered * seconds
        backup += (load - covered) * seconds
        if covered > 0:
            hp_elec += covered / cop(rating, curves, t) * seconds
    backup_elec = backup / rating.backup_efficiency
    electricity = hp_elec + backup_elec
    return HeatPumpSeason(
        heat_j=heat,
        heat_pump_heat_j=hp_heat,
        backup_heat_j=backup,
        electricity_j=electricity,
        heat_pump_electricity_j=hp_elec,
        backup_electricity_j=backup_elec,
        seasonal_cop=heat / electricity if electricity > 0 else None,
        backup_share=backup / heat if heat > 0 else 0.0,
        balance_point_c=balance_point_c(
            rating, curves, ua_w_per_k, balance_c, distribution_efficiency
        ),
    )


def balance_point_c(
    rating: HeatPumpRating,
    curves: Curves,
    ua_w_per_k: float,
    balance_c: float,
    distribution_efficiency: float = 1.0,
) -> float | None:
    """Outdoor temperature [°C] where capacity meets the load, by bisection on [−60, T_bal].

    ``Q(t) = UA · (T_balance − t) / η_dist``; None when the heat pump covers the load down to
    −60 °C or there is no load.
    """
    if ua_w_per_k <= 0:
        return None

    def surplus(t: float) -> float:
        return (
            capacity_w(rating, curves, t) - ua_w_per_k * (balance_c - t) / distribution_efficiency
        )

    low, high = -60.0, balance_c
    if surplus(low) >= 0:
        return None
    for _ in range(80):
        mid = 0.5 * (low + high)
        if surplus(mid) >= 0:
            high = mid
        else:
            low = mid
    return 0.5 * (low + high)


def bins_from_hourly(
    temperatures_c: Sequence[float], width_k: float = 1.0
) -> list[tuple[float, float]]:
    """Hours per temperature bin [(centre °C, hours)] of an hourly dry-bulb series.

    Bin k holds the hours with ``centre − width/2 ≤ t < centre + width/2``, centres at whole
    multiples of ``width_k``; missing (NaN) hours are left out. Ascending by temperature.
    """
    if not (math.isfinite(width_k) and width_k > 0):
        raise ValueError("the bin width must be greater than zero")
    counts: dict[int, int] = {}
    for t in temperatures_c:
        if math.isfinite(t):
            k = math.floor(t / width_k + 0.5)
            counts[k] = counts.get(k, 0) + 1
    return [(k * width_k, float(n)) for k, n in sorted(counts.items())]
