"""The house document's heating and cooling systems and its pipe runs' pipes.

Efficiency is a fraction (AFUE 0.80) for combustion fuels and electric resistance (at most 1:
the energy contents are higher heating values), a seasonal COP for ``heat_pump`` (at most
10). Fuel prices are per the fuel's own unit of sale; cooling electricity is per kWh.
"""

from __future__ import annotations

from typing import Annotated, Literal

from pydantic import Field, ValidationInfo, field_validator, model_validator

from server.documents.common import Number, Positive, Strict
from server.documents.house_fields import FuelSlug, Ident, Price
from server.documents.pipe import PipeLayerIn
from server.documents.systems import DuctsIn, HeatPumpIn, WaterHeaterIn


class HeatingIn(Strict):
    """Heating system: fuel, seasonal efficiency (or COP), price per fuel unit."""

    fuel: FuelSlug
    efficiency: Annotated[float, Field(gt=0, le=10, allow_inf_nan=False)]
    price: Price
    co2_per_unit: Price | None = Field(
        default=None, description="kg CO2 per fuel unit; omitted = the fuel table's factor"
    )
    output_capacity: Annotated[float, Field(gt=0, le=1e8, allow_inf_nan=False)] | None = Field(
        default=None,
        description="the heating equipment's output capacity, Btu/h or W; with a design "
        "temperature every variant reports capacity_ratio",
    )
    ducts: DuctsIn | None = Field(
        default=None, description="forced-air ducts (ASHRAE Standard 152); omitted = none"
    )
    heat_pump: HeatPumpIn | None = Field(
        default=None,
        description="fuel heat_pump: rated figures, computed over climate.temperature_bins",
    )

    @field_validator("efficiency")
    @classmethod
    def _efficiency_meaning(cls, value: float, info: ValidationInfo) -> float:
        fuel = info.data.get("fuel")
        if fuel is not None and fuel != "heat_pump" and value > 1:
            raise ValueError(
                f"for {fuel} give the efficiency as a fraction of at most 1 (0.80 for 80 %); "
                "only a heat pump takes a COP above 1"
            )
        return value

    @model_validator(mode="after")
    def _heat_pump_rating(self) -> HeatingIn:
        if self.heat_pump is not None and self.fuel != "heat_pump":
            raise ValueError("heat_pump ratings belong to a heating system of fuel heat_pump")
        return self


class CoolingIn(Strict):
    """Cooling system: exactly one of ``seer`` [Btu/Wh] or ``cop``; price per kWh."""

    seer: Annotated[float, Field(gt=0, le=60, allow_inf_nan=False)] | None = None
    cop: Annotated[float, Field(gt=0, le=20, allow_inf_nan=False)] | None = None
    electricity_price: Price

    @model_validator(mode="after")
    def _one_rating(self) -> CoolingIn:
        if (self.seer is None) == (self.cop is None):
            raise ValueError("give the cooling system exactly one of seer or cop")
        return self


class PipeIn(Strict):
    """A pipe run's pipe, insulation (inside to outside) and temperatures (as /calc/pipe)."""

    pipe_outer_diameter: Positive
    layers: list[PipeLayerIn] = Field(default_factory=list, max_length=20)
    fluid_temperature: Number
    ambient_temperature: Number
    surface_coefficient: Positive | None = None
    emissivity: Annotated[float, Field(gt=0, le=1, allow_inf_nan=False)] | None = Field(
        default=None,
        description="outer surface; omitted = 0.1 for bare copper, else 0.9 (jacket, paint)",
    )
    material: Literal["copper", "steel", "plastic", "other"] | None = Field(
        default=None, description="the pipe's own material (a bare pipe's emissivity)"
    )
    service: Literal["heating_water", "domestic_hot_water"] | None = Field(
        default=None, description="what it carries; omitted = bought at the heating system"
    )
    location: Ident | None = Field(
        default=None,
        description="conditioned, unconditioned or a space id; omitted = a full loss",
    )
    water_heater: WaterHeaterIn | None = Field(
        default=None, description="domestic hot water: the heater that buys its loss"
    )
    heating_season_share: Annotated[float, Field(ge=0, le=1, allow_inf_nan=False)] | None = Field(
        default=None,
        description="share of its hot hours in the heating season; omitted = from the bins, "
        "else 7/12",
    )

    @model_validator(mode="after")
    def _service(self) -> PipeIn:
        if self.water_heater is not None and self.service != "domestic_hot_water":
            raise ValueError("a water_heater belongs to a pipe of service domestic_hot_water")
        if self.service == "domestic_hot_water" and self.water_heater is None:
            raise ValueError("a domestic_hot_water pipe needs its water_heater")
        return self
