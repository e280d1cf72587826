"""Plain sentences about a package's figures, for the quote and the homeowner's shared view.

One place for the words: whether the figures are matched to the bills, the range of the
first-year savings, the chance the work pays back, and which figures a page leads with
(the calibrated ones when the house has bills and a ratio, else the modelled ones).

Rules decided here:

* A range's ends are rounded to $10 under $1,000 and to $50 from $1,000 up (a Monte Carlo
  P10/P90 to the dollar claims a precision it does not have; common practice).
* The costs "now" and "after" that go with calibrated savings scale the model's heating cost
  by the same ratio (the other energy costs, cooling, are unchanged), so that cost now −
  cost after = the calibrated savings, as it does for the modelled figures.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from server.documents.house import HouseResult, OptionFigures

#: the word for a fuel's bills, by fuel slug
BILL_WORDS = {
    "natural_gas": "gas",
    "propane": "propane",
    "heating_oil": "heating oil",
    "electric_resistance": "electricity",
    "heat_pump": "electricity",
    "wood": "firewood",
}
#: fuel units said in the plural after a number other than one
PLURAL_UNITS = {"therm": "therms", "gallon": "gallons", "cord": "cords"}

MODELLED_ONLY = (
    "These figures are modelled from the house as measured; they have not been checked "
    "against the house's energy bills."
)


def round_money(value: float) -> float:
    """``value`` to the nearest $10 under $1,000 and to the nearest $50 from $1,000 up (by
    its size; halves away from zero).

    >>> round_money(632.37), round_money(1130.89), round_money(-44.0)
    (630.0, 1150.0, -40.0)
    """
    size = abs(value)
    step = 10.0 if size < 1000.0 else 50.0
    return math.copysign(math.floor(size / step + 0.5) * step, value)


def money_text(value: float) -> str:
    """``$1,150``, ``−$40`` (whole dollars, the minus sign of the pages)."""
    sign = "−" if value < 0 else ""
    return f"{sign}${abs(value):,.0f}"


def _quantity(value: float, unit: str) -> str:
    shown = f"{value:,.0f}"
    return f"{shown} {PLURAL_UNITS.get(unit, unit) if shown != '1' else unit}"


def is_calibrated(result: HouseResult) -> bool:
    """Whether the result's options carry figures matched to the bills."""
    return result.calibration is not None and result.calibration.ratio is not None


def calibration_sentence(result: HouseResult) -> str:
    """What the figures rest on: the bills (the model's use, the bills' use, the ratio), or
    the model alone."""
    calibration = result.calibration
    if calibration is None:
        return MODELLED_ONLY
    if calibration.ratio is None:
        return (
            "These figures are modelled: the house's bills are on file, but the model of the "
            "house as found uses no heating fuel, so there is nothing to scale."
        )
    bills = BILL_WORDS.get(result.fuel.fuel, "energy")
    unit = calibration.fuel_unit
    return (
        f"These savings are scaled to your {bills} bills: the model of the house as found "
        f"predicted {_quantity(calibration.model_heating_use, unit)} a year for heating, your "
        f"bills show {_quantity(calibration.bills_heating_use, unit)} at typical weather "
        f"({calibration.ratio:.2f}×)."
    )


def range_sentence(option: OptionFigures, *, for_homeowner: bool = False) -> str | None:
    """``8 in 10 chance the first-year savings are between $630 and $960`` (the P10 and P90
    of the Monte Carlo, of the model matched to the bills when there are bills), or None
    without a range. ``for_homeowner``: the shared view's shorter "... a year"."""
    if option.range is None:
        return None
    quantiles = option.range.annual_savings
    if quantiles.p10 is None or quantiles.p90 is None:
        return None
    low, high = money_text(round_money(quantiles.p10)), money_text(round_money(quantiles.p90))
    if low == high:
        return f"The savings come out at about {low} a year in every trial run."
    if for_homeowner:
        return f"8 in 10 chance the savings are between {low} and {high} a year"
    return f"8 in 10 chance the first-year savings are between {low} and {high}"


def pays_back_sentence(option: OptionFigures, *, years: int) -> str | None:
    """The share of trial runs in which the work pays back within the analysis years."""
    if option.range is None:
        return None
    share = option.range.probability_pays_back
    if share >= 1.0:
        return f"It pays back within {years} years in every trial run."
    if share <= 0.0:
        return f"It does not pay back within {years} years in any trial run."
    return f"{share:.0%} chance it pays back within {years} years."


def no_range_sentence(result: HouseResult) -> str | None:
    """Why there is no range (the uncertainty warning that says so), or None."""
    if result.uncertainty is None or result.uncertainty.available:
        return None
    prefix = "no ranges for this house: "
    reason = next((w for w in result.uncertainty.warnings if w.startswith(prefix)), "")
    if not reason:
        return "No savings range is worked out for this house."
    return f"No savings range is worked out for this house: {reason[len(prefix) :]}."


def cost_now(result: HouseResult) -> float:
    """The energy cost a year of the house as found: with a calibration ratio its heating
    cost scaled to the bills (model heating cost × ratio + the other costs), else modelled."""
    found = result.as_found
    if not is_calibrated(result):
        return found.total_cost
    assert result.calibration is not None and result.calibration.ratio is not None
    return found.total_cost - found.heating_cost * (1.0 - result.calibration.ratio)


@dataclass(frozen=True, slots=True)
class Figures:
    """One set of an option's money figures a year (SIR null when the net cost is ≤ 0)."""

    cost_now: float
    cost_after: float
    annual_savings: float
    monthly_savings: float
    simple_payback_years: float | None
    npv: float
    sir: float | None


@dataclass(frozen=True, slots=True)
class LeadFigures:
    """The money figures a page leads with for one option, and the modelled ones beside
    (the same object when there is nothing to match to)."""

    calibrated: bool
    lead: Figures
    modelled: Figures


def lead_figures(result: HouseResult, option: OptionFigures) -> LeadFigures:
    """The calibrated figures when the option has them, else the modelled ones (both kept)."""
    found = result.as_found
    modelled = Figures(
        cost_now=found.total_cost,
        cost_after=option.total_cost,
        annual_savings=option.annual_savings,
        monthly_savings=option.monthly_savings,
        simple_payback_years=option.simple_payback_years,
        npv=option.npv,
        sir=option.sir,
    )
    c = option.calibrated
    if c is None:
        return LeadFigures(calibrated=False, lead=modelled, modelled=modelled)
    now = cost_now(result)
    matched = Figures(
        cost_now=now,
        cost_after=now - c.annual_savings,
        annual_savings=c.annual_savings,
        monthly_savings=c.monthly_savings,
        simple_payback_years=c.simple_payback_years,
        npv=c.npv,
        sir=c.sir,
    )
    return LeadFigures(calibrated=True, lead=matched, modelled=modelled)


def sentence_case(text: str) -> str:
    """The first letter capitalised and a full stop at the end (for a result's warning)."""
    if not text:
        return text
    text = text[0].upper() + text[1:]
    return text if text.endswith(".") else text + "."
