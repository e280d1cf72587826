"""The house document (request of ``POST /api/v1/calc/house``) and its result.

The same :class:`HouseDocument` is what a saved house exports and imports. Every number is in
the document's ``units`` (table in ../shared/API.md), with these decisions:

* Fuel prices are per the fuel's own unit of sale (therm, gallon, kWh, cord) in both unit
  systems; cooling electricity is per kWh. Money is a plain number in ``currency``.
* ``cfm50`` is always ft³/min at 50 Pa (the unit is in its name); ``n50`` (ACH50, 1/h) is the
  unit-free alternative. ``volume`` is ft³ or m³.
* A surface gives exactly one of ``assembly`` (layers, computed by the assembly calculator),
  ``r`` (the whole assembly's R, films included, used as is) or ``u`` (its U-factor, e.g. a
  window's rated U). A ``pipe_run`` surface gives ``length``, ``pipe`` and ``hours_per_year``
  instead of an area and an assembly.
* A ``slab``, ``basement_floor`` or ``basement_wall`` with a ``ground`` object counts its UA
  with the ground U of ISO 13370 (see :class:`server.documents.ground.GroundIn`); without one
  it keeps the air-to-air U of its assembly.
* Upgrade kinds: ``assembly`` (a new assembly, or ``r``/``u``, on one surface; the default
  when ``surface`` and an assembly are given), ``air_sealing`` (``cfm50_after`` or
  ``n50_after``), ``pipe_insulation`` (new ``pipe_layers`` on a pipe run, replacing its
  insulation). Cost is ``fixed + per_area × area + per_length × length``; air sealing takes
  only ``fixed``; ``per_area`` belongs to assemblies and ``per_length`` to pipe insulation.
* Efficiency is a fraction (AFUE 0.80) for combustion fuels and electric resistance (at most
  1: the energy contents are higher heating values), a seasonal COP for ``heat_pump`` (at
  most 10).
* CO2 is in kg in both unit systems.
"""

from __future__ import annotations

from typing import Annotated, Literal

from pydantic import ConfigDict, Field, ValidationInfo, field_validator, model_validator

from server.documents.assembly import AssemblyInput
from server.documents.bills import BillsIn, CalibratedFigures, CalibrationFigures
from server.documents.common import (
    Name,
    Number,
    Out,
    Positive,
    Strict,
    Units,
    document_units,
    unit_span,
)
from server.documents.ground import GroundIn
from server.documents.pipe import PipeLayerIn
from server.documents.solar import CompassPoint, SolarIn
from server.documents.systems import (
    DistributionFigures,
    DuctsIn,
    HeatPumpFigures,
    HeatPumpIn,
    MechanicalVentilationIn,
    NFactorTableIn,
    TemperatureBinIn,
    WaterHeaterIn,
)

Ident = Annotated[str, Field(min_length=1, max_length=80, pattern=r"^[A-Za-z0-9][A-Za-z0-9_.-]*$")]
Rate = Annotated[float, Field(gt=-1, lt=1, allow_inf_nan=False)]
#: generous upper bounds keep every product finite (common practice, not physics)
Area = Annotated[float, Field(gt=0, le=1e7, allow_inf_nan=False)]
Money = Annotated[float, Field(ge=0, le=1e9, allow_inf_nan=False)]
Price = Annotated[float, Field(ge=0, le=1e6, allow_inf_nan=False)]
RValue = Annotated[float, Field(ge=0.01, le=1000, allow_inf_nan=False)]
UValue = Annotated[float, Field(gt=0, le=100, allow_inf_nan=False)]
FuelSlug = Literal[
    "natural_gas", "propane", "heating_oil", "electric_resistance", "heat_pump", "wood"
]
SurfaceKind = Literal[
    "wall",
    "ceiling",
    "cathedral_roof",
    "floor",
    "slab",
    "basement_floor",
    "basement_wall",
    "rim_joist",
    "kneewall",
    "door",
    "window",
    "other",
    "pipe_run",
]
UpgradeKind = Literal[
    "assembly", "air_sealing", "pipe_insulation", "duct_sealing", "duct_insulation", "window"
]
#: conditioned volume: at least 1 ft³, at most 1e9 m³, the same physical span in both systems
VOLUME = unit_span("volume", "ft³", "m³", low_ip=1.0, high_si=1e9)
#: degree-days: at most 30,000 K·day (54,000 °F·day), generous for any climate (common practice)
DEGREE_DAYS = unit_span("degree_days", "°F·day", "K·day", low_ip=0.0, high_si=30000.0)
#: surface kinds that may carry a ``ground`` object (ISO 13370)
GROUND_SURFACE_KINDS = ("slab", "basement_floor", "basement_wall")


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


