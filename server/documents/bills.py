"""The bills document: request and result of ``POST /api/v1/calc/bills``, and the house's
``bills`` and ``calibration`` parts.

Every number is in the request's ``units`` (temperatures °F or °C, degree-days °F·day or
K·day, the apparent UA Btu/(h·°F) or W/K); ``use`` is in the fuel's own unit of sale (therm,
gallon, kWh, cord) in both systems. Decisions the contract left open:

* Dates are ISO ``YYYY-MM-DD`` text; a period runs from ``start`` (inclusive) to ``end``
  (exclusive), so its days are ``end − start``. Periods may come in any order; they are fitted
  in date order and must not overlap.
* ``daily_temperatures.values`` are consecutive daily means from ``start``; a ``null`` is a
  missing day. Every day of every period must have a value.
* Instead of daily temperatures, every period may give its heating degree-days ``hdd`` at a
  stated ``degree_day_base`` (typed from the bills or a weather service): the fit then takes
  that base as fixed (it cannot be searched) and counts two parameters (α, β), not three.
* ``source`` on a period and on ``daily_temperatures`` records where it came from; the fit
  does not use it.
* ``normal_temperatures`` (365 daily means of a typical year, 366 allowed) is optional on
  ``calc/bills`` (the normalised figures are then null) and required on a house.
* ``efficiency`` is optional: omitted, the apparent UA is computed at 1.0 (the fuel's energy
  per degree-hour, the upper bound for a combustion fuel) and a warning says so. On a house
  it defaults to the house's ``heating.efficiency``.
* ``cooling_term``: ``auto`` tries a cooling term for electric meters (``electricity``,
  ``electric_resistance``, ``heat_pump``) and keeps it when it lowers CV(RMSE); ``off`` never.
* ``cv_rmse`` and ``nmbe`` are in percent, as ASHRAE Guideline 14 defines them; ``r_squared``
  is a fraction.
"""

from __future__ import annotations

import re
from datetime import date
from typing import Annotated, Literal

from pydantic import BeforeValidator, ConfigDict, Field, ValidationInfo, field_validator

from server.documents.common import Out, Strict, Units

BillsFuel = Literal[
    "natural_gas",
    "propane",
    "heating_oil",
    "electric_resistance",
    "heat_pump",
    "wood",
    "electricity",
]
ModelName = Literal["heating", "heating_and_cooling", "cooling", "baseload"]
BillSource = Literal["typed", "pasted", "csv", "green_button"]

_ISO_DATE = re.compile(r"^\d{4}-\d{2}-\d{2}$")


def _iso_date(value: object) -> object:
    """Accept a date, or text written ``YYYY-MM-DD`` (nothing else: no numbers, no times)."""
    if isinstance(value, date):
        return value
    if not isinstance(value, str) or not _ISO_DATE.match(value):
        raise ValueError("must be a date written YYYY-MM-DD")
    try:
        return date.fromisoformat(value)
    except ValueError:
        raise ValueError(f"'{value}' is not a calendar date (YYYY-MM-DD)") from None


IsoDate = Annotated[date, BeforeValidator(_iso_date)]
#: a daily mean in °F or °C; the bound is generous for both (the service checks the units)
Temperature = Annotated[float, Field(ge=-150, le=200, allow_inf_nan=False)]


class BillPeriodIn(Strict):
    """One meter-read period: ``start`` (inclusive) to ``end`` (exclusive), use in fuel units."""

    start: IsoDate
    end: IsoDate
    use: Annotated[float, Field(ge=0, le=1e9, allow_inf_nan=False)]
    cost: Annotated[float, Field(ge=0, le=1e9, allow_inf_nan=False)] | None = None
    estimated: bool = Field(default=False, description="an estimated (not read) meter figure")
    hdd: Annotated[float, Field(ge=0, le=1e5, allow_inf_nan=False)] | None = Field(
        default=None,
        description="heating degree-days of the period at degree_day_base (°F·day or K·day), "
        "when typed instead of daily temperatures",
    )
    source: BillSource | None = Field(
        default=None, description="how the row came in: typed, pasted, csv or green_button"
    )


class DailyTemperaturesIn(Strict):
    """Consecutive daily mean temperatures from ``start``; ``null`` = a missing day."""

    start: IsoDate
    values: list[Temperature | None] = Field(min_length=1, max_length=40_000)
    source: Annotated[str, Field(max_length=300)] | None = Field(
        default=None, description="where the temperatures came from, in words"
    )


class NormalTemperaturesIn(Strict):
    """The typical year's daily mean temperatures (365, or 366)."""

    values: list[Temperature] = Field(min_length=365, max_length=366)


