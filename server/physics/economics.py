"""Money side of an upgrade: simple payback, present value, NPV, SIR, loan payment, cash flow.

Conventions (NIST Handbook 135 [1]): costs occur at year 0 (the base date); savings occur at
the end of each year t = 1..N; the annual savings ``s`` are priced at base-date (today's) fuel
prices and escalate from the base date at rate ``e`` per year, so year t saves
``s · (1 + e)^t``; everything is discounted at rate ``d``. The present value of the savings is
then ``s · UPV*`` with NIST 135's modified uniform present value factor
``UPV* = Σ_{t=1..N} ((1 + e) / (1 + d))^t`` [1, ch. 4]. Use ``d`` and ``e`` on the same basis
(both real, or both nominal) [1, ch. 4]. Simple payback divides by ``s`` itself (today's
prices), as NIST 135 defines it [1, ch. 6]. Money is a plain number in the caller's currency.

References
----------
[1] S. K. Fuller and S. R. Petersen, "Life-Cycle Costing Manual for the Federal Energy
    Management Program", NIST Handbook 135 (1995 edition): present value (ch. 4, modified
    uniform present value with escalation), net savings, savings-to-investment ratio
    (ch. 6), simple and discounted payback (ch. 6).
[2] Standard level-payment (annuity) loan formula, e.g. any engineering-economics text:
    A = P · i / (1 - (1 + i)^-n) (common practice).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass


def _finite(value: float, name: str) -> float:
    if not math.isfinite(value):
        raise ValueError(f"{name} must be a finite number (not NaN or infinity)")
    return value


def _rate(value: float, name: str) -> float:
    _finite(value, name)
    if not -1.0 < value < 1.0:
        raise ValueError(f"{name} must be between -1 and 1 (a fraction, e.g. 0.03 for 3 %)")
    return value


def _years(years: int) -> int:
    if int(years) != years or not 1 <= years <= 100:
        raise ValueError("the study period must be a whole number of years from 1 to 100")
    return int(years)


def _yearly_factors(
    discount_rate: float, escalation_rate: float, years: int
) -> list[tuple[float, float]]:
    """``((1 + e)^t, (1 + d)^-t)`` for t = 1..N, refusing rates that overflow.

    Escalation runs from the base date, as in NIST Handbook 135's UPV* [1, ch. 4].
    """
    _rate(discount_rate, "the discount rate")
    _rate(escalation_rate, "the escalation rate")
    factors = []
    for t in range(1, _years(years) + 1):
        try:
            pair = ((1.0 + escalation_rate) ** t, (1.0 + discount_rate) ** -t)
        except (OverflowError, ZeroDivisionError):
            pair = (math.inf, math.inf)
        if not all(math.isfinite(x) and 0 < x < 1e200 for x in pair):
            raise ValueError(
                "the discount or escalation rate is too close to -1 for this study period"
            )
        factors.append(pair)
    return factors


def yearly_factors(
    discount_rate: float, escalation_rate: float, years: int
) -> tuple[tuple[float, float], ...]:
    """``((1 + e)^t, (1 + d)^-t)`` for t = 1..N [1, ch. 4], computed once per house and passed
    to :func:`appraise` (``factors=``) for each of its options: the same figures, without
    recomputing 2·N powers per option. Raises ``ValueError`` as :func:`appraise` does."""
    return tuple(_yearly_factors(discount_rate, escalation_rate, years))


def simple_payback_years(net_cost: float, annual_savings: float) -> float | None:
    """Simple payback [years] = net cost / annual savings at today's prices [1, ch. 6].

    Parameters
    ----------
    net_cost : float
        Installed cost minus rebates [money].
    annual_savings : float
        Annual savings at base-date (today's) prices [money/year].

    Returns
    -------
    float or None
        ``None`` when the savings are zero or negative (it never pays back); ``0.0`` when the
        net cost is zero or negative (nothing to pay back).
    """
    _finite(net_cost, "the net cost")
    _finite(annual_savings, "the annual savings")
    if annual_savings <= 0:
        return None
    return max(net_cost, 0.0) / annual_savings


def present_value_of_savings(
    annual_savings: float,
    discount_rate: float,
    escalation_rate: float,
    years: int,
    factors: Sequence[tuple[float, float]] | None = None,
) -> float:
    """Present value of escalating annual savings [money] [1, ch. 4].

    ``PV = Σ_{t=1..N} s · (1 + e)^t / (1 + d)^t = s · UPV*`` (NIST 135's modified uniform
    present value factor: escalation from the base date).

    Parameters
    ----------
    annual_savings : float
        Annual savings ``s`` at base-date (today's) prices [money/year]; year t receives
        ``s · (1 + e)^t`` at its end.
    discount_rate : float
        Discount rate ``d`` [1/year], in (-1, 1).
    escalation_rate : float
        Yearly escalation of the savings (fuel prices) ``e`` [1/year], in (-1, 1).
    years : int
        Study period ``N`` [years], 1..100.
    """
    _finite(annual_savings, "the annual savings")
    if factors is None:
        factors = _yearly_factors(discount_rate, escalation_rate, years)
    return sum(annual_savings * escalation * discount for escalation, discount in factors)


def net_present_value(
    net_cost: float,
    annual_savings: float,
    discount_rate: float,
    escalation_rate: float,
    years: int,
) -> float:
    """Net present value (NIST 135 "net savings") [money] [1, ch. 6].

    ``NPV = -C + Σ_{t=1..N} s · (1 + e)^t / (1 + d)^t`` with ``C`` the net cost at year 0.
    """
    _finite(net_cost, "the net cost")
    return -net_cost + present_value_of_savings(
        annual_savings, discount_rate, escalation_rate, years
    )


def savings_to_investment_ratio(net_cost: float, present_value: float) -> float | None:
    """Savings-to-investment ratio [-] [1, ch. 6].

    ``SIR = PV(savings) / C = (NPV + C) / C``.

    Returns
    -------
    float or None
        ``None`` when the net cost is zero or negative: the ratio has no meaning when there is
        no investment (rebates cover it all), and such a measure is worth doing whenever it
        saves anything.
    """
    _finite(net_cost, "the net cost")
    _finite(present_value, "the present value")
    if net_cost <= 0:
        return None
    return present_value / net_cost


def monthly_loan_payment(principal: float, apr: float, term_months: int) -> float:
    """Level monthly payment on a loan [money/month] [2].

    ``A = P · i / (1 - (1 + i)^-n)`` with ``i = APR / 12`` and ``n`` months; ``A = P / n``
    when the APR is zero. A principal of zero or less needs no loan: 0.

    Parameters
    ----------
    principal : float
        Amount financed (the net cost) [money].
    apr : float
        Nominal annual percentage rate as a fraction [1/year], 0 <= APR < 1.
    term_months : int
        Number of monthly payments [-], at least 1.
    """
    _finite(principal, "the loan amount")
    _finite(apr, "the APR")
    if not 0.0 <= apr < 1.0:
        raise ValueError("the APR must be a fraction from 0 up to 1 (0.06 for 6 %)")
    if int(term_months) != term_months or term_months < 1:
        raise ValueError("the loan term must be a whole number of months, at least 1")
    if principal <= 0:
        return 0.0
    monthly_rate = apr / 12.0
    if monthly_rate == 0.0:
        return principal / term_months
    # 1 - (1 + i)^-n written with log1p/expm1 so that a tiny rate keeps its precision
    return principal * monthly_rate / -math.expm1(-term_months * math.log1p(monthly_rate))


@dataclass(frozen=True, slots=True)
class CashFlow:
    """Cumulative cash flow of an upgrade, year 0..N [money].

    Attributes
    ----------
    years : tuple of int
        0, 1, ..., N.
    cumulative : tuple of float
        ``-C + Σ_{t<=y} s(1+e)^t`` (undiscounted).
    cumulative_discounted : tuple of float
        ``-C + Σ_{t<=y} s(1+e)^t/(1+d)^t``; its last value is the NPV.
    """

    years: tuple[int, ...]
    cumulative: tuple[float, ...]
    cumulative_discounted: tuple[float, ...]


def cash_flow(
    net_cost: float,
    annual_savings: float,
    discount_rate: float,
    escalation_rate: float,
    years: int,
    factors: Sequence[tuple[float, float]] | None = None,
) -> CashFlow:
    """Cumulative cash flow by year, undiscounted and discounted [1, ch. 6].

    Year 0 holds ``-C``; year y adds that year's (escalated, and for the discounted series
    discounted) savings. The compare page's chart draws the discounted series, whose end point
    is the NPV shown beside it; the undiscounted one is there for a plain "money in the pocket"
    view.
    """
    _finite(net_cost, "the net cost")
    _finite(annual_savings, "the annual savings")
    plain, discounted = [-net_cost], [-net_cost]
    if factors is None:
        factors = _yearly_factors(discount_rate, escalation_rate, years)
    for escalation, discount in factors:
        saved = annual_savings * escalation
        plain.append(plain[-1] + saved)
        discounted.append(discounted[-1] + saved * discount)
    return CashFlow(tuple(range(len(plain))), tuple(plain), tuple(discounted))


def payback_crossing_year(cumulative: tuple[float, ...] | list[float]) -> float | None:
    """Year [years] at which a cumulative cash flow first reaches zero.

    Linear interpolation within the year of the crossing (savings taken as spread evenly over
    the year). With the undiscounted series and no escalation this is the simple payback; with
    the discounted series it is the discounted payback [1, ch. 6].

    Returns
    -------
    float or None
        ``0.0`` when the series starts at or above zero; ``None`` when it never reaches zero
        within the study period.
    """
    if not cumulative:
        raise ValueError("the cash flow has no years")
    if cumulative[0] >= 0:
        return 0.0
    for year in range(1, len(cumulative)):
        before, after = cumulative[year - 1], cumulative[year]
        if after >= 0 > before:
            return year - 1 + (-before) / (after - before)
    return None


@dataclass(frozen=True, slots=True)
class Appraisal:
    """Every money figure of one option [money, money/year, money/month or years]."""

    installed_cost: float
    rebates: float
    net_cost: float
    annual_savings: float
    monthly_savings: float
    simple_payback_years: float | None
    present_value: float
    npv: float
    sir: float | None
    monthly_loan_payment: float | None
    cash_flow: CashFlow
    payback_year: float | None
    discounted_payback_year: float | None


def appraise(
    *,
    installed_cost: float,
    rebates: float,
    annual_savings: float,
    discount_rate: float,
    escalation_rate: float,
    years: int,
    loan_apr: float | None = None,
    loan_months: int | None = None,
    factors: Sequence[tuple[float, float]] | None = None,
) -> Appraisal:
    """All the money figures of one option from its cost, rebates and annual savings (at today's prices) [1].

    ``C = installed - rebates``; simple payback ``C / s``; ``NPV = -C + PV``; ``SIR = PV / C``;
    the loan (when both ``loan_apr`` and ``loan_months`` are given) finances ``C``; monthly
    savings ``s / 12``; payback years are the crossings of the two cumulative series.
    """
    net = _finite(installed_cost, "the installed cost") - _finite(rebates, "the rebates")
    if factors is None:
        factors = _yearly_factors(discount_rate, escalation_rate, years)
    flow = cash_flow(net, annual_savings, discount_rate, escalation_rate, years, factors)
    present = present_value_of_savings(
        annual_savings, discount_rate, escalation_rate, years, factors
    )
    payment = None
    if loan_apr is not None and loan_months is not None:
        payment = monthly_loan_payment(net, loan_apr, loan_months)
    return Appraisal(
        installed_cost=installed_cost,
        rebates=rebates,
        net_cost=net,
        annual_savings=annual_savings,
        monthly_savings=annual_savings / 12.0,
        simple_payback_years=simple_payback_years(net, annual_savings),
        present_value=present,
        npv=present - net,
        sir=savings_to_investment_ratio(net, present),
        monthly_loan_payment=payment,
        cash_flow=flow,
        payback_year=payback_crossing_year(flow.cumulative),
        discounted_payback_year=payback_crossing_year(flow.cumulative_discounted),
    )