class AirLeakageIn(Strict):
    """Blower-door result: exactly one of ``cfm50`` [ft³/min] or ``n50`` [1/h]."""

    cfm50: Annotated[float, Field(ge=0, le=1e6, allow_inf_nan=False)] | None = None
    n50: Annotated[float, Field(ge=0, le=100, allow_inf_nan=False)] | None = None
    n_factor: Annotated[float, Field(ge=1, le=100, allow_inf_nan=False)] = Field(
        default=18.0, description="LBL N-factor; 18 when omitted (common practice)"
    )
    n_factor_table: NFactorTableIn | None = Field(
        default=None,
        description="the N-factor from the LBL table by climate zone, stories and shielding "
        "instead of n_factor",
    )
    volume: Annotated[float, Field(gt=0, allow_inf_nan=False)]

    @field_validator("volume")
    @classmethod
    def _volume_span(cls, value: float, info: ValidationInfo) -> float:
        return VOLUME.check(value, document_units(info))

    @model_validator(mode="after")
    def _one_figure(self) -> AirLeakageIn:
        if (self.cfm50 is None) == (self.n50 is None):
            raise ValueError("give the air leakage exactly one of cfm50 or n50")
        # the table replaces n_factor; an exported document carries the default 18 beside it
        if self.n_factor_table is not None and self.n_factor != 18.0:
            raise ValueError("give either n_factor or n_factor_table, not both")
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


class ExposedPartIn(Strict):
    """A part of a buffer space's enclosure facing outdoors or the ground: area and U."""

    name: Name = ""
    area: Area
    u: UValue = Field(description="U-factor of the part, films included")


SpaceKind = Literal["vented_attic", "crawlspace", "unheated_basement", "garage", "other"]
SpaceFraction = Annotated[float, Field(ge=0, le=1, allow_inf_nan=False)]


class SpaceIn(Strict):
    """An unconditioned (buffer) space, ISO 13789: a vented attic, crawlspace, garage...

    Either ``b`` as given, or ``exposed`` (its parts facing outdoors or the ground),
    ``volume`` and ``air_changes`` (with the outdoors, 1/h) from which b = H_ue / (H_iu + H_ue)
    is computed for every house variant (the service checks which was given, naming the field).
    """

    id: Ident
    label: Name = ""
    kind: SpaceKind | None = Field(
        default=None, description="what the space is (for people; the calculation ignores it)"
    )
    exposed: list[ExposedPartIn] | None = Field(default=None, max_length=50)
    volume: Annotated[float, Field(gt=0, le=1e9, allow_inf_nan=False)] | None = Field(
        default=None, description="air volume of the space, ft³ or m³"
    )
    air_changes: Annotated[float, Field(ge=0, le=1000, allow_inf_nan=False)] | None = Field(
        default=None, description="air changes per hour with the outdoors"
    )
    b: SpaceFraction | None = Field(
        default=None, description="adjustment factor given directly, 0..1 (instead of the rest)"
    )


