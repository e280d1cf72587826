"""Sun on the windows: the heating-day irradiation table of a weather file, and its units.

The table comes from ``POST /api/v1/calc/degree-days`` (``solar``, for EPW and TMY3 files,
which carry hourly GHI, DNI and DHI) and goes into a house document as ``climate.solar``.
Bases are °F (ip) or °C (si); irradiation is Btu/ft² (ip) or kWh/m² (si), summed over the
hours of the heating days at each base (the days whose daily mean is below the base; see
:mod:`server.physics.solar`).
"""

from __future__ import annotations

from typing import Annotated, Literal

from pydantic import Field, model_validator

from server.documents.common import Strict

#: at most 1e7 Btu/ft² or kWh/m² over a season (a whole year is about 2,000 kWh/m²)
Irradiation = Annotated[float, Field(ge=0, le=1e7, allow_inf_nan=False)]


class SolarRowIn(Strict):
    """Irradiation over the heating days at one base (Btu/ft² or kWh/m²)."""

    base: Annotated[float, Field(ge=-60, le=120, allow_inf_nan=False)] = Field(
        description="base temperature, °F or °C"
    )
    days: Annotated[int, Field(ge=0, le=400)] = Field(
        description="days whose daily mean is below the base"
    )
    beam_horizontal: Irradiation = Field(description="Σ DNI · cos(zenith) over their hours")
    diffuse_horizontal: Irradiation = Field(description="Σ DHI over their hours")
    global_horizontal: Irradiation = Field(description="Σ GHI over their hours")
    beam_vertical: list[Irradiation] = Field(
        min_length=24,
        max_length=24,
        description="Σ beam on a vertical plane facing azimuth 0, 15, ... 345° from north",
    )


class SolarIn(Strict):
    """``climate.solar``: the weather file's heating-day irradiation table.

    With the degree-day table of ``climate.variable_base`` it gives each window's solar gain
    (SHGC × area × irradiance on its plane) in the balance point.
    """

    station: str | None = Field(default=None, max_length=200)
    latitude: Annotated[float, Field(ge=-90, le=90, allow_inf_nan=False)] | None = None
    longitude: Annotated[float, Field(ge=-180, le=180, allow_inf_nan=False)] | None = None
    ground_reflectance: Annotated[float, Field(ge=0, le=1, allow_inf_nan=False)] = Field(
        default=0.2,
        description="albedo in front of the windows; 0.2 ordinary ground (common practice)",
    )
    table: list[SolarRowIn] = Field(min_length=2, max_length=200)

    @model_validator(mode="after")
    def _ascending(self) -> SolarIn:
        bases = [row.base for row in self.table]
        if any(b <= a for a, b in zip(bases, bases[1:], strict=False)):
            raise ValueError("the solar table's bases must be in ascending order")
        return self


CompassPoint = Literal["N", "NE", "E", "SE", "S", "SW", "W", "NW"]
