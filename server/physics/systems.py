"""The heating system as it burns fuel: ducts, heat pump by bins, ventilation, pipe use.

One evaluated house (see :mod:`.house_model`) asks this module, for its own UA and buffer-space
factors b:

1. the air: natural infiltration at the altitude's air heat capacity plus what mechanical
   ventilation adds (:mod:`.ventilation`);
2. the distribution efficiency of its ducts, seasonal and at design (:mod:`.ducts`), with the
   temperature of each buffer space from its b in this variant;
3. the equipment's seasonal efficiency: the heating system's own figure, or a heat pump's
   seasonal COP from the temperature bins (:mod:`.heat_pump`) at this house's balance point;
4. the share of each pipe run's loss that counts, and who buys it (:mod:`.pipe_runs`).

The annual fuel is then ``(Q_load / η_dist + Q_pipes,heating) / η_equipment``. A house
without any of these inputs has η_dist = 1, no ventilation, its typed efficiency and pipes
counted in full, i.e. it computes exactly as before.

References
----------
[1] ANSI/ASHRAE Standard 152-2004 (see :mod:`.ducts`).
[2] ASHRAE Handbook—Fundamentals (2017), ch. 1 and 16 (see :mod:`.ventilation`).
[3] building-energy-standards-data performance curves (see :mod:`.heat_pump`).
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass, replace

from server.physics import ducts as duct_physics
from server.physics import heat_pump as hp
from server.physics import pipe_runs
from server.physics import ventilation as vent
from server.physics.energy import AIR_HEAT_CAPACITY_SI

#: days of the heating season when the seasonal mean outdoor temperature is estimated from
#: the degree-days alone: October to April, 212 days (common practice)
HEATING_SEASON_DAYS = 212.0


@dataclass(frozen=True, slots=True)
class Systems:
    """What a house says about its systems beyond fuel and seasonal efficiency (SI, °C).

    ``indoor_c`` is the indoor temperature of the duct calculation and the design load;
    ``season_outdoor_c`` the heating season's mean outdoor temperature (None: from ``bins``
    or the degree-days); ``design_outdoor_c`` the 99 % design dry-bulb (None: no design
    figures); ``heating_base_c`` the balance point when the climate has no variable base;
    ``bins`` (outdoor dry-bulb [°C], hours [h]); ``air_heat_capacity`` [J/(m³·K)].
    """

    indoor_c: float
    heating_base_c: float
    season_outdoor_c: float | None = None
    design_outdoor_c: float | None = None
    ducts: duct_physics.DuctSystem | None = None
    heat_pump: hp.HeatPumpRating | None = None
    curves: hp.Curves | None = None
    bins: tuple[tuple[float, float], ...] = ()
    ventilation: vent.MechanicalVentilation | None = None
    air_heat_capacity: float = AIR_HEAT_CAPACITY_SI
    #: elevation [m] the air heat capacity was taken at (None: sea level)
    elevation_m: float | None = None


@dataclass(frozen=True, slots=True)
class DuctSealingUpgrade:
    """Duct sealing: the supply and/or return leakage fraction after [-]."""

    id: str
    supply_leakage_after: float | None = None
    return_leakage_after: float | None = None
    installed_cost: float = 0.0
    rebate: float = 0.0
    life_years: float | None = None


@dataclass(frozen=True, slots=True)
class DuctInsulationUpgrade:
    """Duct insulation: the supply and/or return duct R after [m²·K/W]."""

    id: str
    supply_r_after: float | None = None
    return_r_after: float | None = None
    installed_cost: float = 0.0
    rebate: float = 0.0
    life_years: float | None = None


DuctUpgrade = DuctSealingUpgrade | DuctInsulationUpgrade


def apply_duct_upgrade(system: Systems, upgrade: DuctUpgrade) -> Systems:
    """``system`` with the upgrade's new leakage or R on its ducts."""
    if system.ducts is None:
        raise ValueError(f"upgrade '{upgrade.id}': the house has no ducts described")
    ducts = system.ducts
    supply, returns = ducts.supply, ducts.returns
    if isinstance(upgrade, DuctSealingUpgrade):
        if upgrade.supply_leakage_after is not None:
            supply = replace(supply, leakage_fraction=upgrade.supply_leakage_after)
        if upgrade.return_leakage_after is not None:
            returns = replace(returns, leakage_fraction=upgrade.return_leakage_after)
    else:
        if upgrade.supply_r_after is not None:
            supply = replace(supply, r_si=upgrade.supply_r_after)
        if upgrade.return_r_after is not None:
            returns = replace(returns, r_si=upgrade.return_r_after)
    return replace(system, ducts=replace(ducts, supply=supply, returns=returns))