class SurfaceIn(Strict):
    """One piece of the envelope, or a pipe run (``kind: pipe_run``)."""

    id: Ident
    kind: SurfaceKind
    name: Name = ""
    adjacent: Ident = Field(
        default="outdoors",
        description="what lies behind the surface: outdoors, ground, or the id of a space",
    )
    area: Area | None = None
    assembly: AssemblyInput | None = None
    r: RValue | None = Field(default=None, description="whole-assembly R, films included")
    u: UValue | None = Field(default=None, description="whole-assembly U-factor")
    length: Area | None = Field(default=None, description="pipe runs: ft or m")
    pipe: PipeIn | None = None
    hours_per_year: Annotated[float, Field(gt=0, le=8784, allow_inf_nan=False)] | None = None
    ground: GroundIn | None = Field(
        default=None,
        description="slab, basement_floor, basement_wall: ground contact by ISO 13370 (the "
        "assembly gives R_f or R_w, films excluded); its UA then uses the ground U",
    )
    shgc: Annotated[float, Field(ge=0, le=1, allow_inf_nan=False)] | None = Field(
        default=None, description="a window's solar heat gain coefficient, 0..1"
    )
    orientation: CompassPoint | None = Field(
        default=None, description="the way the surface faces: N, NE, E, SE, S, SW, W or NW"
    )
    azimuth: Annotated[float, Field(ge=0, le=360, allow_inf_nan=False)] | None = Field(
        default=None,
        description="the way it faces in degrees from north, clockwise (instead of orientation)",
    )
    tilt: Annotated[float, Field(ge=0, le=90, allow_inf_nan=False)] | None = Field(
        default=None,
        description="degrees from horizontal: 90 a wall's window (the default), 0 a flat skylight",
    )

    @field_validator("shgc")
    @classmethod
    def _shgc_on_windows(cls, value: float | None, info: ValidationInfo) -> float | None:
        if value is not None and info.data.get("kind") not in (None, "window"):
            raise ValueError(f"shgc belongs to a window, not a {info.data.get('kind')}")
        return value

    @field_validator("azimuth")
    @classmethod
    def _one_facing(cls, value: float | None, info: ValidationInfo) -> float | None:
        if value is not None and info.data.get("orientation") is not None:
            raise ValueError("give either orientation or azimuth, not both")
        return value

    @model_validator(mode="after")
    def _shape(self) -> SurfaceIn:
        given = [n for n in ("assembly", "r", "u") if getattr(self, n) is not None]
        if self.ground is not None and self.kind not in GROUND_SURFACE_KINDS:
            raise ValueError(
                f"a ground object belongs to a slab, basement_floor or basement_wall, not a {self.kind}"
            )
        if self.kind == "pipe_run":
            missing = [n for n in ("length", "pipe", "hours_per_year") if getattr(self, n) is None]
            if missing:
                raise ValueError(f"a pipe run needs {', '.join(missing)}")
            if given or self.area is not None:
                raise ValueError("a pipe run takes length, pipe and hours_per_year, not an area")
            return self
        if self.area is None:
            raise ValueError(f"a {self.kind} needs its area")
        if len(given) != 1:
            raise ValueError(
                "give the surface exactly one of assembly, r or u"
                + (f" (got {', '.join(given)})" if given else "")
            )
        if self.length is not None or self.pipe is not None or self.hours_per_year is not None:
            raise ValueError("length, pipe and hours_per_year belong to pipe runs only")
        return self


class CostIn(Strict):
    """Installed cost = fixed + per_area × area + per_length × length (document's currency)."""

    fixed: Money = 0.0
    per_area: Price = 0.0
    per_length: Price = 0.0


