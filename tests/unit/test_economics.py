"""Payback, present value, NPV, SIR, loan payment and cash flow (server.physics.economics).

Hand-worked figures are those of the package in tests/unit/test_house_model.py: annual
savings at today's prices s = $306.5467, net cost C = $2200, d = 3 %, e = 2 %, N = 20 years, loan 6 % / 10 years.
"""

from __future__ import annotations

import math

import pytest
from hypothesis import assume, given, settings
from hypothesis import strategies as st

from server.physics import economics as econ

PROPERTY = settings(max_examples=200, deadline=None)
SAVINGS, NET_COST = 306.5466790352505, 2200.0

money = st.floats(1.0, 1.0e5)
rates = st.floats(-0.05, 0.15)
study_years = st.integers(1, 60)


def test_simple_payback_hand_worked():
    # 2200 / 306.5467 = 7.1767 years.
    assert econ.simple_payback_years(NET_COST, SAVINGS) == pytest.approx(7.176721, rel=1e-6)


def test_no_payback_without_savings():
    # Limiting cases: zero or negative savings never pay back; a free measure pays at once.
    assert econ.simple_payback_years(1000.0, 0.0) is None
    assert econ.simple_payback_years(1000.0, -5.0) is None
    assert econ.simple_payback_years(-100.0, 50.0) == 0.0


def test_present_value_hand_worked_against_nist_modified_upv():
    # NIST Handbook 135 (ch. 4) modified uniform present value factor, prices escalating from
    # the base date: UPV* = Σ_{t=1..N} ((1+e)/(1+d))^t = (1+e)/(d-e) · [1 - ((1+e)/(1+d))^N]
    #   = 1.02/0.01 · (1 - 0.822733) = 18.08123. The savings s are at base-date prices, so
    #   PV = s · UPV* = 306.5467 × 18.08123 = 5542.74.
    upv_star = 1.02 / 0.01 * (1 - (1.02 / 1.03) ** 20)
    pv = econ.present_value_of_savings(SAVINGS, 0.03, 0.02, 20)
    assert pv == pytest.approx(SAVINGS * upv_star, rel=1e-12)
    assert pv == pytest.approx(5542.7408, rel=1e-7)


def test_year_one_saves_s_times_one_plus_e():
    # NIST Handbook 135 convention: escalation starts at the base date, so the first year's
    # savings are already escalated once: 100 × 1.02 = 102, discounted 102 / 1.03 = 99.0291.
    assert econ.present_value_of_savings(100.0, 0.03, 0.02, 1) == pytest.approx(102 / 1.03, 1e-12)


def test_present_value_without_escalation_is_nist_upv():
    # NIST Handbook 135 uniform present value factor UPV = (1 - (1+d)^-N) / d;
    # d = 3 %, N = 20: UPV = (1 - 0.553676) / 0.03 = 14.877475.
    pv = econ.present_value_of_savings(100.0, 0.03, 0.0, 20)
    assert pv == pytest.approx(100 * 14.877475, rel=1e-7)


def test_present_value_when_escalation_equals_discount():
    # Limiting case d = e (the closed form divides by zero): UPV* = Σ 1 = N, so
    # PV = N · s = 20 × 100 = 2000.
    assert econ.present_value_of_savings(100.0, 0.03, 0.03, 20) == pytest.approx(2000.0, 1e-12)


def test_zero_rates_sum_the_savings():
    # Limiting case d = e = 0: PV = N · s.
    assert econ.present_value_of_savings(250.0, 0.0, 0.0, 12) == pytest.approx(3000.0, 1e-12)


def test_npv_and_sir_hand_worked():
    # NPV = -2200 + 5542.74 = 3342.74; SIR = 5542.74 / 2200 = 2.519428.
    npv = econ.net_present_value(NET_COST, SAVINGS, 0.03, 0.02, 20)
    assert npv == pytest.approx(3342.7408, rel=1e-7)
    assert econ.savings_to_investment_ratio(NET_COST, npv + NET_COST) == pytest.approx(
        2.519428, 1e-6
    )


def test_sir_undefined_without_investment():
    # Rebates covering the whole cost leave no investment to compare with: SIR is None.
    assert econ.savings_to_investment_ratio(0.0, 500.0) is None
    assert econ.savings_to_investment_ratio(-10.0, 500.0) is None


def test_loan_payment_hand_worked():
    # i = 0.06/12 = 0.005, n = 120: (1.005)^-120 = 0.549633;
    # A = 2200 × 0.005 / (1 - 0.549633) = 11 / 0.450367 = 24.4245 per month.
    assert econ.monthly_loan_payment(NET_COST, 0.06, 120) == pytest.approx(24.424510, rel=1e-7)


def test_interest_free_loan():
    # Limiting case APR = 0: A = P / n = 2200 / 120 = 18.333.
    assert econ.monthly_loan_payment(NET_COST, 0.0, 120) == pytest.approx(18.333333, rel=1e-7)


def test_nothing_to_borrow():
    assert econ.monthly_loan_payment(-50.0, 0.06, 120) == 0.0


@pytest.mark.parametrize(("apr", "months"), [(-0.01, 120), (1.0, 120), (0.06, 0), (0.06, 1.5)])
def test_loan_refuses_bad_terms(apr, months):
    with pytest.raises(ValueError):
        econ.monthly_loan_payment(1000.0, apr, months)


