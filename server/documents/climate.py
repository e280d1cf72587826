"""Response document of the degree-days calculator (``POST /api/v1/calc/degree-days``).

Every number is in the request's units: ``ip`` = °F and °F·day, ``si`` = °C and K·day.
"""

from __future__ import annotations

from datetime import date
from typing import Literal

from pydantic import BaseModel, ConfigDict, Field

from server.documents.solar import SolarIn

WeatherKind = Literal["epw", "tmy3", "csv-hourly", "csv-daily"]


class MonthlyDegreeDays(BaseModel):
    """Degree-days of one calendar month."""

    model_config = ConfigDict(extra="forbid")

    month: int = Field(ge=1, le=12, description="Calendar month, January = 1.")
    hdd: float = Field(description="Heating degree-days of the month at heating_base.")
    cdd: float = Field(description="Cooling degree-days of the month at cooling_base.")
    days: int = Field(ge=0, description="Days of the month with data.")


class DegreeDaysAtBase(BaseModel):
    """Degree-days at one base temperature, for the variable-base degree-day method."""

    model_config = ConfigDict(extra="forbid")

    base: float = Field(description="Base temperature (°F or °C).")
    hdd: float
    cdd: float


class TemperatureBin(BaseModel):
    """Hours of the file with the dry-bulb in one bin (centre in °F or °C)."""

    model_config = ConfigDict(extra="forbid")

    temperature: float = Field(description="Bin centre (°F or °C).")
    hours: float = Field(ge=0)


class DegreeDaysResult(BaseModel):
    """Degree-days, design temperatures and thermal climate zone of an uploaded weather file."""

    model_config = ConfigDict(extra="forbid")

    units: Literal["ip", "si"]
    kind: WeatherKind = Field(description="What the file was read as.")
    station: str | None = Field(default=None, description="Station name from the file header.")
    hdd: float = Field(description="Heating degree-days: Σ max(0, heating_base − daily mean).")
    cdd: float = Field(description="Cooling degree-days: Σ max(0, daily mean − cooling_base).")
    heating_base: float = Field(description="Heating base (default 65 °F / 18.3 °C).")
    cooling_base: float = Field(description="Cooling base (default 65 °F / 18.3 °C).")
    days: int = Field(ge=1, description="Days with data (each gives one daily mean).")
    hours: int | None = Field(default=None, description="Hourly values used (None if daily).")
    first_date: date = Field(description="Date of the first value in the file's order.")
    last_date: date = Field(description="Date of the last value in the file's order.")
    monthly: list[MonthlyDegreeDays] = Field(description="12 rows, January to December.")
    heating_design_temperature: float = Field(
        description="99 % heating dry-bulb: 1st percentile of the hourly values (linear "
        "interpolation between order statistics, as numpy's default)."
    )
    cooling_design_temperature: float = Field(
        description="1 % cooling dry-bulb: 99th percentile of the hourly values."
    )
    design_temperature_basis: Literal["hourly", "daily"] = Field(
        description="'daily' when the file has daily values only: the design temperatures are "
        "then percentiles of daily means, milder than hourly design values."
    )
    climate_zone: str = Field(
        description="Thermal climate zone number (0–8) from HDD18 and CDD10, ASHRAE Standard "
        "169-2013 thresholds; no moisture letter (a temperature file carries no rainfall)."
    )
    climate_zone_name: str
    hdd18: float = Field(
        description="Heating degree-days at 18 °C (64.4 °F) used for the zone, per year."
    )
    cdd10: float = Field(
        description="Cooling degree-days at 10 °C (50 °F) used for the zone, per year."
    )
    degree_days_by_base: list[DegreeDaysAtBase] = Field(
        description="HDD and CDD over a range of bases (0–30 °C by 1 K, or 32–86 °F by 2 °F), "
        "for the variable-base degree-day method."
    )
    temperature_bins: list[TemperatureBin] | None = Field(
        default=None,
        description="Hourly files only: hours per dry-bulb bin, 1 K wide centred on whole °C "
        "(si) or 2 °F wide centred on even °F (ip), ascending; the house document's "
        "climate.temperature_bins (a heat pump is then computed bin by bin).",
    )
    solar: SolarIn | None = Field(
        default=None,
        description="EPW and TMY3 files: irradiation over the heating days at each base of "
        "degree_days_by_base (Btu/ft² or kWh/m²), from the file's hourly GHI, DNI and DHI; the "
        "house document's climate.solar (the windows' solar gains).",
    )
    warnings: list[str] = Field(
        default_factory=list,
        description="Plain-words notes: gaps, duplicates, not a full year, mixed years, "
        "values left out.",
    )