class UpgradeIn(Strict):
    """A proposed change: a new assembly, air sealing, or pipe insulation."""

    id: Ident
    kind: UpgradeKind | None = Field(default=None, description="omitted = worked out")
    name: Name = ""
    surface: Ident | None = None
    assembly: AssemblyInput | None = None
    r: RValue | None = None
    u: UValue | None = None
    cfm50_after: Annotated[float, Field(ge=0, le=1e6, allow_inf_nan=False)] | None = None
    n50_after: Annotated[float, Field(ge=0, le=100, allow_inf_nan=False)] | None = None
    pipe_layers: list[PipeLayerIn] | None = Field(default=None, max_length=20)
    ground: GroundIn | None = Field(
        default=None,
        description="a ground surface's changed ground inputs (e.g. slab edge insulation); the "
        "fields given replace the surface's; with no new assembly the surface's is kept",
    )
    supply_leakage_after: Annotated[float, Field(ge=0, le=0.9, allow_inf_nan=False)] | None = Field(
        default=None, description="duct sealing: supply leakage fraction after"
    )
    return_leakage_after: Annotated[float, Field(ge=0, le=0.9, allow_inf_nan=False)] | None = Field(
        default=None, description="duct sealing: return leakage fraction after"
    )
    supply_r_after: Annotated[float, Field(ge=0.01, le=100, allow_inf_nan=False)] | None = Field(
        default=None, description="duct insulation: supply duct R after (films included)"
    )
    return_r_after: Annotated[float, Field(ge=0.01, le=100, allow_inf_nan=False)] | None = Field(
        default=None, description="duct insulation: return duct R after (films included)"
    )
    emissivity: Annotated[float, Field(gt=0, le=1, allow_inf_nan=False)] | None = Field(
        default=None,
        description="pipe insulation: the jacket's emissivity; omitted = 0.9 (common practice)",
    )
    shgc: Annotated[float, Field(ge=0, le=1, allow_inf_nan=False)] | None = Field(
        default=None,
        description="window upgrade (storm panel, replacement): the window's SHGC after, 0..1",
    )
    cost: CostIn = Field(default_factory=CostIn)
    rebate: Money = 0.0
    life_years: Annotated[float, Field(gt=0, le=100, allow_inf_nan=False)] | None = None

    @model_validator(mode="after")
    def _window(self) -> UpgradeIn:
        """A window upgrade: a window surface, its new U (``u``, ``r`` or an assembly) and
        SHGC, priced fixed + per_area (checked before :meth:`_shape`)."""
        if self.kind is None and self.shgc is not None:
            self.kind = "window"
        if self.kind != "window":
            if self.shgc is not None:
                raise ValueError(f"shgc belongs to a window upgrade, not one of kind {self.kind}")
            return self
        given = [n for n in ("assembly", "r", "u") if getattr(self, n) is not None]
        wrong = [
            n
            for n in ("cfm50_after", "n50_after", "pipe_layers", "ground", "emissivity",
                      "supply_leakage_after", "return_leakage_after", "supply_r_after",
                      "return_r_after")
            if getattr(self, n) is not None
        ]  # fmt: skip
        if wrong:
            raise ValueError(f"a window upgrade does not take {', '.join(wrong)}")
        if self.surface is None or self.shgc is None or len(given) != 1:
            raise ValueError(
                "a window upgrade needs its window (surface), shgc and exactly one of u, r or "
                "assembly"
            )
        if self.cost.per_length:
            raise ValueError("a window upgrade is priced fixed + per_area, not per_length")
        return self

    @model_validator(mode="after")
    def _shape(self) -> UpgradeIn:
        if self.kind == "window":
            return self  # checked by _window
        assembly_given = [n for n in ("assembly", "r", "u") if getattr(self, n) is not None]
        sealing_given = [n for n in ("cfm50_after", "n50_after") if getattr(self, n) is not None]
        leak_after = [
            n
            for n in ("supply_leakage_after", "return_leakage_after")
            if getattr(self, n) is not None
        ]
        r_after = [n for n in ("supply_r_after", "return_r_after") if getattr(self, n) is not None]
        duct_fields = {"duct_sealing": leak_after, "duct_insulation": r_after}
        if self.kind is None and (leak_after or r_after) and not (leak_after and r_after):
            self.kind = "duct_sealing" if leak_after else "duct_insulation"
        if self.kind in duct_fields:
            wrong = (
                assembly_given
                + sealing_given
                + [
                    n
                    for n in ("surface", "pipe_layers", "ground", "emissivity")
                    if getattr(self, n) is not None
                ]
                + [n for kind, names in duct_fields.items() if kind != self.kind for n in names]
            )
            if wrong:
                raise ValueError(f"an upgrade of kind {self.kind} does not take {', '.join(wrong)}")
            if not duct_fields[self.kind]:
                after = (
                    "supply_leakage_after or return_leakage_after"
                    if self.kind == "duct_sealing"
                    else "supply_r_after or return_r_after"
                )
                raise ValueError(f"{self.kind.replace('_', ' ')} needs {after}")
            if self.cost.per_length or (self.kind == "duct_sealing" and self.cost.per_area):
                raise ValueError(
                    "duct sealing is priced fixed; duct insulation fixed + per_area of the ducts"
                )
            return self
        if leak_after or r_after:
            raise ValueError(
                "supply_/return_leakage_after belong to duct sealing and supply_/return_r_after "
                "to duct insulation"
            )
        if self.emissivity is not None and self.kind not in (None, "pipe_insulation"):
            raise ValueError("emissivity belongs to pipe insulation (the jacket)")
        if self.kind is None:
            if sealing_given:
                self.kind = "air_sealing"
            elif self.pipe_layers is not None:
                self.kind = "pipe_insulation"
            elif self.surface is not None and (assembly_given or self.ground is not None):
                self.kind = "assembly"
            else:
                raise ValueError(
                    "say what the upgrade does: a surface and a new assembly, cfm50_after for "
                    "air sealing, or pipe_layers for pipe insulation"
                )
        others = {
            "assembly": sealing_given + (["pipe_layers"] if self.pipe_layers is not None else []),
            "air_sealing": assembly_given
            + [n for n in ("surface", "pipe_layers") if getattr(self, n) is not None],
            "pipe_insulation": assembly_given + sealing_given,
        }[self.kind] + (["ground"] if self.ground is not None and self.kind != "assembly" else [])
        if others:
            raise ValueError(f"an upgrade of kind {self.kind} does not take {', '.join(others)}")
        if self.kind == "assembly":
            ground_only = not assembly_given and self.ground is not None
            if self.surface is None or (len(assembly_given) != 1 and not ground_only):
                raise ValueError(
                    "an assembly upgrade needs a surface and exactly one of assembly, r or u "
                    "(or, on a ground surface, a ground change alone)"
                )
            if self.cost.per_length:
                raise ValueError("an assembly upgrade is priced fixed + per_area, not per_length")
        elif self.kind == "air_sealing":
            if len(sealing_given) != 1:
                raise ValueError("air sealing needs exactly one of cfm50_after or n50_after")
            if self.cost.per_area or self.cost.per_length:
                raise ValueError("air sealing has no area or length: give its cost as fixed")
        else:
            if self.surface is None or self.pipe_layers is None:
                raise ValueError("pipe insulation needs the pipe run (surface) and pipe_layers")
            if self.cost.per_area:
                raise ValueError("pipe insulation is priced fixed + per_length, not per_area")
        return self


