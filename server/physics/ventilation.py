"""Air: mechanical ventilation with heat recovery, altitude, and the N-factor table.

Mechanical ventilation [1] (ch. 16, "Combining residential infiltration and mechanical
ventilation"; from memory): a balanced system (HRV, ERV: as much air in as out) adds to the
natural infiltration; an unbalanced one (an exhaust or a supply fan) pressurises or
depressurises the house and combines with infiltration in quadrature::

    Q_total = Q_balanced + sqrt(Q_unbalanced² + Q_infiltration²)

The sensible heat of the balanced air passes through the recovery core with sensible
recovery efficiency ε, so the whole air conductance is::

    UA_air = ρc · [Q_balanced · (1 − ε) + sqrt(Q_unbalanced² + Q_infiltration²)]

and what the ventilation adds to the natural infiltration's ``ρc · Q_infiltration`` is
reported apart (:func:`air_conductance`).

Altitude: the air's volumetric heat capacity ρc falls with the pressure (ideal gas at the
same temperature), ``ρc(z) = ρc₀ · p(z) / p₀`` with the standard atmosphere [1] (ch. 1,
eq. 3)::

    p(z) = 101.325 kPa · (1 − 2.25577·10⁻⁵ · z)^5.2559      (z in m)

ρc₀ = 0.018 Btu/(ft³·°F) (1207 J/(m³·K)) is the sea-level figure of :mod:`.energy`.

The N-factor (ACH_nat = ACH50 / N) by climate zone, height and shielding: the LBL table [2],
as tabulated for ASHRAE Standard 136 practice (values from memory: normal shielding, one
storey: zone 1 15.5, zone 2 18.5, zone 3 21.5, zone 4 24.5; well shielded ×1.2, exposed ×0.9;
1.5 storeys ×0.9, 2 ×0.8, 3 ×0.7; rounded to 0.1 as printed).

References
----------
[1] ASHRAE Handbook—Fundamentals (2017), ch. 1 "Psychrometrics" eq. 3 (standard atmosphere)
    and ch. 16 "Ventilation and Infiltration" (superposition of unbalanced and balanced flows
    with infiltration; sensible load q = ρc · Q · ΔT).
[2] M. Sherman, "Estimation of infiltration from leakage and climate indicators", Energy and
    Buildings 10 (1987), Lawrence Berkeley Laboratory: the N-factor table by climate zone
    (1–4), number of storeys and shielding.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from server.physics.energy import AIR_HEAT_CAPACITY_SI

#: standard atmospheric pressure at sea level [Pa] [1]
SEA_LEVEL_PA = 101325.0
#: kinds of mechanical ventilation: balanced ones recover heat
BALANCED_KINDS = ("hrv", "erv")
UNBALANCED_KINDS = ("exhaust", "supply")

#: the LBL N-factor table [2] (from memory): zone -> shielding -> N for 1, 1.5, 2, 3 storeys
N_FACTOR_TABLE: dict[int, dict[str, tuple[float, float, float, float]]] = {
    1: {"well_shielded": (18.6, 16.7, 14.9, 13.0), "normal": (15.5, 14.0, 12.4, 10.9),
        "exposed": (14.0, 12.6, 11.2, 9.8)},
    2: {"well_shielded": (22.2, 20.0, 17.8, 15.5), "normal": (18.5, 16.7, 14.8, 13.0),
        "exposed": (16.7, 15.0, 13.3, 11.7)},
    3: {"well_shielded": (25.8, 23.2, 20.6, 18.1), "normal": (21.5, 19.4, 17.2, 15.1),
        "exposed": (19.4, 17.4, 15.5, 13.5)},
    4: {"well_shielded": (29.4, 26.5, 23.5, 20.6), "normal": (24.5, 22.1, 19.6, 17.2),
        "exposed": (22.1, 19.8, 17.6, 15.4)},
}  # fmt: skip
N_FACTOR_STOREYS = (1.0, 1.5, 2.0, 3.0)
N_FACTOR_SOURCE = (
    "LBL N-factor table (M. Sherman, Energy and Buildings 10, 1987; as tabulated for ASHRAE "
    "Standard 136 practice), by climate zone, storeys and shielding; values from memory"
)


@dataclass(frozen=True, slots=True)
class MechanicalVentilation:
    """A ventilation system: kind, air flow [m³/s], sensible recovery efficiency [-].

    ``kind`` is ``hrv`` or ``erv`` (balanced, with recovery) or ``exhaust`` or ``supply``
    (unbalanced, no recovery).
    """

    kind: str
    flow_m3_per_s: float
    sensible_recovery: float = 0.0


@dataclass(frozen=True, slots=True)
class AirConductance:
    """Infiltration's UA alone and what the ventilation adds to it [W/K]."""

    infiltration_w_per_k: float
    ventilation_w_per_k: float
    combined_flow_m3_per_s: float


