"""The whole house as plain data: apply upgrades, evaluate energy and money, compare options.

Everything is SI (m², W/(m²·K), W/K, m³/s, K·day, J); money is a plain number in the caller's
currency. A package is evaluated as ONE modified house: every upgrade of the package is applied
to a copy of the house and the copy is evaluated; savings are never added up from single
upgrades. Each package also reports the incremental savings of its upgrades in the package's
listed order: step i is what upgrade i saves on the house that already has upgrades 1..i-1,
so the steps add up to the package's savings exactly.

What the physics says about interaction: with the degree-day method at a fixed balance base
and fixed system efficiencies, the annual cost is linear in the whole-house UA (envelope +
infiltration) plus the pipe losses, and each upgrade changes one separate term. So savings of
upgrades on different surfaces (and air sealing, and pipe runs) are exactly additive here:
package savings = sum of single savings. The package is still computed as one house so that a
method with interaction (a balance point that moves with UA, a system resized) changes nothing
in the callers.

References
----------
[1] ASHRAE Handbook—Fundamentals (2021), ch. 19, degree-day method (see :mod:`.energy`).
[2] NIST Handbook 135 (1995), life-cycle costing (see :mod:`.economics`).
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field, replace

from server.physics import buffer_spaces as buffers
from server.physics import degree_days as dd
from server.physics import economics as money
from server.physics import energy, gains, pipe_runs
from server.physics import systems as sysm
from server.physics.fuels import GRID_ELECTRICITY_CO2_KG_PER_KWH, KWH_J, Fuel


@dataclass(frozen=True, slots=True)
class Surface:
    """One piece of the envelope: area [m²] and U-factor [W/(m²·K)], films included.

    ``adjacent`` is what lies behind it: ``"outdoors"``, ``"ground"`` or a buffer space's id
    (its UA is then b · U · A, see :mod:`.buffer_spaces`).
    """

    id: str
    kind: str
    area_m2: float
    u_si: float
    adjacent: str = buffers.OUTDOORS
    #: a window's solar heat gain coefficient [-] (0: no solar gain counted)
    shgc: float = 0.0
    #: mean irradiance on its plane over the heating days at each base of the climate's
    #: variable-base table [W/m²] (empty: no solar gain counted; see :mod:`.gains`)
    solar_w_per_m2: tuple[float, ...] = ()


@dataclass(frozen=True, slots=True)
class PipeRunLoss:
    """A pipe run: length [m], per-length resistance [m·K/W], fluid − ambient ΔT [K], hours/yr.

    ``service`` (heating_water, domestic_hot_water or None), ``location`` (conditioned,
    unconditioned, a space id or None), ``heating_season_share`` [-] (None: from the bins or
    7/12) and ``water_heater`` (domestic hot water) decide what share of the loss counts and
    who buys it (see :mod:`.pipe_runs`); ``emissivity`` [-] of its outer surface (for the
    record: ``r_per_length_si`` already holds its radiation term).
    """

    id: str
    length_m: float
    r_per_length_si: float
    delta_t_k: float
    hours_per_year: float
    service: str | None = None
    location: str | None = None
    heating_season_share: float | None = None
    water_heater: pipe_runs.WaterHeater | None = None


@dataclass(frozen=True, slots=True)
class AirLeakage:
    """Blower-door result: flow at 50 Pa [m³/s], LBL N-factor [-], conditioned volume [m³]."""

    flow50_m3_per_s: float
    n_factor: float
    volume_m3: float


@dataclass(frozen=True, slots=True)
class VariableBase:
    """Variable-base heating degree-days (ASHRAE Handbook—Fundamentals 2017, ch. 19).

    The balance point ``setpoint − gains / UA`` of each evaluated house picks the HDD from the
    table of degree-days by base (a better-insulated house has a lower balance point and so
    fewer heating degree-days).
    """

    setpoint_c: float
    internal_gains_w: float
    bases_c: tuple[float, ...]
    hdd_k_day: tuple[float, ...]


@dataclass(frozen=True, slots=True)
class Climate:
    """Heating and cooling degree-days [K·day] at the house's balance bases."""

    hdd_k_day: float
    cdd_k_day: float = 0.0
    variable_base: VariableBase | None = None

    def heating_degree_days(
        self, ua_w_per_k: float, solar: Sequence[gains.SolarTerm] = ()
    ) -> float:
        """HDD [K·day] for a house of total UA [W/K]: fixed, or at its balance point.

        ``solar`` holds the windows' solar terms (SHGC·A [m²], plane irradiance by base
        [W/m²]) that join the internal gains in the balance point (see :mod:`.gains`).
        """
        balance_c = self.balance_point_c(ua_w_per_k, solar)
        if balance_c is None:
            return self.hdd_k_day
        vb = self.variable_base
        assert vb is not None
        return dd.interpolate_degree_days(vb.bases_c, vb.hdd_k_day, balance_c)

    def balance_point_c(
        self, ua_w_per_k: float, solar: Sequence[gains.SolarTerm] = ()
    ) -> float | None:
        """Balance point [°C] with the variable base, held within its table; else None."""
        vb = self.variable_base
        if vb is None or ua_w_per_k <= 0:
            return None
        # a balance point beyond the table takes the table's end value (stated in the docs)
        return gains.balance_point_c(
            vb.setpoint_c, vb.internal_gains_w, ua_w_per_k, vb.bases_c, solar
        )