class PackageIn(Strict):
    """Upgrades done together; incremental savings are reported in this order."""

    id: Ident
    name: Name = ""
    upgrades: list[Ident] = Field(min_length=1, max_length=50)


class LoanIn(Strict):
    """A loan on the net cost: APR as a fraction, term in years (payments monthly)."""

    apr: Annotated[float, Field(ge=0, lt=1, allow_inf_nan=False)]
    years: Annotated[int, Field(ge=1, le=50)]


class EconomicsIn(Strict):
    """Study settings (NIST Handbook 135): use ``discount_rate`` and ``fuel_escalation`` on the
    same basis (both real or both nominal). The escalation applies to all energy savings."""

    discount_rate: Rate = 0.03
    fuel_escalation: Rate = 0.0
    years: Annotated[int, Field(ge=1, le=100)] = 20
    loan: LoanIn | None = None


class OptimizeIn(Strict):
    """The best package for a budget: the set of upgrades (at most one per surface, one air
    sealing, one per pipe run) with net cost ≤ ``budget`` that maximises ``objective``."""

    budget: Annotated[float, Field(ge=0, allow_inf_nan=False)] | None = Field(
        default=None,
        description="most net cost (installed cost − rebates) in the document's currency; "
        "null = no budget",
    )
    objective: Literal["npv", "annual_savings", "co2"] = Field(
        default="npv",
        description="npv, annual_savings (first year, today's prices) or co2 (kg avoided a year)",
    )
    frontier_limit: Annotated[int, Field(ge=0, le=1000)] = Field(
        default=200, description="most frontier points listed (0: no frontier)"
    )


