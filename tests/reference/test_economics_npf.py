"""Economics against numpy-financial (an outside implementation of the standard formulas).

numpy-financial conventions: ``npv(rate, values)`` takes values[0] at time 0 undiscounted;
``pmt``/``pv``/``nper`` use the sign convention that money paid out is negative.
"""

from __future__ import annotations

import numpy_financial as npf
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from server.physics import economics as econ

PROPERTY = settings(max_examples=200, deadline=None)


def test_loan_payment_matches_npf_pmt_hand_case():
    # numpy-financial: pmt(0.06/12, 120, -2200) = 24.4245 (our hand-worked package loan).
    assert econ.monthly_loan_payment(2200.0, 0.06, 120) == pytest.approx(
        npf.pmt(0.06 / 12, 120, -2200.0), rel=1e-12
    )


@PROPERTY
@given(principal=st.floats(10.0, 1e6), apr=st.floats(1e-4, 0.3), months=st.integers(1, 480))
def test_loan_payment_matches_npf_pmt(principal, apr, months):
    # numpy-financial pmt(rate, nper, pv) with pv = -principal gives a positive payment.
    assert econ.monthly_loan_payment(principal, apr, months) == pytest.approx(
        npf.pmt(apr / 12, months, -principal), rel=1e-9
    )


@PROPERTY
@given(principal=st.floats(10.0, 1e6), apr=st.floats(1e-3, 0.3), months=st.integers(1, 480))
def test_loan_term_matches_npf_nper(principal, apr, months):
    # numpy-financial nper(rate, pmt, pv): paying our payment retires the loan in `months`.
    payment = econ.monthly_loan_payment(principal, apr, months)
    assert float(npf.nper(apr / 12, -payment, principal)) == pytest.approx(months, rel=1e-6)


def test_npv_matches_npf_npv_hand_case():
    # numpy-financial npv(0.03, [-2200, s·1.02, s·1.02², ..., s·1.02^20]) = 3342.74 (NIST
    # Handbook 135: prices escalate from the base date, so year t saves s·(1+e)^t).
    s = 306.5466790352505
    values = [-2200.0] + [s * 1.02**t for t in range(1, 21)]
    assert econ.net_present_value(2200.0, s, 0.03, 0.02, 20) == pytest.approx(
        npf.npv(0.03, values), rel=1e-12
    )


@PROPERTY
@given(
    net=st.floats(0.0, 1e5),
    savings=st.floats(-1e4, 1e4),
    d=st.floats(-0.05, 0.2),
    e=st.floats(-0.05, 0.1),
    years=st.integers(1, 60),
)
def test_npv_matches_npf_npv(net, savings, d, e, years):
    # numpy-financial npv: values[0] at time 0, values[t] discounted by (1+d)^t; year t saves
    # s·(1+e)^t (NIST Handbook 135, escalation from the base date).
    values = [-net] + [savings * (1 + e) ** t for t in range(1, years + 1)]
    expected = npf.npv(d, values)
    ours = econ.net_present_value(net, savings, d, e, years)
    assert ours == pytest.approx(expected, rel=1e-9, abs=1e-6)


@PROPERTY
@given(savings=st.floats(1.0, 1e4), d=st.floats(0.001, 0.2), years=st.integers(1, 60))
def test_present_value_matches_npf_pv_without_escalation(savings, d, years):
    # numpy-financial pv(rate, nper, pmt): an end-of-year annuity; pv is negative for pmt > 0.
    expected = -npf.pv(d, years, savings)
    assert econ.present_value_of_savings(savings, d, 0.0, years) == pytest.approx(expected, 1e-9)


def test_npv_is_zero_at_npf_irr():
    # numpy-financial irr of the package's cash flow: discounting at that rate gives NPV = 0,
    # and SIR = 1 there (NIST Handbook 135: the break-even of SIR is the IRR).
    s, net = 306.5466790352505, 2200.0
    values = [-net] + [s * 1.02**t for t in range(1, 21)]
    rate = float(npf.irr(values))
    assert 0.1 < rate < 0.2
    assert econ.net_present_value(net, s, rate, 0.02, 20) == pytest.approx(0.0, abs=1e-6)
    present = econ.present_value_of_savings(s, rate, 0.02, 20)
    assert econ.savings_to_investment_ratio(net, present) == pytest.approx(1.0, rel=1e-9)


def test_cash_flow_end_point_matches_npf_npv():
    # The chart's discounted cumulative line ends at numpy-financial's NPV.
    values = [-1500.0] + [200.0 * 1.03**t for t in range(1, 16)]
    flow = econ.cash_flow(1500.0, 200.0, 0.04, 0.03, 15)
    assert flow.cumulative_discounted[-1] == pytest.approx(npf.npv(0.04, values), rel=1e-12)
    assert flow.cumulative[-1] == pytest.approx(sum(values), rel=1e-12)
