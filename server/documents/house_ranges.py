"""The savings ranges of the calc/house result (seeded Monte Carlo): quantiles and inputs."""

from __future__ import annotations

from typing import Literal

from pydantic import Field

from server.documents.house_year import FiniteOut


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
