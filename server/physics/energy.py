"""Annual heating and cooling energy of a house by the degree-day method.

SI inside: conductances in W/K, degree-days in K·day, energy in J. Where a formula is defined
in US customary units (infiltration, SEER) its docstring gives it in those units and the code
converts once at the edge with the constants of :mod:`server.physics.units`.

References
----------
[1] ASHRAE Handbook—Fundamentals (2021), ch. 19 "Energy Estimating and Modeling Methods",
    degree-day method: Q = UA · HDD · 24.
[2] M. Sherman, "Estimation of infiltration from leakage and climate indicators", Energy and
    Buildings 10 (1987), Lawrence Berkeley Laboratory: ACH_nat ≈ ACH50 / N, N ≈ 15-20
    (the "LBL N-factor", common practice).
[3] ASHRAE Handbook—Fundamentals (2021), ch. 16 "Ventilation and Infiltration": sensible
    load of air, q = 1.08 · cfm · ΔT [Btu/h], i.e. 0.018 Btu/(ft³·°F) · 60 min/h (common
    practice).
[4] AHRI Standard 210/240: SEER is seasonal cooling delivered per electricity used [Btu/Wh].
"""

from __future__ import annotations

import math

from server.physics.units import BTU_J, CUFT_M3, DELTA_F_K, HOUR_S

#: Volumetric heat capacity of air [Btu/(ft³·°F)] (common practice, ASHRAE HoF ch. 16 [3]).
AIR_HEAT_CAPACITY_IP = 0.018
#: The same in SI [J/(m³·K)] (= 1207 J/(m³·K) = 0.335 Wh/(m³·K)).
AIR_HEAT_CAPACITY_SI = AIR_HEAT_CAPACITY_IP * BTU_J / (CUFT_M3 * DELTA_F_K)
#: Seconds in a day [s/day].
DAY_S = 24.0 * HOUR_S
#: One cubic foot per minute [m³/s].
CFM_M3_PER_S = CUFT_M3 / 60.0


def _positive(value: float, name: str) -> float:
    if not math.isfinite(value) or value <= 0:
        raise ValueError(f"{name} must be a finite number greater than zero")
    return value


def _not_negative(value: float, name: str) -> float:
    if not math.isfinite(value) or value < 0:
        raise ValueError(f"{name} must be a finite number, zero or more")
    return value


def air_changes_at_50_pa(flow_at_50_pa_m3_per_s: float, volume_m3: float) -> float:
    """Air changes per hour at 50 Pa from the blower-door flow.

    Parameters
    ----------
    flow_at_50_pa_m3_per_s : float
        Leakage flow at 50 Pa depressurisation [m³/s] (CFM50 × 0.000471947).
    volume_m3 : float
        Conditioned volume [m³].

    Returns
    -------
    float
        ACH50 [1/h] = flow [m³/h] / volume [m³].
    """
    _not_negative(flow_at_50_pa_m3_per_s, "the leakage flow at 50 Pa")
    _positive(volume_m3, "the conditioned volume")
    return flow_at_50_pa_m3_per_s * HOUR_S / volume_m3


def infiltration_ua(flow_at_50_pa_m3_per_s: float, n_factor: float, volume_m3: float) -> float:
    """Conductance of natural infiltration [W/K] from a blower-door test.

    In the formula's own (IP) units [2], [3]::

        ACH_nat = ACH50 / N,   ACH50 = CFM50 · 60 / V
        UA_inf  = 0.018 · ACH_nat · V            [Btu/(h·°F)], V in ft³

    In SI: ``UA = c_air · (ACH50 / N) · V / 3600`` with c_air = 1207 J/(m³·K). The volume
    cancels when the flow is known (UA = c_air · flow50 / N); it matters only when the leakage
    was given as n50 (see :func:`flow_from_ach50`).

    Parameters
    ----------
    flow_at_50_pa_m3_per_s : float
        Leakage flow at 50 Pa [m³/s].
    n_factor : float
        LBL N-factor [-] (climate and exposure; typically 15-20, common practice).
    volume_m3 : float
        Conditioned volume [m³].

    Returns
    -------
    float
        Infiltration UA [W/K].

    Raises
    ------
    ValueError
        When a value is negative, zero where it cannot be, or not finite.
    """
    _positive(n_factor, "the N-factor")
    ach_natural = air_changes_at_50_pa(flow_at_50_pa_m3_per_s, volume_m3) / n_factor
    return AIR_HEAT_CAPACITY_SI * ach_natural * volume_m3 / HOUR_S


def infiltration_ua_ip(cfm50: float, n_factor: float, volume_ft3: float) -> float:
    """The same as :func:`infiltration_ua` in IP units [Btu/(h·°F)].

    ``UA = 0.018 [Btu/(ft³·°F)] · (CFM50 · 60 / V / N) [1/h] · V [ft³]`` ([2], [3]).

    Parameters
    ----------
    cfm50 : float
        Leakage flow at 50 Pa [ft³/min].
    n_factor : float
        LBL N-factor [-].
    volume_ft3 : float
        Conditioned volume [ft³].
    """
    _not_negative(cfm50, "CFM50")
    _positive(n_factor, "the N-factor")
    _positive(volume_ft3, "the conditioned volume")
    return AIR_HEAT_CAPACITY_IP * (cfm50 * 60.0 / volume_ft3 / n_factor) * volume_ft3


def flow_from_ach50(ach50: float, volume_m3: float) -> float:
    """Leakage flow at 50 Pa [m³/s] from n50 (ACH50) [1/h] and volume [m³]: V · n50 / 3600."""
    _not_negative(ach50, "n50 (ACH50)")
    _positive(volume_m3, "the conditioned volume")
    return ach50 * volume_m3 / HOUR_S