@dataclass(frozen=True, slots=True)
class Heating:
    """Heating system: fuel row, seasonal efficiency or COP [-], price [money/fuel unit].

    ``co2_kg_per_unit`` overrides the fuel's table factor [kg/fuel unit]; ``None`` takes the
    table's (or, for electric fuels, the house's electricity factor).
    """

    fuel: Fuel
    efficiency: float
    price_per_unit: float
    co2_kg_per_unit: float | None = None


@dataclass(frozen=True, slots=True)
class Cooling:
    """Cooling system: exactly one of SEER [Btu/Wh] or COP [-]; price [money/kWh]."""

    electricity_price_per_kwh: float
    seer: float | None = None
    cop: float | None = None


@dataclass(frozen=True, slots=True)
class Economics:
    """Discount rate, escalation [1/year], study period [years], optional loan (APR, months)."""

    discount_rate: float = 0.03
    escalation_rate: float = 0.0
    years: int = 20
    loan_apr: float | None = None
    loan_months: int | None = None


@dataclass(frozen=True, slots=True)
class House:
    """The whole house. ``electricity_co2_kg_per_kwh`` [kg/kWh] serves cooling and electric heat."""

    surfaces: tuple[Surface, ...]
    climate: Climate
    heating: Heating
    economics: Economics = Economics()
    air_leakage: AirLeakage | None = None
    cooling: Cooling | None = None
    pipe_runs: tuple[PipeRunLoss, ...] = ()
    electricity_co2_kg_per_kwh: float = GRID_ELECTRICITY_CO2_KG_PER_KWH
    spaces: tuple[buffers.BufferSpace, ...] = ()
    #: ducts, heat pump by bins, ventilation, altitude (None: none of them, see :mod:`.systems`)
    systems: sysm.Systems | None = None


@dataclass(frozen=True, slots=True)
class AssemblyUpgrade:
    """A new assembly on one surface: its U-factor [W/(m²·K)]; money in the caller's currency.

    ``shgc`` [-] is a window upgrade's new solar heat gain coefficient (None: unchanged).
    """

    id: str
    surface_id: str
    u_si: float
    installed_cost: float = 0.0
    rebate: float = 0.0
    life_years: float | None = None
    shgc: float | None = None


@dataclass(frozen=True, slots=True)
class AirSealingUpgrade:
    """Air sealing to a target flow at 50 Pa [m³/s]."""

    id: str
    flow50_after_m3_per_s: float
    installed_cost: float = 0.0
    rebate: float = 0.0
    life_years: float | None = None


@dataclass(frozen=True, slots=True)
class PipeInsulationUpgrade:
    """New insulation on one pipe run: its per-length resistance [m·K/W]."""

    id: str
    pipe_id: str
    r_per_length_si: float
    installed_cost: float = 0.0
    rebate: float = 0.0
    life_years: float | None = None


Upgrade = (
    AssemblyUpgrade
    | AirSealingUpgrade
    | PipeInsulationUpgrade
    | sysm.DuctSealingUpgrade
    | sysm.DuctInsulationUpgrade
)


