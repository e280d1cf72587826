"""House-document parts for the heating system as it burns fuel (issue 14).

Inputs (in the document's ``units``; see ../shared/API.md for the table):

* ``heating.ducts`` (ASHRAE Standard 152): ``supply_location`` / ``return_location``
  (``conditioned``, ``outdoors`` or a space id), ``supply_leakage`` / ``return_leakage``
  (fractions of the air handler's flow), ``supply_r`` / ``return_r`` (duct R with films, R
  unit), ``supply_area`` / ``return_area`` (outer surface, area unit), ``air_flow`` (ft³/min
  in ip, L/s in si; omitted = from ``heating.output_capacity`` and the rise),
  ``temperature_rise`` (°F or K difference; omitted = from capacity and flow, else 50 °F
  (27.8 K) for a furnace, 25 °F (13.9 K) for a heat pump, common practice).
* ``heating.heat_pump``: one of ``hspf``, ``hspf2`` or ``cop_47``; ``capacity_47`` (Btu/h or
  W; omitted = ``heating.output_capacity``), optional ``capacity_17`` and ``cop_17``,
  ``backup_efficiency`` (default 1), ``cutoff_temperature`` (°F or °C).
* ``climate.temperature_bins``: hours per outdoor dry-bulb bin (``temperature`` = bin centre,
  °F or °C), e.g. ``temperature_bins`` of /calc/degree-days; ``climate.elevation`` (ft or m);
  ``climate.heating_season_temperature`` (°F or °C, the heating season's mean outdoor).
* ``mechanical_ventilation``: ``kind`` (hrv, erv, exhaust, supply), ``air_flow`` (ft³/min or
  L/s), ``sensible_recovery`` (fraction; 0 for exhaust and supply).
* ``air_leakage.n_factor_table``: ``zone`` (1–4), ``stories`` (1–3), ``shielding``.
* a pipe run's ``pipe``: ``service``, ``location``, ``material``, ``water_heater``,
  ``heating_season_share``.
"""

from __future__ import annotations

from typing import Annotated, Literal

from pydantic import Field, model_validator

from server.documents.common import Out, Strict

Fraction = Annotated[float, Field(ge=0, le=0.9, allow_inf_nan=False)]
Share = Annotated[float, Field(ge=0, le=1, allow_inf_nan=False)]
#: duct R: from a bare duct's films to far beyond any duct wrap (common practice bounds)
DuctR = Annotated[float, Field(ge=0.01, le=100, allow_inf_nan=False)]
DuctArea = Annotated[float, Field(ge=0, le=1e6, allow_inf_nan=False)]
Flow = Annotated[float, Field(gt=0, le=1e6, allow_inf_nan=False)]
Temp = Annotated[float, Field(ge=-80, le=120, allow_inf_nan=False)]
Location = Annotated[
    str, Field(min_length=1, max_length=80, pattern=r"^[A-Za-z0-9][A-Za-z0-9_.-]*$")
]
FuelName = Literal[
    "natural_gas", "propane", "heating_oil", "electric_resistance", "heat_pump", "wood"
]


class DuctsIn(Strict):
    """Forced-air ducts (ASHRAE Standard 152): where they run, leakage, R, area, air flow."""

    supply_location: Location = Field(description="conditioned, outdoors or a space id")
    return_location: Location = Field(description="conditioned, outdoors or a space id")
    supply_leakage: Fraction = Field(description="supply leak, fraction of the air handler flow")
    return_leakage: Fraction = Field(description="return leak, fraction of the air handler flow")
    supply_r: DuctR = Field(description="supply duct R with films (R unit)")
    return_r: DuctR = Field(description="return duct R with films (R unit)")
    supply_area: DuctArea = Field(description="supply duct outer surface (area unit)")
    return_area: DuctArea = Field(description="return duct outer surface (area unit)")
    air_flow: Flow | None = Field(
        default=None, description="air handler flow, ft³/min (ip) or L/s (si)"
    )
    temperature_rise: Annotated[float, Field(gt=0, le=150, allow_inf_nan=False)] | None = Field(
        default=None, description="temperature rise across the equipment, °F or K"
    )


