"""The house document's study options: economics, the optimiser, uncertainty ranges, detail."""

from __future__ import annotations

from typing import Annotated, Literal

from pydantic import Field

from server.documents.common import Strict
from server.documents.house_fields import Rate


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