def test_cash_flow_hand_worked():
    # Prices escalate from the base date (NIST Handbook 135): year 1 saves 300·1.1 = 330,
    # year 2 300·1.21 = 363. Undiscounted: -1000, -670, -307; discounted at 10 %:
    # -1000 + 330/1.1 = -700; -700 + 363/1.21 = -400.
    flow = econ.cash_flow(1000.0, 300.0, 0.10, 0.10, 2)
    assert flow.years == (0, 1, 2)
    assert flow.cumulative == pytest.approx((-1000.0, -670.0, -307.0), rel=1e-12)
    assert flow.cumulative_discounted == pytest.approx((-1000.0, -700.0, -400.0), rel=1e-12)


def test_payback_crossing_hand_worked():
    # -100 at year 1, +20 at year 2: crosses 100/120 of the way into year 2 -> 1.8333.
    assert econ.payback_crossing_year([-200.0, -100.0, 20.0]) == pytest.approx(1.833333, 1e-6)
    assert econ.payback_crossing_year([-200.0, -150.0]) is None  # never within the period
    assert econ.payback_crossing_year([0.0, 10.0]) == 0.0  # nothing to pay back


def test_appraise_hand_worked_package():
    # The package: installed 2400, rebates 200 -> C = 2200; figures as above, s/12 = 25.5456.
    result = econ.appraise(
        installed_cost=2400.0,
        rebates=200.0,
        annual_savings=SAVINGS,
        discount_rate=0.03,
        escalation_rate=0.02,
        years=20,
        loan_apr=0.06,
        loan_months=120,
    )
    assert result.net_cost == 2200.0
    assert result.simple_payback_years == pytest.approx(7.176721, rel=1e-6)
    assert result.npv == pytest.approx(3342.7408, rel=1e-7)
    assert result.sir == pytest.approx(2.519428, rel=1e-6)
    assert result.monthly_loan_payment == pytest.approx(24.424510, rel=1e-7)
    assert result.monthly_savings == pytest.approx(25.545557, rel=1e-7)
    assert result.cash_flow.cumulative_discounted[-1] == pytest.approx(result.npv, rel=1e-12)
    # With escalation the undiscounted crossing comes before the simple payback: cumulative
    # savings after 7 years = 306.5467 × 1.02 × (1.02^7 - 1)/0.02 = 2324.5 > 2200.
    assert 6.0 < result.payback_year < result.simple_payback_years


@pytest.mark.parametrize(
    ("discount", "escalation", "years"),
    [(-1.0, 0.0, 10), (1.0, 0.0, 10), (0.03, 0.0, 0), (0.03, 0.0, 101), (math.nan, 0.0, 10)],
)
def test_present_value_refuses_bad_settings(discount, escalation, years):
    with pytest.raises(ValueError):
        econ.present_value_of_savings(100.0, discount, escalation, years)


def test_discount_rate_near_minus_one_is_refused_not_overflowed():
    # (1 + d)^-t overflows for d -> -1 over a long period: a plain ValueError, not a crash.
    with pytest.raises(ValueError, match="too close to -1"):
        econ.present_value_of_savings(100.0, -0.9999999, 0.0, 100)


# --- invariants ---------------------------------------------------------------------------------


@PROPERTY
@given(net=money, savings=money)
def test_payback_times_savings_is_net_cost(net, savings):
    assert econ.simple_payback_years(net, savings) * savings == pytest.approx(net, rel=1e-12)


@PROPERTY
@given(net=money, savings=st.floats(-1.0e4, 1.0e4), d=rates, e=rates, years=study_years)
def test_sir_above_one_iff_npv_positive(net, savings, d, e, years):
    npv = econ.net_present_value(net, savings, d, e, years)
    assume(abs(npv) > 1e-6 * net)  # away from the knife edge where rounding decides
    sir = econ.savings_to_investment_ratio(net, npv + net)
    assert (sir > 1) == (npv > 0)


@PROPERTY
@given(net=money, savings=money, d=rates, years=study_years)
def test_undiscounted_crossing_is_simple_payback_without_escalation(net, savings, d, years):
    # With e = 0 the undiscounted cumulative line is straight: it crosses at C / s.
    flow = econ.cash_flow(net, savings, d, 0.0, years)
    crossing = econ.payback_crossing_year(flow.cumulative)
    payback = econ.simple_payback_years(net, savings)
    if payback <= years * (1 - 1e-9):
        assert crossing == pytest.approx(payback, rel=1e-9)
    elif payback > years * (1 + 1e-9):
        assert crossing is None


@PROPERTY
@given(net=money, savings=money, d=st.floats(0.0, 0.15), e=rates, years=study_years)
def test_discounting_never_pays_back_sooner(net, savings, d, e, years):
    # With d >= 0 each discounted saving is at most the undiscounted one.
    flow = econ.cash_flow(net, savings, d, e, years)
    plain = econ.payback_crossing_year(flow.cumulative)
    discounted = econ.payback_crossing_year(flow.cumulative_discounted)
    if discounted is not None:
        assert plain is not None and plain <= discounted + 1e-9


@PROPERTY
@given(principal=money, apr=st.floats(0.0, 0.3), months=st.integers(1, 480))
def test_loan_repays_the_principal(principal, apr, months):
    # The payments discounted at the loan rate add back up to the principal.
    payment = econ.monthly_loan_payment(principal, apr, months)
    rate = apr / 12
    present = sum(payment / (1 + rate) ** k for k in range(1, months + 1))
    assert present == pytest.approx(principal, rel=1e-9)
