"""The climate of the house document: degree-days, the variable base and design conditions."""

from __future__ import annotations

from typing import Annotated

from pydantic import Field, ValidationInfo, field_validator, model_validator

from server.documents.common import Number, Strict, document_units
from server.documents.house_fields import DEGREE_DAYS
from server.documents.solar import SolarIn
from server.documents.systems import TemperatureBinIn


class DegreeDaysRowIn(Strict):
    """Degree-days at one base (°F / °C; °F·day / K·day)."""

    base: Annotated[float, Field(ge=-60, le=120, allow_inf_nan=False)]
    hdd: Annotated[float, Field(ge=0, le=30000, allow_inf_nan=False)]
    cdd: Annotated[float, Field(ge=0, le=30000, allow_inf_nan=False)] = 0.0


class VariableBaseIn(Strict):
    """Variable-base heating degree-days: HDD at each option's balance point.

    balance point = setpoint − internal_gains / UA (ASHRAE Handbook—Fundamentals 2017 ch. 19);
    ``table`` is degree-days by base, e.g. ``degree_days_by_base`` of /calc/degree-days.
    """

    setpoint: Annotated[float, Field(ge=-60, le=120, allow_inf_nan=False)] | None = Field(
        default=None,
        description="thermostat set-point, °F or °C; omitted = 68 °F / 20 °C (ANSI/RESNET/ICC "
        "301 reference heating set-point, from memory)",
    )
    internal_gains: Annotated[float, Field(ge=0, le=1e7, allow_inf_nan=False)] | None = Field(
        default=None,
        description="average internal and solar gains typed as one figure, Btu/h or W (the "
        "windows' solar gains are then not added); omitted = the house's internal_gains (or "
        "the ANSI/RESNET/ICC 301 default from floor_area and bedrooms) plus each window's "
        "solar gain from climate.solar",
    )
    table: list[DegreeDaysRowIn] = Field(min_length=2, max_length=200)

    @model_validator(mode="after")
    def _ascending(self) -> VariableBaseIn:
        bases = [row.base for row in self.table]
        if any(b <= a for a, b in zip(bases, bases[1:], strict=False)):
            raise ValueError("the degree-day table's bases must be in ascending order")
        return self


class ClimateIn(Strict):
    """Degree-days at the house's balance bases (the bases are recorded, not used).

    With ``variable_base`` the heating degree-days of each option come from its balance point
    instead of ``hdd``.
    """

    hdd: Annotated[float, Field(ge=0, allow_inf_nan=False)]
    cdd: Annotated[float, Field(ge=0, allow_inf_nan=False)] = 0.0
    heating_base: Number | None = None
    cooling_base: Number | None = None
    variable_base: VariableBaseIn | None = None
    solar: SolarIn | None = Field(
        default=None,
        description="heating-day irradiation by base of the weather file (solar of "
        "/calc/degree-days): with variable_base, each window's solar gain sets the balance point",
    )

    @field_validator("hdd", "cdd")
    @classmethod
    def _degree_days_span(cls, value: float, info: ValidationInfo) -> float:
        return DEGREE_DAYS.check(value, document_units(info))

    heating_design_temperature: (
        Annotated[float, Field(ge=-80, le=120, allow_inf_nan=False)] | None
    ) = Field(
        default=None,
        description="99 % heating design dry-bulb, °F or °C (e.g. heating_design_temperature of "
        "/calc/degree-days); with it every variant reports design_heat_loss",
    )
    indoor_design_temperature: (
        Annotated[float, Field(ge=-20, le=120, allow_inf_nan=False)] | None
    ) = Field(
        default=None,
        description="indoor design temperature, °F or °C; omitted = 70 °F / 21 °C",
    )
    temperature_bins: list[TemperatureBinIn] | None = Field(
        default=None,
        max_length=400,
        description="hours per outdoor dry-bulb bin (temperature_bins of /calc/degree-days): a "
        "heat pump is then computed bin by bin",
    )
    elevation: Annotated[float, Field(ge=-1600, le=36000, allow_inf_nan=False)] | None = Field(
        default=None,
        description="ft or m above sea level: the air's heat capacity follows the standard "
        "atmosphere's pressure; omitted = sea level",
    )
    heating_season_temperature: (
        Annotated[float, Field(ge=-60, le=80, allow_inf_nan=False)] | None
    ) = Field(
        default=None,
        description="heating season's mean outdoor temperature, °F or °C, for the ducts' "
        "seasonal efficiency; omitted = from temperature_bins or the degree-days",
    )