#: most Monte Carlo samples one request may ask for (a time bound, ~1 s on the load-test house)
MAX_UNCERTAINTY_SAMPLES = 10_000
#: a lognormal spread: σ of ln(multiplier), 0..1 (σ = 1 already spans a factor e each way)
LogSpread = Annotated[float, Field(ge=0, le=1, allow_inf_nan=False)]


class UncertaintySpreadsIn(Strict):
    """Spreads that replace the defaults (each omitted one keeps its default; 0 = no spread).

    Lognormal spreads are σ of ln(multiplier), the multiplier's median 1."""

    closed_assembly_u: LogSpread | None = Field(
        default=None,
        description="on the as-found U of closed assemblies (walls, floors, roofs, rim "
        "joists, kneewalls, slabs, basement walls, other)",
    )
    open_assembly_u: LogSpread | None = Field(
        default=None, description="on the as-found U of ceilings (an attic floor one can see)"
    )
    window_u: LogSpread | None = Field(
        default=None, description="on the as-found U of windows and doors"
    )
    air_sealing: LogSpread | None = Field(
        default=None, description="on the CFM50 reduction an air-sealing upgrade reaches"
    )
    heating_efficiency: LogSpread | None = Field(
        default=None, description="on the heating system's efficiency"
    )
    weather: Annotated[float, Field(ge=0, le=0.5, allow_inf_nan=False)] | None = Field(
        default=None,
        description="coefficient of variation of a year's heating degree-days (normal)",
    )
    fuel_price: LogSpread | None = Field(default=None, description="on the heating fuel price")
    fuel_escalation: Annotated[float, Field(ge=0, le=0.1, allow_inf_nan=False)] | None = Field(
        default=None, description="standard deviation of the escalation rate, per year (normal)"
    )


class UncertaintyIn(Strict):
    """Savings ranges by a seeded Monte Carlo: each package then has ``range``."""

    samples: Annotated[int, Field(ge=0, le=MAX_UNCERTAINTY_SAMPLES)] = Field(
        default=2000,
        description=f"Monte Carlo samples, 0..{MAX_UNCERTAINTY_SAMPLES:,}; 0 = the point "
        "figures as the range",
    )
    seed: Annotated[int, Field(ge=0, le=2**63 - 1)] = Field(
        default=0, description="seed of the generator: the same seed gives the same figures"
    )
    spreads: UncertaintySpreadsIn = Field(default_factory=UncertaintySpreadsIn)
    annual_hdd: list[Annotated[float, Field(gt=0, le=54000, allow_inf_nan=False)]] | None = Field(
        default=None,
        min_length=2,
        max_length=200,
        description="heating degree-days of separate past years (°F·day or K·day): the weather "
        "spread is then their coefficient of variation (unless spreads.weather is given)",
    )


class DetailIn(Strict):
    """How much of each option the calc/house response carries (the figures are the same)."""

    upgrades_alone: Literal["summary", "full"] = Field(
        default="full",
        description="full (default): every field of each upgrade alone, as a package has (its "
        "surface rows, ua_by_surface, cash_flow, steps, ...); summary: each upgrade alone with "
        "id, name, upgrades, annual_savings, net_cost, simple_payback_years, npv, sir, "
        "co2_avoided and warnings (and calibrated with bills), a far smaller response. as_found "
        "and packages always carry every field",
    )


