"""One house variant's year in the calc/house result: its surfaces, spaces and pipe runs.

Every part is a :class:`FiniteOut`: an infinite or NaN figure cannot be built.
"""

from __future__ import annotations

from pydantic import ConfigDict, Field

from server.documents.common import Out
from server.documents.systems import DistributionFigures, HeatPumpFigures


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
