"""The whole house as plain data: surfaces, pipe runs, air leakage, climate, systems, money.

Everything is SI (m², W/(m²·K), W/K, m³/s, K·day, J); money is a plain number in the caller's
currency. :mod:`.house_changes` changes a house, :mod:`.house_energy` evaluates its year and
:mod:`.house_model` compares options.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

from server.physics import buffer_spaces as buffers
from server.physics import degree_days as dd
from server.physics import gains, pipe_runs
from server.physics import systems as sysm
from server.physics.fuels import GRID_ELECTRICITY_CO2_KG_PER_KWH, Fuel


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