class HouseDocument(Strict):
    """The whole comparison as one document."""

    units: Units
    name: Name = ""
    currency: Annotated[str, Field(pattern=r"^[A-Z]{3}$")] = "USD"
    climate: ClimateIn
    heating: HeatingIn
    cooling: CoolingIn | None = None
    air_leakage: AirLeakageIn | None = None
    mechanical_ventilation: MechanicalVentilationIn | None = Field(
        default=None,
        description="an HRV, ERV, exhaust or supply fan, running continuously (ASHRAE "
        "Handbook—Fundamentals ch. 16 combination with infiltration)",
    )
    surfaces: list[SurfaceIn] = Field(min_length=1, max_length=200)
    spaces: list[SpaceIn] = Field(
        default_factory=list, max_length=50, description="unconditioned spaces (ISO 13789)"
    )
    floor_area: Area | None = Field(
        default=None, description="conditioned floor area, ft² or m² (internal gains default)"
    )
    bedrooms: Annotated[int, Field(ge=0, le=100)] | None = Field(
        default=None, description="number of bedrooms (internal gains default)"
    )
    internal_gains: Annotated[float, Field(ge=0, le=1e7, allow_inf_nan=False)] | None = Field(
        default=None,
        description="average internal gains, Btu/h or W; omitted = ANSI/RESNET/ICC 301: "
        "17,900 + 23.8 × floor area (ft²) + 4,104 × bedrooms Btu/day (from memory). Used with "
        "a degree-day table (climate.variable_base) only",
    )
    upgrades: list[UpgradeIn] = Field(default_factory=list, max_length=300)
    packages: list[PackageIn] = Field(default_factory=list, max_length=50)
    economics: EconomicsIn = Field(default_factory=EconomicsIn)
    electricity_co2_per_kwh: Price | None = Field(
        default=None, description="kg CO2 per kWh; omitted = grid average (from memory)"
    )
    bills: BillsIn | None = Field(
        default=None,
        description="the heating fuel's bills (as calc/bills, without units; normal_temperatures "
        "required): the result then has calibration and each option calibrated figures",
    )
    optimize: OptimizeIn | None = Field(
        default=None,
        description="the best set of upgrades for a net-cost budget: the result then has best, "
        "frontier and optimization",
    )
    uncertainty: UncertaintyIn | None = Field(
        default=None,
        description="savings ranges by a seeded Monte Carlo: each package then has range, and "
        "the result uncertainty",
    )
    detail: DetailIn = Field(
        default_factory=DetailIn,
        description="what the response carries of each upgrade alone (see DetailIn)",
    )


# --- result ------------------------------------------------------------------------------------


class FiniteOut(Out):
    """A part of the whole-house result: an infinite or NaN figure cannot be built (checked by
    pydantic as each part is made, instead of walking the finished result)."""

    model_config = ConfigDict(extra="ignore", allow_inf_nan=False)


class SurfaceFigures(FiniteOut):
    """One surface in the result: R, U, UA and its share of the whole-house UA."""

    id: str
    kind: str
    name: str
    area: float
    r: float
    u: float
    ua: float
    share_of_ua: float = Field(description="fraction of the house's UA (envelope + air)")
    adjacent: str = Field(default="outdoors", description="outdoors, ground or a space id")
    b: float = Field(
        default=1.0, description="adjustment factor of what lies behind (1 outdoors); ua = b·U·A"
    )
    shgc: float | None = Field(default=None, description="a window's SHGC in this variant")
    solar_gain: float | None = Field(
        default=None,
        description="a window's solar gain over the heating days at this variant's balance "
        "point (SHGC × area × irradiation on its plane), Btu or kWh; null without climate.solar",
    )


class SpaceFigures(FiniteOut):
    """A buffer space in one house variant (ISO 13789): b, H_iu, H_ue (per degree)."""

    id: str
    label: str
    b: float
    b_given: bool = Field(description="b typed in the document rather than computed")
    h_iu: float = Field(description="Σ U·A of the house's surfaces facing the space")
    h_ue: float | None = Field(
        description="Σ U·A of its exposed parts + air heat capacity × air changes × volume; "
        "null when b was given"
    )
    ua: float = Field(description="b × h_iu: what the surfaces facing it add to the house's UA")
    surfaces: list[str]


class PipeFigures(FiniteOut):
    """One pipe run: per-length resistance and heat loss, annual loss (Btu or kWh)."""

    id: str
    name: str
    length: float
    r_per_length: float
    heat_loss_per_length: float
    annual_loss: float
    service: str | None = None
    location: str | None = None
    counted_loss: float | None = Field(
        default=None, description="annual loss that counts (Btu or kWh), after where it runs"
    )
    water_heating_fuel: float | None = Field(
        default=None, description="domestic hot water: water-heater fuel units per year"
    )