@dataclass(frozen=True, slots=True)
class Package:
    """Upgrades done together, in the order their incremental savings are reported."""

    id: str
    upgrade_ids: tuple[str, ...]


def upgrade_target(upgrade: Upgrade) -> str:
    """What an upgrade changes: ``surface:<id>``, ``air``, ``pipe:<id>``, ``ducts:leakage`` or
    ``ducts:insulation`` (one per package)."""
    if isinstance(upgrade, sysm.DuctSealingUpgrade):
        return "ducts:leakage"
    if isinstance(upgrade, sysm.DuctInsulationUpgrade):
        return "ducts:insulation"
    if isinstance(upgrade, AssemblyUpgrade):
        return f"surface:{upgrade.surface_id}"
    if isinstance(upgrade, PipeInsulationUpgrade):
        return f"pipe:{upgrade.pipe_id}"
    return "air"


def apply_upgrades(house: House, upgrades: Sequence[Upgrade]) -> House:
    """A copy of ``house`` with every upgrade applied (the original is left as it was).

    Parameters
    ----------
    house : House
        The as-found house.
    upgrades : sequence of Upgrade
        New U [W/(m²·K)], leakage [m³/s] or pipe resistance [m·K/W], one per target.

    Returns
    -------
    House
        The modified house.

    Raises
    ------
    ValueError
        Two upgrades change the same surface, pipe run or air barrier; an upgrade names a
        surface or pipe run the house does not have; air sealing on a house without a
        blower-door figure, or to a flow above the as-found one.
    """
    seen: dict[str, str] = {}
    for upgrade in upgrades:
        target = upgrade_target(upgrade)
        if target in seen:
            raise ValueError(
                f"upgrades '{seen[target]}' and '{upgrade.id}' both change "
                f"{target.replace(':', ' ')}; a package can change each surface, pipe run "
                "or the air leakage only once"
            )
        seen[target] = upgrade.id
    surfaces = {s.id: s for s in house.surfaces}
    pipes = {p.id: p for p in house.pipe_runs}
    leakage = house.air_leakage
    systems = house.systems
    for upgrade in upgrades:
        if isinstance(upgrade, sysm.DuctSealingUpgrade | sysm.DuctInsulationUpgrade):
            if systems is None:
                raise ValueError(f"upgrade '{upgrade.id}': the house has no ducts described")
            systems = sysm.apply_duct_upgrade(systems, upgrade)
        elif isinstance(upgrade, AssemblyUpgrade):
            if upgrade.surface_id not in surfaces:
                raise ValueError(
                    f"upgrade '{upgrade.id}': there is no surface '{upgrade.surface_id}'"
                )
            found = surfaces[upgrade.surface_id]
            surfaces[upgrade.surface_id] = replace(
                found,
                u_si=upgrade.u_si,
                shgc=found.shgc if upgrade.shgc is None else upgrade.shgc,
            )
        elif isinstance(upgrade, PipeInsulationUpgrade):
            if upgrade.pipe_id not in pipes:
                raise ValueError(
                    f"upgrade '{upgrade.id}': there is no pipe run '{upgrade.pipe_id}'"
                )
            pipes[upgrade.pipe_id] = replace(
                pipes[upgrade.pipe_id], r_per_length_si=upgrade.r_per_length_si
            )
        else:
            if leakage is None:
                raise ValueError(f"upgrade '{upgrade.id}': the house has no air-leakage figure")
            if upgrade.flow50_after_m3_per_s > leakage.flow50_m3_per_s * (1 + 1e-12):
                raise ValueError(
                    f"upgrade '{upgrade.id}': the air-sealing target is leakier than the house"
                )
            leakage = replace(leakage, flow50_m3_per_s=upgrade.flow50_after_m3_per_s)
    return replace(
        house,
        surfaces=tuple(surfaces.values()),
        pipe_runs=tuple(pipes.values()),
        air_leakage=leakage,
        systems=systems,
    )


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


@dataclass(frozen=True, slots=True)
class Step:
    """One upgrade's share of a package: what it saves on the house with the ones before it."""

    upgrade_id: str
    annual_savings: float
    ua_reduction_w_per_k: float
    co2_avoided_kg: float


