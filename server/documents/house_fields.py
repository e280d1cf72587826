"""Field types shared by the parts of the house document (:mod:`.house_request`).

Bounds are generous: they keep every product finite and bind no real house (common practice,
not physics).
"""

from __future__ import annotations

from typing import Annotated, Literal

from pydantic import Field

from server.documents.common import unit_span

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