class HouseFigures(FiniteOut):
    """A year of the house in the document's units (ip: Btu/(h·°F), Btu; si: W/K, kWh)."""

    ua: float = Field(description="envelope + infiltration, per degree")
    ua_envelope: float
    ua_infiltration: float
    ua_by_surface: dict[str, float]
    surfaces: list[SurfaceFigures]
    spaces: list[SpaceFigures] = Field(default=[], description="buffer spaces, ISO 13789")
    cfm50: float | None = None
    ach50: float | None = None
    ach_natural: float | None = None
    heating_load: float = Field(description="annual, Btu (ip) or kWh (si), envelope + air")
    pipe_loss: float = Field(description="annual, Btu (ip) or kWh (si)")
    pipes: list[PipeFigures] = []
    heating_fuel: float = Field(description="fuel units per year (heating_fuel_unit)")
    heating_fuel_unit: str
    heating_cost: float
    cooling_load: float = Field(description="annual sensible, Btu (ip) or kWh (si)")
    cooling_electricity: float = Field(description="kWh per year")
    cooling_cost: float
    total_cost: float
    heating_co2: float = Field(description="kg per year (fossil)")
    cooling_co2: float = Field(description="kg per year")
    co2: float = Field(description="kg per year, fossil; wood's CO2 is in co2_biogenic")
    co2_biogenic: float = Field(
        default=0.0, description="kg per year of biogenic CO2 (wood heating), apart from co2"
    )
    design_heat_loss: float | None = Field(
        default=None,
        description="Btu/h or W: UA × (indoor − heating design temperature); null without a "
        "design temperature",
    )
    capacity_ratio: float | None = Field(
        default=None, description="heating output capacity ÷ design heat loss"
    )
    heating_degree_days: float | None = Field(
        default=None, description="the heating degree-days used, °F·day or K·day"
    )
    balance_point: float | None = Field(
        default=None,
        description="°F or °C: setpoint − (internal + solar gains) / ua; null at the fixed base",
    )
    internal_gains: float | None = Field(
        default=None, description="Btu/h or W in the balance point; null at the fixed base"
    )
    solar_gains: float | None = Field(
        default=None,
        description="the windows' solar gain averaged over the heating days at the balance "
        "point, Btu/h or W; null at the fixed base",
    )
    ua_ventilation: float = Field(
        default=0.0, description="what mechanical ventilation adds to ua, per degree"
    )
    n_factor: float | None = Field(default=None, description="the N-factor used")
    n_factor_source: str | None = None
    distribution: DistributionFigures | None = Field(
        default=None, description="ducts (ASHRAE Standard 152); null without ducts"
    )
    heat_pump: HeatPumpFigures | None = Field(
        default=None, description="a rated heat pump's season over the temperature bins"
    )
    water_heating_cost: float = Field(
        default=0.0, description="domestic-hot-water pipe losses bought at the water heater"
    )


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


class Quantiles(FiniteOut):
    """P10, P50 and P90 of one figure over the Monte Carlo samples (null: never, e.g. a
    payback that does not come in that share of the samples, or an SIR without a cost)."""

    p10: float | None
    p50: float | None
    p90: float | None


class RangeFigures(FiniteOut):
    """One package's figures over the uncertain inputs (``uncertainty.inputs``)."""

    annual_savings: Quantiles
    npv: Quantiles
    simple_payback_years: Quantiles
    sir: Quantiles
    probability_pays_back: float = Field(
        description="share of the samples whose cumulative discounted cash flow reaches zero "
        "or more within the analysis years (NIST Handbook 135)"
    )


class UncertainInput(FiniteOut):
    """One uncertain input: how it is drawn, its spread and where the spread comes from."""

    name: str = Field(description="as in uncertainty.spreads")
    distribution: Literal["lognormal", "normal"]
    spread: float = Field(
        description="lognormal: σ of ln(multiplier), median 1; normal: the standard deviation "
        "(weather: coefficient of variation; fuel_escalation: per year)"
    )
    applies_to: str
    source: str


class UncertaintyFigures(FiniteOut):
    """How the ranges were made."""

    samples: int
    seed: int
    available: bool = Field(description="false: no ranges for this house (warnings say why)")
    calibrated: bool = Field(
        description="true: the heating savings are scaled by calibration.ratio, as the "
        "calibrated figures are"
    )
    quantile_method: str
    inputs: list[UncertainInput]
    warnings: list[str] = []


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