@dataclass(frozen=True, slots=True)
class OptionResult:
    """A package (or one upgrade alone) evaluated as one modified house."""

    id: str
    upgrade_ids: tuple[str, ...]
    energy: HouseEnergy
    appraisal: money.Appraisal
    co2_avoided_kg: float
    steps: tuple[Step, ...]
    warnings: tuple[str, ...] = field(default=())


@dataclass(frozen=True, slots=True)
class Comparison:
    """As-found house, each upgrade alone (in the given order) and each package."""

    as_found: HouseEnergy
    upgrades_alone: tuple[OptionResult, ...]
    packages: tuple[OptionResult, ...]


def evaluate_option(
    house: House, as_found: HouseEnergy, option_id: str, chosen: Sequence[Upgrade]
) -> OptionResult:
    """Evaluate ``chosen`` applied together to ``house`` (one modified house), with steps.

    Step i is the saving of upgrade i on the house that already has upgrades 1..i-1 (the
    listed order); the last step's house is the package's house.
    """
    if not chosen:
        raise ValueError(f"'{option_id}' has no upgrades")
    warnings: list[str] = []
    steps: list[Step] = []
    before = as_found
    for count, upgrade in enumerate(chosen, start=1):
        after = evaluate(apply_upgrades(house, chosen[:count]))
        steps.append(
            Step(
                upgrade_id=upgrade.id,
                annual_savings=before.total_cost - after.total_cost,
                ua_reduction_w_per_k=before.ua_w_per_k - after.ua_w_per_k,
                co2_avoided_kg=before.co2_kg - after.co2_kg,
            )
        )
        if before.total_cost - after.total_cost < 0:
            warnings.append(f"'{upgrade.id}' raises the yearly cost: check its new assembly")
        life = upgrade.life_years
        if life is not None and life < house.economics.years:
            warnings.append(
                f"'{upgrade.id}' is expected to last {life:g} years, less than the "
                f"{house.economics.years}-year study period; its savings are counted to the end "
                "of the period and no replacement cost is included"
            )
        before = after
    package_energy = before
    savings = as_found.total_cost - package_energy.total_cost
    econ = house.economics
    appraisal = money.appraise(
        installed_cost=sum(u.installed_cost for u in chosen),
        rebates=sum(u.rebate for u in chosen),
        annual_savings=savings,
        discount_rate=econ.discount_rate,
        escalation_rate=econ.escalation_rate,
        years=econ.years,
        loan_apr=econ.loan_apr,
        loan_months=econ.loan_months,
    )
    if appraisal.net_cost < 0:
        warnings.append("the rebates are larger than the installed cost")
    return OptionResult(
        id=option_id,
        upgrade_ids=tuple(u.id for u in chosen),
        energy=package_energy,
        appraisal=appraisal,
        co2_avoided_kg=as_found.co2_kg - package_energy.co2_kg,
        steps=tuple(steps),
        warnings=tuple(warnings),
    )


def compare(
    house: House,
    upgrades: Sequence[Upgrade],
    packages: Sequence[Package],
    *,
    upgrades_alone: bool = True,
) -> Comparison:
    """The as-found house, every upgrade alone and every package as one modified house.

    With ``upgrades_alone=False`` the single-upgrade houses are skipped (an empty
    ``upgrades_alone``): a page that shows only the packages saves most of the work.

    Raises
    ------
    ValueError
        Duplicate upgrade ids, a package naming an unknown upgrade, or any error of
        :func:`apply_upgrades`.
    """
    by_id: dict[str, Upgrade] = {}
    for upgrade in upgrades:
        if upgrade.id in by_id:
            raise ValueError(f"two upgrades are called '{upgrade.id}'")
        by_id[upgrade.id] = upgrade
    as_found = evaluate(house)
    alone = (
        tuple(evaluate_option(house, as_found, u.id, [u]) for u in upgrades)
        if upgrades_alone
        else ()
    )
    results = []
    for package in packages:
        missing = [name for name in package.upgrade_ids if name not in by_id]
        if missing:
            raise ValueError(f"package '{package.id}' names unknown upgrades: {', '.join(missing)}")
        chosen = [by_id[name] for name in package.upgrade_ids]
        results.append(evaluate_option(house, as_found, package.id, chosen))
    return Comparison(as_found=as_found, upgrades_alone=alone, packages=tuple(results))
