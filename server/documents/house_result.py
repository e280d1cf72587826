"""The calc/house result: as found, each package and upgrade alone, the fuel and the best set."""

from __future__ import annotations

from pydantic import Field

from server.documents.bills import CalibrationFigures
from server.documents.common import Units
from server.documents.house_options import OptionFigures
from server.documents.house_ranges import UncertaintyFigures
from server.documents.house_year import FiniteOut, HouseFigures


class FuelFigures(FiniteOut):
    """The fuel row used, with its sources."""

    fuel: str
    label: str
    unit: str
    energy_per_unit: float = Field(description="Btu (ip) or kWh (si) per fuel unit")
    energy_source: str
    co2_per_unit: float = Field(description="kg per fuel unit")
    co2_source: str
    efficiency_meaning: str
    electricity_co2_per_kwh: float
    electricity_co2_source: str


class FrontierPoint(FiniteOut):
    """One set on the cost/benefit frontier: its upgrades, net cost, objective and figures."""

    upgrades: list[str] = Field(description="in document order; empty = no upgrade")
    net_cost: float
    objective_value: float = Field(description="the optimised objective of this set")
    annual_savings: float
    npv: float
    sir: float | None = Field(description="null when net cost <= 0")
    co2_avoided: float = Field(description="kg per year")
    installed_cost: float
    rebates: float
    simple_payback_years: float | None = Field(description="null when savings <= 0")
    total_cost: float = Field(description="yearly energy cost of this house")
    ua: float = Field(description="envelope + infiltration, per degree")


class OptimizationFigures(FiniteOut):
    """How ``best`` and ``frontier`` were found, and whether the answer is proven exact."""

    objective: str
    objective_meaning: str
    budget: float | None = Field(description="null = no budget")
    objective_value: float = Field(description="the best set's objective (0 for no upgrade)")
    best_is_no_upgrade: bool
    exact: bool = Field(description="true: the true optimum over every allowed set")
    method: str = Field(description="milp, milp_piecewise, enumeration or milp_bound")
    method_meaning: str
    upper_bound: float | None = Field(
        description="when not exact: a value no allowed set's objective can exceed"
    )
    sets: int = Field(description="number of allowed sets of upgrades")
    frontier_capped: bool
    warnings: list[str] = []


class HouseResult(FiniteOut):
    """As found, each package, and each upgrade alone."""

    units: Units
    currency: str
    as_found: HouseFigures
    packages: list[OptionFigures]
    upgrades: list[OptionFigures] = Field(description="each upgrade alone, in document order")
    fuel: FuelFigures
    analysis_years: int
    step_order: str
    assumptions: list[str]
    degree_day_basis: str = Field(
        default="",
        description="how the heating degree-days were chosen: the fixed base, or the variable "
        "base with the gains it counts",
    )
    warnings: list[str] = []
    calibration: CalibrationFigures | None = Field(
        default=None, description="with bills: the as-found model against the bills"
    )
    best: OptionFigures | None = Field(
        default=None,
        description="with optimize: the best set within the budget, computed as a package; null "
        "without optimize or when no upgrade is best (optimization.best_is_no_upgrade)",
    )
    frontier: list[FrontierPoint] | None = Field(
        default=None,
        description="with optimize: the sets no other set beats on both net cost and the "
        "objective, ascending by net cost",
    )
    optimization: OptimizationFigures | None = Field(
        default=None, description="with optimize: how best and frontier were found"
    )
    uncertainty: UncertaintyFigures | None = Field(
        default=None, description="with uncertainty: the inputs, spreads and sources of range"
    )