@dataclass(frozen=True, slots=True)
class SystemFigures:
    """One house variant's systems: air [W/K], distribution, equipment, heat pump season."""

    infiltration_ua_w_per_k: float
    ventilation_ua_w_per_k: float
    distribution: duct_physics.Distribution | None
    design_distribution: duct_physics.Distribution | None
    season_outdoor_c: float | None
    equipment_efficiency: float
    heat_pump: hp.HeatPumpSeason | None
    balance_c: float


def season_outdoor_c(system: Systems, hdd_k_day: float, balance_c: float) -> float:
    """Heating season's mean outdoor temperature [°C]: given, from the bins, or estimated.

    From bins: the hours-weighted mean of the bins below the balance point. From degree-days:
    ``T_balance − HDD / 212 days`` (a heating season of October–April, common practice).
    """
    if system.season_outdoor_c is not None:
        return system.season_outdoor_c
    cold = [(t, n) for t, n in system.bins if t < balance_c and n > 0]
    hours = sum(n for _, n in cold)
    if hours > 0:
        return sum(t * n for t, n in cold) / hours
    return balance_c - hdd_k_day / HEATING_SEASON_DAYS


def heating_season_share(system: Systems | None, balance_c: float | None) -> float:
    """Share of a year's hours in the heating season [-]: bins below the balance point over
    all bin hours, else 7/12 (see :data:`.pipe_runs.DEFAULT_HEATING_SEASON_SHARE`)."""
    if system is None or not system.bins or balance_c is None:
        return pipe_runs.DEFAULT_HEATING_SEASON_SHARE
    total = sum(n for _, n in system.bins)
    cold = sum(n for t, n in system.bins if t < balance_c)
    return cold / total if total > 0 else pipe_runs.DEFAULT_HEATING_SEASON_SHARE


def air(system: Systems | None, infiltration_ua_sea_level: float) -> tuple[float, float]:
    """(infiltration UA, ventilation UA) [W/K] at the house's altitude [2].

    ``infiltration_ua_sea_level`` is ρc₀ · Q_inf (from :func:`.energy.infiltration_ua`);
    without ventilation and elevation it is returned unchanged.
    """
    if system is None or (system.ventilation is None and system.elevation_m is None):
        return infiltration_ua_sea_level, 0.0
    flow = infiltration_ua_sea_level / AIR_HEAT_CAPACITY_SI
    found = vent.air_conductance(flow, system.ventilation, system.air_heat_capacity)
    return found.infiltration_w_per_k, found.ventilation_w_per_k


def evaluate_systems(
    system: Systems,
    *,
    ua_w_per_k: float,
    infiltration_ua_w_per_k: float,
    ventilation_ua_w_per_k: float,
    hdd_k_day: float,
    balance_c: float,
    space_b: Mapping[str, float],
    efficiency: float,
) -> SystemFigures:
    """Distribution and equipment efficiency of one house variant [1], [3].

    Parameters
    ----------
    system : Systems
        The house's systems (SI, °C).
    ua_w_per_k : float
        Whole-house UA of this variant [W/K].
    infiltration_ua_w_per_k, ventilation_ua_w_per_k : float
        Its air conductances [W/K] (reported back).
    hdd_k_day : float
        Its heating degree-days [K·day].
    balance_c : float
        Its balance-point temperature [°C].
    space_b : mapping of str to float
        b of each buffer space in this variant [-].
    efficiency : float
        The heating system's typed seasonal efficiency or COP [-] (used without bins).
    """
    distribution = design = None
    season_c = None
    rho_c = system.air_heat_capacity
    if system.ducts is not None:
        season_c = season_outdoor_c(system, hdd_k_day, balance_c)
        distribution = duct_physics.distribution(
            system.ducts, system.indoor_c, season_c, space_b, rho_c
        )
        if distribution.delivery_effectiveness <= 0:
            raise ValueError("the ducts lose all the heat: check their leakage, R and area")
        if system.design_outdoor_c is not None:
            design = duct_physics.distribution(
                system.ducts, system.indoor_c, system.design_outdoor_c, space_b, rho_c
            )
    equipment = efficiency
    season = None
    if system.heat_pump is not None and system.curves is not None and system.bins:
        eta = 1.0 if distribution is None else max(distribution.efficiency, 1e-9)
        season = hp.season(system.heat_pump, system.curves, system.bins, ua_w_per_k, balance_c, eta)
        if season.seasonal_cop is not None and math.isfinite(season.seasonal_cop):
            equipment = season.seasonal_cop
    return SystemFigures(
        infiltration_ua_w_per_k=infiltration_ua_w_per_k,
        ventilation_ua_w_per_k=ventilation_ua_w_per_k,
        distribution=distribution,
        design_distribution=design,
        season_outdoor_c=season_c,
        equipment_efficiency=equipment,
        heat_pump=season,
        balance_c=balance_c,
    )
