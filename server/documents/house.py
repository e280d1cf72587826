"""The house document and its result, by their public names (a facade).

The parts live in modules by topic; this module re-exports them for the many importers:

* :mod:`.house_request` — :class:`HouseDocument`, the request of ``POST /api/v1/calc/house``
  (also what a saved house exports and imports), with the unit decisions of the document;
* :mod:`.house_fields` — the field types its parts share; :mod:`.house_climate`,
  :mod:`.house_systems`, :mod:`.house_envelope`, :mod:`.house_upgrades` and
  :mod:`.house_study` — its parts;
* :mod:`.house_year`, :mod:`.house_options`, :mod:`.house_ranges` and :mod:`.house_result` —
  :class:`HouseResult` and its parts.
"""

from __future__ import annotations

from server.documents.house_climate import ClimateIn, DegreeDaysRowIn, VariableBaseIn
from server.documents.house_envelope import (
    AirLeakageIn,
    ExposedPartIn,
    SpaceFraction,
    SpaceIn,
    SpaceKind,
    SurfaceIn,
)
from server.documents.house_fields import (
    DEGREE_DAYS,
    GROUND_SURFACE_KINDS,
    VOLUME,
    Area,
    FuelSlug,
    Ident,
    Money,
    Price,
    Rate,
    RValue,
    SurfaceKind,
    UpgradeKind,
    UValue,
)
from server.documents.house_options import CashFlowFigures, OptionFigures, StepFigures
from server.documents.house_ranges import (
    Quantiles,
    RangeFigures,
    UncertainInput,
    UncertaintyFigures,
)
from server.documents.house_request import HouseDocument
from server.documents.house_result import (
    FrontierPoint,
    FuelFigures,
    HouseResult,
    OptimizationFigures,
)
from server.documents.house_study import (
    MAX_UNCERTAINTY_SAMPLES,
    DetailIn,
    EconomicsIn,
    LoanIn,
    LogSpread,
    OptimizeIn,
    UncertaintyIn,
    UncertaintySpreadsIn,
)
from server.documents.house_systems import CoolingIn, HeatingIn, PipeIn
from server.documents.house_upgrades import CostIn, PackageIn, UpgradeIn
from server.documents.house_year import (
    FiniteOut,
    HouseFigures,
    PipeFigures,
    SpaceFigures,
    SurfaceFigures,
)

__all__ = [
    "DEGREE_DAYS",
    "GROUND_SURFACE_KINDS",
    "MAX_UNCERTAINTY_SAMPLES",
    "VOLUME",
    "AirLeakageIn",
    "Area",
    "CashFlowFigures",
    "ClimateIn",
    "CoolingIn",
    "CostIn",
    "DegreeDaysRowIn",
    "DetailIn",
    "EconomicsIn",
    "ExposedPartIn",
    "FiniteOut",
    "FrontierPoint",
    "FuelFigures",
    "FuelSlug",
    "HeatingIn",
    "HouseDocument",
    "HouseFigures",
    "HouseResult",
    "Ident",
    "LoanIn",
    "LogSpread",
    "Money",
    "OptimizationFigures",
    "OptimizeIn",
    "OptionFigures",
    "PackageIn",
    "PipeFigures",
    "PipeIn",
    "Price",
    "Quantiles",
    "RValue",
    "RangeFigures",
    "Rate",
    "SpaceFigures",
    "SpaceFraction",
    "SpaceIn",
    "SpaceKind",
    "StepFigures",
    "SurfaceFigures",
    "SurfaceIn",
    "SurfaceKind",
    "UValue",
    "UncertainInput",
    "UncertaintyFigures",
    "UncertaintyIn",
    "UncertaintySpreadsIn",
    "UpgradeIn",
    "UpgradeKind",
    "VariableBaseIn",
]
