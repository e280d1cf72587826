"""The bill fit (server/physics/bills.py): hand-worked cases, limiting cases, invariants.

Outside checks: hand arithmetic in the comments; the Guideline 14 formulas (CV(RMSE) and NMBE
with n − p) worked by hand; hypothesis for the invariants of least squares.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from server.physics import bill_figures, bill_model, bill_regression
from server.physics import bills as b
from server.physics.units import f_to_c


def steps(*blocks: tuple[float, int]) -> tuple[list[float], list[bill_model.Period]]:
    """Constant-temperature blocks laid end to end: (temperature °C, days) each."""
    temps: list[float] = []
    periods = []
    for temp, days in blocks:
        periods.append(bill_model.Period(len(temps), days, 0.0))
        temps.extend([temp] * days)
    return temps, periods


def with_use(periods: list[bill_model.Period], uses: list[float]) -> list[bill_model.Period]:
    return [bill_model.Period(p.first_day, p.days, u) for p, u in zip(periods, uses, strict=True)]


def test_weighted_line_by_hand():
    # x = 0, 1, 2; y = 1, 3.5, 5; w = 1, 2, 1: x̄ = 4/4 = 1, ȳ = 13/4 = 3.25, S_xx = 2,
    # S_xy = (−1)(−2.25) + (1)(1.75) = 4, β = 2, α = 3.25 − 2 = 1.25,
    # S = 0.0625 + 2·0.0625 + 0.0625 = 0.25
    alpha, beta, sse, sxx = bill_regression.weighted_line(
        np.array([0.0, 1.0, 2.0]), np.array([1.0, 3.5, 5.0]), np.array([1.0, 2.0, 1.0])
    )
    assert (alpha, beta, sse, sxx) == pytest.approx((1.25, 2.0, 0.25, 2.0), rel=1e-12)


def test_guideline14_statistics_by_hand():
    # residuals −10, 10, −10, 10: Σr² = 400, n − p = 4 − 2 = 2, RMSE = √200 = 14.1421,
    # ȳ = 250 -> CV(RMSE) = 100·14.1421/250 = 5.6569 %; Σr = 0 -> NMBE 0
    cv, nmbe = bill_regression.guideline14_statistics([100, 200, 300, 400], [110, 190, 310, 390], 2)
    assert cv == pytest.approx(100 * math.sqrt(200) / 250, rel=1e-12)
    assert nmbe == pytest.approx(0.0, abs=1e-12)
    # all residuals +10 (measured above the model): NMBE = 100·40/(2·250) = 8 %
    cv, nmbe = bill_regression.guideline14_statistics([100, 200, 300, 400], [90, 190, 290, 390], 2)
    assert nmbe == pytest.approx(8.0, rel=1e-12)
    assert cv == pytest.approx(5.656854, rel=1e-6)
    # n ≤ p: not computable
    assert bill_regression.guideline14_statistics([1, 2, 3], [1, 2, 3], 3) == (None, None)


def test_exact_fit_found_by_hand():
    # Four 10-day blocks at 0, 10, 20 and 5 °C; α = 1 /day, β = 0.5 per K·day, τ = 15 °C:
    # HDD = 150, 50, 0, 100 -> use = 10 + 75 = 85, 10 + 25 = 35, 10, 10 + 50 = 60.
    # For τ in (10, 20] the x's are τ, τ − 10, 0, τ − 5 per day; y = 8.5, 3.5, 1, 6 lie on a
    # line only when 10 / (τ − 10) = (8.5 − 3.5) / (3.5 − 1) = 2, i.e. τ = 15.
    temps, periods = steps((0.0, 10), (10.0, 10), (20.0, 10), (5.0, 10))
    fit = b.fit_bills(temps, with_use(periods, [85.0, 35.0, 10.0, 60.0]))
    assert fit.model == "heating"
    assert fit.base_c == pytest.approx(15.0, abs=bill_model.BASE_TOLERANCE_K)
    assert fit.baseload_per_day == pytest.approx(1.0, abs=1e-3)
    assert fit.heating_slope == pytest.approx(0.5, rel=1e-3)
    assert fit.parameters == 3  # α, β and τ
    assert fit.r_squared == pytest.approx(1.0, abs=1e-6)
    assert fit.cv_rmse == pytest.approx(0.0, abs=0.05)  # n − p = 1
    assert fit.hdd == pytest.approx((150.0, 50.0, 0.0, 100.0), abs=0.1)


def test_normalize_and_ua_by_hand():
    temps, periods = steps((0.0, 10), (10.0, 10), (20.0, 10), (5.0, 10))
    fit = b.fit_bills(temps, with_use(periods, [85.0, 35.0, 10.0, 60.0]))
    # normal year: 365 days at 5 °C -> HDD(15) = 3650 K·day; annual = 365·1 + 0.5·3650
    normal = bill_figures.normalize(fit, [5.0] * 365)
    assert normal.hdd_k_day == pytest.approx(3650.0, rel=2e-3)
    assert normal.annual_use == pytest.approx(365.0 + 1825.0, rel=2e-3)
    assert normal.heating_use == pytest.approx(1825.0, rel=2e-3)
    # 0.36 therm/(K·day) × 105 505 585 J/therm × 0.8 / 86 400 s = 351.685 W/K
    # (= 0.2 therm/(°F·day) × 100 000 Btu × 0.8 / 24 h = 666.67 Btu/(h·°F))
    assert bill_figures.apparent_ua_w_per_k(0.36, 1.0e5 * 1055.05585262, 0.8) == pytest.approx(
        351.6853, rel=1e-6
    )


def test_single_period_is_baseload():
    temps, periods = steps((0.0, 30))
    fit = b.fit_bills(temps, with_use(periods, [90.0]))
    assert fit.model == "baseload"
    assert fit.baseload_per_day == pytest.approx(3.0)  # 90 / 30
    assert fit.heating_slope == 0.0 and fit.base_c is None
    assert (fit.cv_rmse, fit.nmbe, fit.r_squared, fit.heating_slope_std_error) == (None,) * 4


def test_two_periods_fix_the_base_at_65_f():
    temps, periods = steps((0.0, 30), (10.0, 30))
    fit = b.fit_bills(temps, with_use(periods, [300.0, 150.0]))
    assert fit.base_c == pytest.approx(f_to_c(65.0))
    assert not fit.base_searched
    # exact through both points: x = 18.33 and 8.33 per day, y = 10 and 5 -> β = 0.5
    assert fit.heating_slope == pytest.approx(0.5, rel=1e-9)
    assert fit.parameters == 2 and fit.cv_rmse is None


def test_no_heating_signal_falls_back_to_the_baseload():
    # use falls as it gets colder (β < 0 at every base): the baseload alone, α = ΣU / Σn
    temps, periods = steps(*[(t, 30) for t in (0.0, 5.0, 10.0, 15.0, 20.0, 25.0)])
    uses = [30.0, 40.0, 50.0, 60.0, 70.0, 80.0]
    fit = b.fit_bills(temps, with_use(periods, uses))
    assert fit.model == "baseload"
    assert fit.heating_slope == 0.0
    assert fit.baseload_per_day == pytest.approx(sum(uses) / 180.0)
    assert fit.parameters == 1
    assert sum(fit.predicted) == pytest.approx(sum(uses))


def test_water_heating_only_is_all_baseload():
    # 2 units a day whatever the weather: no slope at any base, so the baseload carries it
    temps, periods = steps(*[(t, d) for t, d in ((0, 31), (4, 28), (12, 31), (18, 30), (24, 31))])
    fit = b.fit_bills(temps, with_use(periods, [2.0 * p.days for p in periods]))
    assert fit.model == "baseload"
    assert fit.baseload_per_day == pytest.approx(2.0)
    assert bill_figures.normalize(fit, [0.0] * 365).heating_use == 0.0


def test_cooling_term_only_for_electric_meters_and_when_it_helps():
    # 8 blocks; α = 10 kWh/day, β = 2 per K·day at 15 °C, γ = 3 per K·day at 22 °C
    blocks = [(t, 30) for t in (0.0, 5.0, 10.0, 14.0, 18.0, 24.0, 28.0, 8.0)]
    temps, periods = steps(*blocks)
    uses = [
        30 * (10 + 2 * max(0.0, 15 - t) + 3 * max(0.0, t - 22)) for t, _d in blocks
    ]  # fmt: skip
    fit = b.fit_bills(temps, with_use(periods, uses), cooling=True)
    assert fit.model == "heating_and_cooling"
    assert fit.parameters == 5
    assert fit.base_c == pytest.approx(15.0, abs=0.05)
    assert fit.cooling_slope == pytest.approx(3.0, rel=0.02)
    assert fit.heating_slope == pytest.approx(2.0, rel=0.02)
    assert fit.cv_rmse is not None and fit.cv_rmse < 0.5
    heating_only = b.fit_bills(temps, with_use(periods, uses), cooling=False)
    assert heating_only.model == "heating" and heating_only.cooling_slope is None
    assert heating_only.cv_rmse is not None and heating_only.cv_rmse > fit.cv_rmse


@pytest.mark.parametrize(
    "periods, message",
    [
        ([], "no periods"),
        ([bill_model.Period(0, 0, 1.0)], "at least one day"),
        ([bill_model.Period(0, 10, -1.0)], "zero or more"),
        ([bill_model.Period(0, 10, math.nan)], "finite"),
        ([bill_model.Period(25, 10, 1.0)], "cover"),
    ],
)
def test_bad_periods_raise_value_error(periods, message):
    with pytest.raises(ValueError, match=message):
        b.fit_bills([0.0] * 30, periods)


def test_criteria_name_their_source_and_judge_the_fit():
    temps, periods = steps(*[(t, 30) for t in (0.0, 5.0, 10.0, 15.0, 20.0, 25.0)])
    uses = [30 * (1 + 0.5 * max(0.0, 16 - t)) * f for t, f in zip(
        (0.0, 5.0, 10.0, 15.0, 20.0, 25.0), (1.05, 0.95, 1.02, 0.97, 1.0, 1.01), strict=True)]  # fmt: skip
    fit = b.fit_bills(temps, with_use(periods, uses))
    checks = bill_figures.criteria(fit)
    assert [c.limit_percent for c in checks] == [15.0, 5.0, 20.0, 0.005]
    assert all("Guideline 14" in c.source for c in checks)
    for check in checks:
        value = fit.cv_rmse if check.statistic == "cv_rmse" else fit.nmbe
        assert check.value == value
        assert check.met == (abs(value) <= check.limit_percent)
    # weighted least squares leaves no bias on the bills' total: NMBE = 0 (to rounding)
    assert abs(fit.nmbe) < 1e-9


# --- invariants ----------------------------------------------------------------------------


def synthetic(seed: int, alpha: float, beta: float, base: float, noise: float):
    """A year and a half of daily means (a seasonal sine plus weather noise) and its bills."""
    rng = np.random.default_rng(seed)
    days = np.arange(540)
    temps = 12.0 - 11.0 * np.cos(2 * np.pi * days / 365.0) + rng.normal(0.0, 3.0, days.size)
    periods, start = [], 0
    while True:
        n = int(rng.integers(27, 35))
        if start + n > days.size:
            break
        use = alpha * n + beta * float(np.maximum(base - temps[start : start + n], 0).sum())
        use *= 1.0 + float(rng.normal(0.0, noise))
        periods.append(bill_model.Period(start, n, max(use, 0.0)))
        start += n
    return temps, periods


bill_cases = st.tuples(
    st.integers(0, 10_000),
    st.floats(0.0, 5.0),
    st.floats(0.05, 2.0),
    st.floats(8.0, 20.0),
    st.floats(0.0, 0.1),
)


@settings(max_examples=40, deadline=None)
@given(case=bill_cases, power=st.integers(-6, 6))
def test_scaling_use_by_a_power_of_two_scales_alpha_and_beta_and_keeps_the_base(case, power):
    # multiplying by 2^m is exact in binary floating point, so every sum and comparison of the
    # search scales exactly: the same τ, and α, β times k
    temps, periods = synthetic(*case)
    k = 2.0**power
    fit = b.fit_bills(temps, periods)
    scaled = b.fit_bills(
        temps, [bill_model.Period(p.first_day, p.days, p.use * k) for p in periods]
    )
    assert scaled.model == fit.model
    assert scaled.base_c == fit.base_c
    assert scaled.baseload_per_day == pytest.approx(k * fit.baseload_per_day, rel=1e-12, abs=1e-300)
    assert scaled.heating_slope == pytest.approx(k * fit.heating_slope, rel=1e-12, abs=1e-300)


@settings(max_examples=25, deadline=None)
@given(case=bill_cases, k=st.floats(0.01, 100.0))
def test_scaling_use_by_any_factor_scales_alpha_and_beta(case, k):
    temps, periods = synthetic(*case)
    fit = b.fit_bills(temps, periods)
    scaled = b.fit_bills(
        temps, [bill_model.Period(p.first_day, p.days, p.use * k) for p in periods]
    )
    assert fit.model == "heating"  # β ≥ 0.05 per K·day: the signal is always there
    # the search compares scaled errors: rounding may move τ by at most the final bracket
    assert scaled.base_c == pytest.approx(fit.base_c, abs=2 * bill_model.BASE_TOLERANCE_K)
    assert scaled.heating_slope == pytest.approx(k * fit.heating_slope, rel=2e-3)
    assert scaled.baseload_per_day == pytest.approx(
        k * fit.baseload_per_day, rel=2e-3, abs=1e-3 * k * fit.heating_slope
    )


@settings(max_examples=40, deadline=None)
@given(case=bill_cases)
def test_weighted_residuals_sum_to_zero(case):
    # the normal equation of α with weights n_i: Σ n_i (y_i − ŷ_i) = Σ (U_i − Û_i) = 0
    temps, periods = synthetic(*case)
    fit = b.fit_bills(temps, periods)
    total = sum(fit.use)
    assert abs(sum(u - p for u, p in zip(fit.use, fit.predicted, strict=True))) <= 1e-9 * total
    assert fit.nmbe is not None and abs(fit.nmbe) < 1e-7
