"""A year of the house: conductances, loads, fuel, money and CO2 by the degree-day method.

Everything is SI (W/K, J, K·day); money is a plain number in the caller's currency.

References
----------
[1] ASHRAE Handbook—Fundamentals (2021), ch. 19, degree-day method (see :mod:`.energy`).
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field

from server.physics import buffer_spaces as buffers
from server.physics import energy, gains, pipe_runs
from server.physics import systems as sysm
from server.physics.fuels import KWH_J
from server.physics.house_data import House


@dataclass(frozen=True, slots=True)
class HouseEnergy:
    """A year of the house: conductances [W/K], energy [J], fuel [units], money, CO2 [kg]."""

    ua_by_surface_w_per_k: Mapping[str, float]
    envelope_ua_w_per_k: float
    infiltration_ua_w_per_k: float
    ua_w_per_k: float
    heating_load_j: float
    pipe_loss_by_run_j: Mapping[str, float]
    pipe_loss_j: float
    heating_fuel_units: float
    heating_cost: float
    cooling_load_j: float
    cooling_electricity_kwh: float
    cooling_cost: float
    total_cost: float
    heating_co2_kg: float
    cooling_co2_kg: float
    co2_kg: float
    #: each buffer space's b, H_iu and H_ue in this house (ISO 13789, see :mod:`.buffer_spaces`)
    spaces: Mapping[str, buffers.SpaceFactors] = field(default_factory=dict)
    #: biogenic CO2 of wood heating [kg/year], apart from the fossil ``co2_kg``
    co2_biogenic_kg: float = 0.0
    #: what mechanical ventilation adds to the infiltration's UA [W/K] (in ``ua_w_per_k``)
    ventilation_ua_w_per_k: float = 0.0
    #: ducts, equipment, heat-pump season of this variant (None: no systems given)
    systems: sysm.SystemFigures | None = None
    #: each pipe run's loss that counts [J] (see :mod:`.pipe_runs`) and domestic hot water
    pipe_counted_by_run_j: Mapping[str, float] = field(default_factory=dict)
    water_heating_fuel_by_run: Mapping[str, float] = field(default_factory=dict)
    water_heating_cost: float = 0.0
    water_heating_co2_kg: float = 0.0
    #: heating degree-days used [K·day] and the balance point [°C] (None: the fixed base)
    hdd_k_day: float = 0.0
    balance_point_c: float | None = None
    #: each window's solar gain averaged over the heating days at the balance point [W]
    solar_gain_by_surface_w: Mapping[str, float] = field(default_factory=dict)


def _buffered(
    house: House, by_surface: dict[str, float]
) -> tuple[dict[str, float], dict[str, buffers.SpaceFactors]]:
    """Surfaces' UA after their buffer space's b, recomputed for this house (ISO 13789)."""
    if not house.spaces and all(s.adjacent == buffers.OUTDOORS for s in house.surfaces):
        return by_surface, {}
    adjacent = {s.id: s.adjacent for s in house.surfaces}
    return buffers.buffered_conductances(by_surface, adjacent, house.spaces)


def heating_co2_per_unit(house: House) -> float:
    """CO2 per unit of the heating fuel [kg/unit]: override, table, or the electricity factor."""
    heating = house.heating
    if heating.co2_kg_per_unit is not None:
        return heating.co2_kg_per_unit
    if heating.fuel.co2_kg_per_unit is not None:
        return heating.fuel.co2_kg_per_unit
    return house.electricity_co2_kg_per_kwh * heating.fuel.energy_per_unit_j / KWH_J


def evaluate(house: House) -> HouseEnergy:
    """Annual energy, cost and CO2 of ``house`` by the degree-day method [1].

    ``UA = Σ b·U·A + UA_inf`` (b = 1 outdoors, a buffer space's b recomputed for this house,
    see :mod:`.buffer_spaces`); heating ``Q = UA·HDD·24 h`` plus pipe losses, bought at the
    heating system's efficiency; cooling ``Q = UA·CDD·24 h`` (sensible only) at SEER or COP;
    cost = fuel × price + kWh × electricity price; CO2 = fuel × factor + kWh × grid factor.

    Parameters
    ----------
    house : House
        Surfaces [m², W/(m²·K)], leakage [m³/s, -, m³], degree-days [K·day], systems.

    Returns
    -------
    HouseEnergy
        UA [W/K], loads [J], fuel [fuel units], cooling [kWh], costs [money/year], CO2
        [kg/year].
    """
    by_surface = {s.id: s.u_si * s.area_m2 for s in house.surfaces}
    by_surface, spaces = _buffered(house, by_surface)
    envelope = sum(by_surface.values())
    leak = house.air_leakage
    infiltration = (
        0.0
        if leak is None
        else energy.infiltration_ua(leak.flow50_m3_per_s, leak.n_factor, leak.volume_m3)
    )
    infiltration, ventilation = sysm.air(house.systems, infiltration)
    ua = envelope + infiltration + ventilation
    solar = solar_terms(house)
    hdd = house.climate.heating_degree_days(ua, solar)
    heating_load = energy.degree_day_load(ua, hdd)
    pipes = {
        run.id: energy.pipe_annual_loss(
            run.length_m, run.r_per_length_si, run.delta_t_k, run.hours_per_year
        )
        for run in house.pipe_runs
    }
    pipe_total = sum(pipes.values())
    heating = house.heating
    space_b = {key: factors.b for key, factors in spaces.items()}
    balance_c = _balance_c(house, ua, solar)
    counted, water = _pipe_use(house, pipes, space_b, balance_c)
    figures = (
        None
        if house.systems is None
        else sysm.evaluate_systems(
            house.systems,
            ua_w_per_k=ua,
            infiltration_ua_w_per_k=infiltration,
            ventilation_ua_w_per_k=ventilation,
            hdd_k_day=hdd,
            balance_c=balance_c if balance_c is not None else house.systems.heating_base_c,
            space_b=space_b,
            efficiency=heating.efficiency,
        )
    )
    if figures is None and not water and counted == pipes:
        fuel = energy.fuel_use(
            heating_load + pipe_total, heating.efficiency, heating.fuel.energy_per_unit_j
        )
    else:  # Q_fuel = (Q_load / η_dist + Q_pipes,heating) / η_equipment (see :mod:`.systems`)
        duct = None if figures is None else figures.distribution
        eta_dist = 1.0 if duct is None else duct.efficiency
        eta = heating.efficiency if figures is None else figures.equipment_efficiency
        heating_pipes = sum(v for k, v in counted.items() if k not in water)
        fuel = energy.fuel_use(
            heating_load / max(eta_dist, 1e-9) + heating_pipes, eta, heating.fuel.energy_per_unit_j
        )
    water_fuel, water_cost, water_co2 = _water_heating(house, counted, water)
    heating_co2 = fuel * heating_co2_per_unit(house)
    # wood's CO2 is biogenic: reported apart from the fossil total (GHG inventory practice)
    biogenic_co2 = heating_co2 if heating.fuel.biogenic else 0.0
    heating_co2 -= biogenic_co2
    cooling_load = cooling_kwh = cooling_cost = 0.0
    if house.cooling is not None:
        cooling = house.cooling
        cooling_load = energy.degree_day_load(ua, house.climate.cdd_k_day)
        if cooling.seer is not None:
            electricity_j = energy.cooling_electricity_seer(cooling_load, cooling.seer)
        elif cooling.cop is not None:
            electricity_j = energy.cooling_electricity_cop(cooling_load, cooling.cop)
        else:
            raise ValueError("the cooling system needs a SEER or a COP")
        cooling_kwh = electricity_j / KWH_J
        cooling_cost = cooling_kwh * cooling.electricity_price_per_kwh
    cooling_co2 = cooling_kwh * house.electricity_co2_kg_per_kwh
    heating_cost = fuel * heating.price_per_unit
    return HouseEnergy(
        ua_by_surface_w_per_k=by_surface,
        envelope_ua_w_per_k=envelope,
        infiltration_ua_w_per_k=infiltration,
        ua_w_per_k=ua,
        heating_load_j=heating_load,
        pipe_loss_by_run_j=pipes,
        pipe_loss_j=pipe_total,
        heating_fuel_units=fuel,
        heating_cost=heating_cost,
        cooling_load_j=cooling_load,
        cooling_electricity_kwh=cooling_kwh,
        cooling_cost=cooling_cost,
        total_cost=heating_cost + cooling_cost + water_cost,
        heating_co2_kg=heating_co2,
        cooling_co2_kg=cooling_co2,
        co2_kg=heating_co2 + cooling_co2 + water_co2,
        spaces=spaces,
        co2_biogenic_kg=biogenic_co2,
        ventilation_ua_w_per_k=ventilation,
        systems=figures,
        pipe_counted_by_run_j=counted,
        water_heating_fuel_by_run=water_fuel,
        water_heating_cost=water_cost,
        water_heating_co2_kg=water_co2,
        hdd_k_day=hdd,
        balance_point_c=house.climate.balance_point_c(ua, solar),
        solar_gain_by_surface_w=_solar_gains(house, ua, solar),
    )


def _solar_gains(
    house: House, ua_w_per_k: float, solar: Sequence[gains.SolarTerm]
) -> dict[str, float]:
    """Each window's SHGC·A·Ē(t_bal) [W] at this variant's balance point."""
    vb = house.climate.variable_base
    balance = house.climate.balance_point_c(ua_w_per_k, solar)
    if vb is None or balance is None or not solar:
        return {}
    return {
        s.id: gains.solar_gain_w(vb.bases_c, [(s.shgc * s.area_m2, s.solar_w_per_m2)], balance)
        for s in house.surfaces
        if s.shgc > 0 and s.solar_w_per_m2
    }


def _balance_c(
    house: House, ua_w_per_k: float, solar: Sequence[gains.SolarTerm] = ()
) -> float | None:
    """Balance-point temperature of this variant [°C]: the variable base's (with the
    windows' solar terms), else the systems' heating base, else None (neither known)."""
    balance = house.climate.balance_point_c(ua_w_per_k, solar)
    if balance is not None:
        return balance
    return None if house.systems is None else house.systems.heating_base_c


def solar_terms(house: House) -> tuple[gains.SolarTerm, ...]:
    """Each window's (SHGC·A [m²], plane irradiance by base [W/m²]) when the house has a
    variable base; empty otherwise (see :mod:`.gains`)."""
    if house.climate.variable_base is None:
        return ()
    return tuple(
        (s.shgc * s.area_m2, s.solar_w_per_m2)
        for s in house.surfaces
        if s.shgc > 0 and s.solar_w_per_m2
    )


def _pipe_use(
    house: House, losses: Mapping[str, float], space_b: Mapping[str, float], balance_c: float | None
) -> tuple[dict[str, float], set[str]]:
    """Each run's counted loss [J] (see :mod:`.pipe_runs`) and the runs a water heater buys."""
    counted: dict[str, float] = {}
    water: set[str] = set()
    for run in house.pipe_runs:
        if run.location is None:
            b = None
        elif run.location == "conditioned":
            b = 0.0
        elif run.location == "unconditioned":
            b = 1.0
        else:
            b = space_b.get(run.location, 1.0)
        share = run.heating_season_share
        if share is None:
            share = sysm.heating_season_share(house.systems, balance_c)
        counted[run.id] = losses[run.id] * pipe_runs.counted_share(run.service, b, share)
        if run.service == pipe_runs.DOMESTIC_HOT_WATER and run.water_heater is not None:
            water.add(run.id)
    return counted, water


def _water_heating(
    house: House, counted: Mapping[str, float], water: set[str]
) -> tuple[dict[str, float], float, float]:
    """Fuel [units] per domestic-hot-water run, their cost and fossil CO2 [kg]."""
    fuel: dict[str, float] = {}
    cost = co2 = 0.0
    for run in house.pipe_runs:
        heater = run.water_heater
        if run.id not in water or heater is None:
            continue
        units = energy.fuel_use(counted[run.id], heater.efficiency, heater.fuel.energy_per_unit_j)
        fuel[run.id] = units
        cost += units * heater.price_per_unit
        if heater.co2_kg_per_unit is not None:
            factor = heater.co2_kg_per_unit
        elif heater.fuel.co2_kg_per_unit is not None:
            factor = heater.fuel.co2_kg_per_unit
        else:
            factor = house.electricity_co2_kg_per_kwh * heater.fuel.energy_per_unit_j / KWH_J
        if not heater.fuel.biogenic:
            co2 += units * factor
    return fuel, cost, co2