class BillsIn(Strict):
    """Bills of one fuel with the weather of their dates (the house's ``bills``: no units)."""

    fuel: BillsFuel | None = Field(
        default=None, description="required on calc/bills; on a house omitted = heating fuel"
    )
    periods: list[BillPeriodIn] = Field(min_length=1, max_length=400)
    daily_temperatures: DailyTemperaturesIn | None = Field(
        default=None, description="required unless every period gives hdd at degree_day_base"
    )
    degree_day_base: Temperature | None = Field(
        default=None,
        description="the base (°F or °C) of the degree-days typed on each period (hdd); the "
        "fit then takes this base instead of searching one",
    )
    normal_temperatures: NormalTemperaturesIn | None = None
    efficiency: Annotated[float, Field(gt=0, le=10, allow_inf_nan=False)] | None = Field(
        default=None,
        description="seasonal efficiency (AFUE fraction) or COP for the apparent UA; omitted = "
        "1.0 on calc/bills, the house's heating efficiency on a house",
    )
    cooling_term: Literal["auto", "off"] = "auto"

    @field_validator("efficiency")
    @classmethod
    def _efficiency_meaning(cls, value: float | None, info: ValidationInfo) -> float | None:
        fuel = info.data.get("fuel")
        if value is not None and fuel not in (None, "heat_pump") and value > 1:
            raise ValueError(
                f"for {fuel} give the efficiency as a fraction of at most 1 (0.80 for 80 %); "
                "only a heat pump takes a COP above 1"
            )
        return value


class BillsRequest(BillsIn):
    """``POST /api/v1/calc/bills``."""

    units: Units
    fuel: BillsFuel  # type: ignore[assignment]


# --- result ------------------------------------------------------------------------------------


class FiniteParts(Out):
    """Result parts refuse infinity and NaN as they are built."""

    model_config = ConfigDict(extra="ignore", allow_inf_nan=False)


class CriterionOut(FiniteParts):
    """One published criterion applied to the fit."""

    name: str
    source: str
    statistic: Literal["cv_rmse", "nmbe"]
    limit: float = Field(description="percent; the statistic's absolute value must not exceed it")
    value: float | None = Field(description="percent; null when it cannot be computed")
    met: bool | None = Field(description="null when the statistic cannot be computed")


class BillPeriodOut(FiniteParts):
    """One period as fitted."""

    start: date
    end: date
    days: int
    use: float
    estimated: bool
    hdd: float = Field(description="heating degree-days at base_temperature (0 without it)")
    cdd: float = Field(description="cooling degree-days at cooling_base_temperature")
    predicted: float = Field(description="the fit's use for the period")
    residual: float = Field(description="use − predicted")


class BillsResult(FiniteParts):
    """What the bills say: PRISM-style variable-base regression with Guideline 14 statistics."""

    units: Units
    fuel: str
    fuel_unit: str
    model: ModelName = Field(
        description="heating (α + β HDD), heating_and_cooling, cooling, or baseload (no signal)"
    )
    base_temperature: float | None = Field(description="τ, °F or °C; null without heating")
    base_temperature_searched: bool = Field(
        description="false when τ was fixed at 65 °F / 18.3 °C (two periods) or at the "
        "degree_day_base of typed degree-days"
    )
    baseload_per_day: float = Field(description="α, fuel units per day")
    heating_slope: float = Field(description="β, fuel units per °F·day or K·day")
    heating_slope_std_error: float | None
    cooling_slope: float | None = Field(default=None, description="fuel units per degree-day")
    cooling_slope_std_error: float | None = None
    cooling_base_temperature: float | None = None
    r_squared: float | None = Field(description="weighted R² of the per-day regression")
    cv_rmse: float | None = Field(description="percent, Guideline 14 (n − p)")
    nmbe: float | None = Field(description="percent, Guideline 14 (n − p); measured − model")
    parameters: int = Field(description="p: model parameters counted, τ included when searched")
    periods_used: int
    days: int = Field(description="days in the periods")
    normal_days: int | None = None
    heating_degree_days_normal: float | None = Field(
        default=None, description="HDD of the normal year at base_temperature"
    )
    cooling_degree_days_normal: float | None = None
    normalized_annual_use: float | None = Field(
        description="N α + β HDD_normal(τ) (+ γ CDD_normal), fuel units per year"
    )
    normalized_annual_heating_use: float | None = Field(description="β HDD_normal(τ)")
    normalized_annual_baseload: float | None = None
    efficiency: float = Field(description="the efficiency used for the apparent UA")
    heating_ua_equivalent: float = Field(
        description="β × energy per fuel unit × efficiency / 24 h: Btu/(h·°F) or W/K"
    )
    criteria: list[CriterionOut]
    criteria_met: bool | None = Field(description="every criterion met (null: not computable)")
    periods: list[BillPeriodOut]
    method: str
    warnings: list[str] = []


class CalibrationFigures(FiniteParts):
    """The as-found model against the house's bills (heating fuel units per year)."""

    bills_heating_use: float = Field(description="the bills' normalised annual heating use")
    model_heating_use: float = Field(description="the as-found model's annual heating fuel")
    ratio: float | None = Field(description="bills / model; null when the model uses none")
    fuel_unit: str
    fit: BillsResult
    warnings: list[str] = []


class CalibratedFigures(FiniteParts):
    """A package's money figures with its heating-fuel savings scaled by the ratio."""

    ratio: float
    heating_fuel_saved: float = Field(description="the model's heating fuel saved × ratio")
    heating_savings: float = Field(description="money: the model's heating savings × ratio")
    other_savings: float = Field(description="money: the other savings (cooling), unchanged")
    annual_savings: float
    simple_payback_years: float | None
    present_value: float
    npv: float
    sir: float | None
    monthly_savings: float