def standard_pressure_pa(elevation_m: float) -> float:
    """Standard-atmosphere pressure [Pa] at ``elevation_m`` [m] [1] (ch. 1, eq. 3).

    ``p = 101 325 · (1 − 2.25577·10⁻⁵ · z)^5.2559``, for −500 m to 11 000 m.
    """
    if not (math.isfinite(elevation_m) and -500.0 <= elevation_m <= 11000.0):
        raise ValueError("the elevation must be from −500 m to 11,000 m")
    return SEA_LEVEL_PA * (1.0 - 2.25577e-5 * elevation_m) ** 5.2559


def air_heat_capacity_si(elevation_m: float | None) -> float:
    """Volumetric heat capacity of air [J/(m³·K)] at an elevation [m] (sea level: None).

    ``ρc(z) = ρc₀ · p(z) / p₀`` with ρc₀ = 1207 J/(m³·K) [1].
    """
    if elevation_m is None:
        return AIR_HEAT_CAPACITY_SI
    return AIR_HEAT_CAPACITY_SI * standard_pressure_pa(elevation_m) / SEA_LEVEL_PA


def combined_flow(
    infiltration_m3_per_s: float, balanced_m3_per_s: float, unbalanced_m3_per_s: float
) -> float:
    """Total outdoor air flow [m³/s]: ``Q_bal + sqrt(Q_unbal² + Q_inf²)`` [1] (ch. 16)."""
    for value in (infiltration_m3_per_s, balanced_m3_per_s, unbalanced_m3_per_s):
        if not (math.isfinite(value) and value >= 0):
            raise ValueError("air flows must be finite numbers, zero or more")
    return balanced_m3_per_s + math.hypot(unbalanced_m3_per_s, infiltration_m3_per_s)


def air_conductance(
    infiltration_m3_per_s: float,
    ventilation: MechanicalVentilation | None,
    rho_c: float = AIR_HEAT_CAPACITY_SI,
) -> AirConductance:
    """Infiltration UA and the ventilation's addition [W/K] [1].

    ``UA_air = ρc · [Q_bal · (1 − ε) + sqrt(Q_unbal² + Q_inf²)]``; the infiltration part is
    ``ρc · Q_inf`` and the ventilation part the rest (zero without ventilation).

    Parameters
    ----------
    infiltration_m3_per_s : float
        Natural infiltration [m³/s] (ACH_nat · V / 3600).
    ventilation : MechanicalVentilation or None
        The system [m³/s, -].
    rho_c : float
        Volumetric heat capacity of air [J/(m³·K)].
    """
    if not (math.isfinite(rho_c) and rho_c > 0):
        raise ValueError("the air's heat capacity must be greater than zero")
    infiltration = rho_c * infiltration_m3_per_s
    if ventilation is None:
        return AirConductance(infiltration, 0.0, infiltration_m3_per_s)
    flow, eff = ventilation.flow_m3_per_s, ventilation.sensible_recovery
    if not (math.isfinite(eff) and 0 <= eff < 1):
        raise ValueError("the sensible recovery efficiency must be from 0 to below 1")
    if ventilation.kind in BALANCED_KINDS:
        balanced, unbalanced = flow, 0.0
    elif ventilation.kind in UNBALANCED_KINDS:
        if eff:
            raise ValueError("an exhaust or supply fan recovers no heat: its efficiency is 0")
        balanced, unbalanced = 0.0, flow
    else:
        raise ValueError(f"unknown ventilation kind '{ventilation.kind}'")
    total = combined_flow(infiltration_m3_per_s, balanced, unbalanced)
    ua = rho_c * (balanced * (1 - eff) + math.hypot(unbalanced, infiltration_m3_per_s))
    return AirConductance(infiltration, ua - infiltration, total)


def n_factor(zone: int, storeys: float, shielding: str) -> float:
    """The LBL N-factor [-] for a climate zone (1–4), storeys (1, 1.5, 2, 3), shielding [2].

    Storeys between the tabulated ones are interpolated linearly; above 3 take 3.
    """
    if zone not in N_FACTOR_TABLE:
        raise ValueError("the N-factor climate zone must be 1, 2, 3 or 4")
    row = N_FACTOR_TABLE[zone].get(shielding)
    if row is None:
        raise ValueError("shielding must be well_shielded, normal or exposed")
    if not (math.isfinite(storeys) and storeys >= 1):
        raise ValueError("the number of storeys must be 1 or more")
    s = min(storeys, N_FACTOR_STOREYS[-1])
    for (s0, n0), (s1, n1) in zip(
        zip(N_FACTOR_STOREYS, row, strict=True),
        zip(N_FACTOR_STOREYS[1:], row[1:], strict=True),
        strict=False,
    ):
        if s0 <= s <= s1:
            return n0 + (n1 - n0) * (s - s0) / (s1 - s0)
    return row[-1]