def degree_day_load(ua_w_per_k: float, degree_days_k_day: float) -> float:
    """Annual heating (or sensible cooling) load by the degree-day method [J].

    ``Q = UA · DD · 24 h`` [1]; in IP ``Q [Btu] = UA [Btu/(h·°F)] · HDD [°F·day] · 24``,
    in SI ``Q [J] = UA [W/K] · DD [K·day] · 86 400 s/day``.

    Parameters
    ----------
    ua_w_per_k : float
        Whole-house conductance, envelope plus infiltration [W/K].
    degree_days_k_day : float
        Heating (or cooling) degree-days at the house's balance base [K·day].

    Returns
    -------
    float
        Annual load [J].
    """
    _not_negative(ua_w_per_k, "UA")
    _not_negative(degree_days_k_day, "degree-days")
    return ua_w_per_k * degree_days_k_day * DAY_S


def fuel_use(load_j: float, efficiency: float, energy_per_unit_j: float) -> float:
    """Fuel bought to meet a load [fuel units].

    ``fuel = Q / (η · E_unit)``: η is the seasonal efficiency (AFUE as a fraction, or the
    seasonal COP of a heat pump) and E_unit the energy per unit of sale (therm, gallon, kWh).

    Parameters
    ----------
    load_j : float
        Annual heat the system must deliver [J].
    efficiency : float
        Seasonal efficiency or COP [-], greater than zero.
    energy_per_unit_j : float
        Energy content of one unit of sale [J/unit].

    Returns
    -------
    float
        Fuel [units of sale].
    """
    _not_negative(load_j, "the heating load")
    _positive(efficiency, "the efficiency")
    _positive(energy_per_unit_j, "the energy per fuel unit")
    return load_j / (efficiency * energy_per_unit_j)


def cooling_electricity_seer(load_j: float, seer: float) -> float:
    """Electricity for a sensible cooling load with a SEER rating [J].

    In IP: ``kWh = UA · CDD · 24 / (SEER · 1000)`` [1], [4]: the load in Btu divided by SEER
    [Btu/Wh] gives Wh. Here the load arrives in J: ``E = Q / BTU_J / SEER · 3600 J/Wh``.

    Parameters
    ----------
    load_j : float
        Annual sensible cooling load [J].
    seer : float
        Seasonal energy efficiency ratio [Btu/Wh].

    Returns
    -------
    float
        Electricity [J].
    """
    _not_negative(load_j, "the cooling load")
    _positive(seer, "SEER")
    return load_j / BTU_J / seer * HOUR_S


def cooling_electricity_cop(load_j: float, cop: float) -> float:
    """Electricity for a cooling load with a seasonal COP [J]: ``E = Q / COP``.

    In IP: ``kWh = UA · CDD · 24 / (COP · 3412.14)``.

    Parameters
    ----------
    load_j : float
        Annual sensible cooling load [J].
    cop : float
        Seasonal coefficient of performance [-].
    """
    _not_negative(load_j, "the cooling load")
    _positive(cop, "the cooling COP")
    return load_j / cop


def pipe_annual_loss(
    length_m: float, r_per_length_si: float, delta_t_k: float, hours_per_year: float
) -> float:
    """Annual heat lost by a pipe run in steady state [J].

    ``Q = L · ΔT / R' · hours · 3600 s/h`` with R' the per-length resistance of insulation
    and outer surface (cylindrical conduction, see :mod:`server.physics.pipe`). A fluid colder
    than its surroundings loses nothing here (ΔT taken as zero).

    Parameters
    ----------
    length_m : float
        Length of the run [m].
    r_per_length_si : float
        Per-length thermal resistance [m·K/W], greater than zero.
    delta_t_k : float
        Fluid minus ambient temperature while the fluid flows [K].
    hours_per_year : float
        Hours a year the pipe is hot [h], 0..8784.
    """
    _not_negative(length_m, "the pipe length")
    _positive(r_per_length_si, "the pipe's resistance per length")
    if not math.isfinite(delta_t_k):
        raise ValueError("the fluid-to-ambient temperature difference must be a finite number")
    if not math.isfinite(hours_per_year) or not 0 <= hours_per_year <= 8784:
        raise ValueError("hours per year must be from 0 to 8784")
    return length_m * max(delta_t_k, 0.0) / r_per_length_si * hours_per_year * HOUR_S


def design_heat_loss(ua_w_per_k: float, indoor_c: float, design_c: float) -> float:
    """Design heat loss [W]: steady conduction and air leakage at the design condition [1].

    ``Q_design = UA · (T_indoor − T_design)``, with UA the envelope and infiltration
    conductance and ``T_design`` the 99 % heating design dry-bulb temperature (ASHRAE
    Handbook—Fundamentals, climatic design conditions). Zero when the design temperature is
    not below the indoor one.

    Parameters
    ----------
    ua_w_per_k : float
        Whole-house conductance [W/K], at least 0.
    indoor_c : float
        Indoor design temperature [°C].
    design_c : float
        Outdoor heating design temperature [°C].
    """
    _not_negative(ua_w_per_k, "the UA")
    for value, name in ((indoor_c, "the indoor temperature"), (design_c, "the design temperature")):
        if not math.isfinite(value):
            raise ValueError(f"{name} must be a finite number")
    return ua_w_per_k * max(indoor_c - design_c, 0.0)


def capacity_ratio(output_capacity_w: float, design_heat_loss_w: float) -> float | None:
    """Heating equipment output capacity over the design heat loss [-].

    ``None`` when the design heat loss is zero (nothing to compare with).
    """
    _positive(output_capacity_w, "the output capacity")
    _not_negative(design_heat_loss_w, "the design heat loss")
    if design_heat_loss_w == 0:
        return None
    return output_capacity_w / design_heat_loss_w
