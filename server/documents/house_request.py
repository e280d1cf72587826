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

from typing import Annotated

from pydantic import Field

from server.documents.bills import BillsIn
from server.documents.common import Name, Strict, Units
from server.documents.house_climate import ClimateIn
from server.documents.house_envelope import AirLeakageIn, SpaceIn, SurfaceIn
from server.documents.house_fields import Area, Price
from server.documents.house_study import DetailIn, EconomicsIn, OptimizeIn, UncertaintyIn
from server.documents.house_systems import CoolingIn, HeatingIn
from server.documents.house_upgrades import PackageIn, UpgradeIn
from server.documents.systems import MechanicalVentilationIn


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
