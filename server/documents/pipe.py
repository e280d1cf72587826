"""JSON documents of the pipe calculator (POST /api/v1/calc/pipe).

Every number is in the request's ``units`` (see ../shared/API.md): ``ip`` = inch, ft, °F,
Btu·in/(h·ft²·°F), Btu/(h·ft²·°F), h·ft·°F/Btu, Btu/(h·ft), Btu/h, h·ft²·°F/Btu; ``si`` = mm,
m, °C, W/(m·K), W/(m²·K), m·K/W, W/m, W, m²·K/W.

Decisions:

* ``layers`` may be empty: a bare pipe (its outer surface is at the fluid temperature).
* A fluid temperature equal to the ambient is allowed and gives zero heat loss. A fluid colder
  than the ambient (chilled water) gives a negative heat loss, i.e. a heat gain.
* ``length`` defaults to 1 (1 ft in ip, 1 m in si).
* ``annual_loss_kwh`` is always in kWh; ``annual_loss`` is in Btu for ip and kWh for si
  (``annual_loss_unit`` says which). Both are heat lost by the pipe, before any heating-system
  efficiency (fuel-neutral).
* ``thickness_for_target`` is the thickness of ONE insulation layer (conductivity
  ``target_conductivity``, or the only layer's conductivity) on the bare pipe that brings
  |heat_loss_per_length| down to ``target_heat_loss_per_length``.
"""

from __future__ import annotations

from typing import Literal

from pydantic import BaseModel, ConfigDict, Field

_STRICT = ConfigDict(extra="forbid", allow_inf_nan=False)


class PipeLayerIn(BaseModel):
    """One insulation layer, inside to outside."""

    model_config = _STRICT

    name: str | None = Field(default=None, max_length=200)
    thickness: float = Field(gt=0, description="inch (ip) or mm (si)")
    conductivity: float = Field(gt=0, description="Btu·in/(h·ft²·°F) (ip) or W/(m·K) (si)")


class PipeRequest(BaseModel):
    """A horizontal pipe run in still air."""

    model_config = ConfigDict(
        extra="forbid",
        allow_inf_nan=False,
        json_schema_extra={
            "examples": [
                {
                    "units": "si",
                    "pipe_outer_diameter": 22.0,
                    "layers": [{"thickness": 19.0, "conductivity": 0.035}],
                    "fluid_temperature": 55.0,
                    "ambient_temperature": 15.0,
                    "surface_coefficient": 9.0,
                    "length": 10.0,
                }
            ]
        },
    )

    units: Literal["ip", "si"]
    pipe_outer_diameter: float = Field(gt=0, description="outer diameter of the bare pipe")
    layers: list[PipeLayerIn] = Field(max_length=20, description="inside to outside; [] = bare")
    fluid_temperature: float = Field(description="°F (ip) or °C (si)")
    ambient_temperature: float = Field(description="air and surroundings, °F (ip) or °C (si)")
    surface_coefficient: float | None = Field(
        default=None, gt=0, description="outer h; omitted = natural convection + radiation"
    )
    emissivity: float = Field(default=0.9, gt=0, le=1, description="used when h is computed")
    length: float = Field(default=1.0, gt=0, description="ft (ip) or m (si)")
    hours_per_year: float | None = Field(
        default=None, gt=0, le=8784, description="hours the pipe is hot; gives annual_loss"
    )
    target_heat_loss_per_length: float | None = Field(
        default=None, gt=0, description="largest acceptable |heat loss per length|"
    )
    target_conductivity: float | None = Field(
        default=None, gt=0, description="insulation for thickness_for_target"
    )


class PipeLayerOut(BaseModel):
    """One layer's share of the result."""

    name: str | None
    thickness: float
    conductivity: float
    outer_diameter: float
    r_per_length: float
    outer_temperature: float


class PipeResult(BaseModel):
    """Heat loss of the run, in the request's units."""

    units: Literal["ip", "si"]
    r_per_length: float = Field(description="insulation + outer surface (pipe wall neglected)")
    r_insulation_per_length: float
    r_surface_per_length: float
    heat_loss_per_length: float = Field(description="positive = loss, negative = gain")
    heat_loss: float = Field(description="for `length`: Btu/h (ip) or W (si)")
    length: float
    bare_heat_loss_per_length: float = Field(description="same pipe with no insulation")
    surface_temperature: float
    surface_coefficient: float = Field(description="the one used")
    surface_coefficient_source: Literal["given", "computed"]
    convection_coefficient: float | None = None
    radiation_coefficient: float | None = None
    r_equivalent_flat: float = Field(description="insulation R per unit of outer surface area")
    pipe_outer_diameter: float
    outer_diameter: float = Field(description="over the insulation")
    layers: list[PipeLayerOut]
    hours_per_year: float | None = None
    annual_loss_kwh: float | None = None
    annual_loss: float | None = None
    annual_loss_unit: Literal["Btu", "kWh"]
    target_heat_loss_per_length: float | None = None
    target_conductivity: float | None = None
    thickness_for_target: float | None = None
    heat_loss_per_length_at_target: float | None = None
    warnings: list[str]
