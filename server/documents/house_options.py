"""A package, or one upgrade alone, in the calc/house result: money figures and steps."""

from __future__ import annotations

from typing import Literal

from pydantic import Field

from server.documents.bills import CalibratedFigures
from server.documents.house_ranges import RangeFigures
from server.documents.house_year import FiniteOut, HouseFigures


class StepFigures(FiniteOut):
    """What one upgrade saves on the house that already has the package's earlier upgrades."""

    upgrade: str
    annual_savings: float
    ua_reduction: float
    co2_avoided: float


class CashFlowFigures(FiniteOut):
    """Cumulative cash flow, year 0..N; the chart draws ``cumulative_discounted``."""

    years: list[int]
    cumulative: list[float]
    cumulative_discounted: list[float]
    chart: Literal["cumulative_discounted"] = "cumulative_discounted"


class OptionFigures(HouseFigures):
    """A package (or one upgrade alone) as one modified house, with its money figures."""

    id: str
    name: str
    upgrades: list[str]
    annual_savings: float = Field(
        description="a year at today's prices (the base date of NIST Handbook 135; later years escalate from it): as-found cost - this house's cost"
    )
    installed_cost: float
    rebates: float
    net_cost: float = Field(description="installed cost - rebates")
    simple_payback_years: float | None = Field(description="null when savings <= 0")
    cash_flow_payback_years: float | None = Field(
        description="crossing of the undiscounted cash flow (with escalation)"
    )
    discounted_payback_years: float | None
    present_value: float = Field(description="present value of the savings")
    npv: float
    sir: float | None = Field(description="null when net cost <= 0")
    monthly_loan_payment: float | None = Field(description="null when there is no loan")
    monthly_savings: float
    co2_avoided: float = Field(description="kg per year")
    heating_fuel_saved: float
    steps: list[StepFigures] = Field(description="incremental savings in the listed order")
    cash_flow: CashFlowFigures
    warnings: list[str] = []
    calibrated: CalibratedFigures | None = Field(
        default=None, description="with bills: the money figures with heating savings × ratio"
    )
    range: RangeFigures | None = Field(
        default=None,
        description="with uncertainty: P10 / P50 / P90 of the money figures and the chance it "
        "pays back (packages and best)",
    )