class HeatPumpIn(Strict):
    """Rated heating figures of an air-source heat pump (AHRI 210/240)."""

    hspf: Annotated[float, Field(ge=5, le=12, allow_inf_nan=False)] | None = None
    hspf2: Annotated[float, Field(ge=4.25, le=10.2, allow_inf_nan=False)] | None = None
    cop_47: Annotated[float, Field(gt=0, le=10, allow_inf_nan=False)] | None = None
    capacity_47: Annotated[float, Field(gt=0, le=1e8, allow_inf_nan=False)] | None = Field(
        default=None, description="Btu/h or W at 47 °F; omitted = heating.output_capacity"
    )
    capacity_17: Annotated[float, Field(gt=0, le=1e8, allow_inf_nan=False)] | None = None
    cop_17: Annotated[float, Field(gt=0, le=10, allow_inf_nan=False)] | None = None
    backup_efficiency: Annotated[float, Field(gt=0, le=1, allow_inf_nan=False)] = 1.0
    cutoff_temperature: Temp | None = Field(
        default=None, description="°F or °C: below it only the backup heats"
    )

    @model_validator(mode="after")
    def _one_rating(self) -> HeatPumpIn:
        given = [n for n in ("hspf", "hspf2", "cop_47") if getattr(self, n) is not None]
        if len(given) != 1:
            raise ValueError(
                "give the heat pump exactly one of hspf, hspf2 or cop_47"
                + (f" (got {', '.join(given)})" if given else "")
            )
        return self


class TemperatureBinIn(Strict):
    """Hours of a year with the outdoor dry-bulb in one bin (centre in °F or °C)."""

    temperature: Temp
    hours: Annotated[float, Field(ge=0, le=8784, allow_inf_nan=False)]


class MechanicalVentilationIn(Strict):
    """Mechanical ventilation: kind, air flow, sensible recovery efficiency."""

    kind: Literal["hrv", "erv", "exhaust", "supply"]
    air_flow: Flow = Field(description="ft³/min (ip) or L/s (si)")
    sensible_recovery: Annotated[float, Field(ge=0, lt=1, allow_inf_nan=False)] = 0.0

    @model_validator(mode="after")
    def _recovery(self) -> MechanicalVentilationIn:
        if self.kind in ("exhaust", "supply") and self.sensible_recovery:
            raise ValueError(f"an {self.kind} fan recovers no heat: leave sensible_recovery at 0")
        return self


class NFactorTableIn(Strict):
    """Look the N-factor up in the LBL table: climate zone, stories, shielding."""

    zone: Annotated[int, Field(ge=1, le=4)]
    stories: Annotated[float, Field(ge=1, le=3, allow_inf_nan=False)]
    shielding: Literal["well_shielded", "normal", "exposed"] = "normal"


class WaterHeaterIn(Strict):
    """The water heater behind a domestic-hot-water pipe run."""

    fuel: FuelName
    efficiency: Annotated[float, Field(gt=0, le=10, allow_inf_nan=False)]
    price: Annotated[float, Field(ge=0, le=1e6, allow_inf_nan=False)]
    co2_per_unit: Annotated[float, Field(ge=0, le=1e6, allow_inf_nan=False)] | None = None


# --- results ---------------------------------------------------------------------------------


class DistributionFigures(Out):
    """Ducts in one house variant (ASHRAE Standard 152), seasonal and at design."""

    delivery_effectiveness: float
    regain: float = Field(description="share of the duct losses that comes back to the house")
    efficiency: float = Field(description="seasonal distribution efficiency η_dist")
    season_outdoor_temperature: float = Field(description="°F or °C used for the seasonal figure")
    supply_temperature: float = Field(description="°F or °C where the supply ducts run (season)")
    return_temperature: float = Field(description="°F or °C where the return ducts run (season)")
    design_efficiency: float | None = None
    design_loss: float | None = Field(
        default=None, description="Btu/h or W: duct losses at design, in design_heat_loss"
    )
    method: str = "ASHRAE Standard 152"


class HeatPumpFigures(Out):
    """A heat pump's season over the temperature bins."""

    seasonal_cop: float | None = Field(description="heat delivered / electricity, backup included")
    rated_cop_47: float
    capacity_47: float = Field(description="Btu/h or W")
    heat_pump_electricity: float = Field(description="kWh over the bins")
    backup_electricity: float = Field(description="kWh over the bins")
    backup_share: float = Field(description="share of the season's heat from the backup")
    balance_point: float | None = Field(
        description="°F or °C where the capacity meets the load (null: never within −60 °C)"
    )
    bins_used: bool = Field(description="false: no temperature bins, the typed COP was used")
    curves: str = Field(description="the performance curves and their source")
