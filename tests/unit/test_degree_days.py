"""Degree-days, design temperatures, climate zone and balance point (server.physics.degree_days).

Sources: ASHRAE Handbook—Fundamentals (2021) ch. 19 (degree-day definitions, variable-base
method); numpy.percentile (the linear-interpolation percentile, Hyndman & Fan definition 7);
ASHRAE Standard 169-2013 thermal zone thresholds (from memory); hand-worked arithmetic.
"""

from __future__ import annotations

import math
from datetime import date, timedelta

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from server.physics import degree_days as dd
from server.physics.units import c_to_f

START = date(2023, 1, 1)
TEMPS = st.floats(min_value=-40.0, max_value=45.0, allow_nan=False, allow_infinity=False)
BASES = st.floats(min_value=-20.0, max_value=35.0, allow_nan=False, allow_infinity=False)


def make_days(means: list[float], start: date = START) -> list[dd.DailyMean]:
    return [
        dd.DailyMean(day=start + timedelta(days=i), mean_c=m, values=1) for i, m in enumerate(means)
    ]


# --- daily means ---------------------------------------------------------------------------


def test_daily_mean_of_hourly_values_hand_worked():
    # Day 1: 12 h at 10 °C and 12 h at 20 °C -> (12*10 + 12*20) / 24 = 15 °C.
    # Day 2: 24 h at -3 °C -> -3 °C.
    dates = [START] * 24 + [START + timedelta(days=1)] * 24
    temps = [10.0] * 12 + [20.0] * 12 + [-3.0] * 24
    days = dd.daily_means(dates, temps)
    assert [d.day for d in days] == [START, START + timedelta(days=1)]
    assert days[0].mean_c == pytest.approx(15.0, abs=1e-12)
    assert days[1].mean_c == pytest.approx(-3.0, abs=1e-12)
    assert [d.values for d in days] == [24, 24]


def test_daily_mean_of_daily_values_is_the_value():
    # Daily data: one value a day, the daily mean is that value (ASHRAE Fundamentals ch. 19).
    days = dd.daily_means([START, START + timedelta(days=1)], [4.5, 7.25])
    assert [d.mean_c for d in days] == [4.5, 7.25]


@pytest.mark.parametrize(
    ("dates", "temps", "words"),
    [
        ([START], [], "exactly one date"),
        ([], [], "no temperatures"),
        ([START], [math.nan], "not finite"),
        ([START], [math.inf], "not finite"),
    ],
)
def test_daily_means_refuse_bad_input(dates, temps, words):
    with pytest.raises(ValueError, match=words):
        dd.daily_means(dates, temps)


# --- HDD / CDD -----------------------------------------------------------------------------


def test_hdd_cdd_hand_worked():
    # Means 10, 18, 25 °C at base 18 °C:
    #   HDD = (18-10) + 0 + 0 = 8 K·day;  CDD = 0 + 0 + (25-18) = 7 K·day.
    means = [10.0, 18.0, 25.0]
    assert dd.heating_degree_days(means, 18.0) == pytest.approx(8.0, abs=1e-12)
    assert dd.cooling_degree_days(means, 18.0) == pytest.approx(7.0, abs=1e-12)
    # Same means, cooling base 20 °C: CDD = 25 - 20 = 5 K·day.
    totals = dd.degree_days(make_days(means), heating_base_c=18.0, cooling_base_c=20.0)
    assert (totals.hdd_k_day, totals.cdd_k_day, totals.days) == pytest.approx((8.0, 5.0, 3))


def test_limit_constant_temperature_equal_to_base_gives_zero():
    # Limiting case: daily mean == base every day -> every term max(0, 0) = 0.
    means = [18.3] * 365
    assert dd.heating_degree_days(means, 18.3) == 0.0
    assert dd.cooling_degree_days(means, 18.3) == 0.0


def test_limit_constant_ten_kelvin_below_base_for_a_year():
    # Limiting case: 365 days at 10 K below the base -> 365 * 10 = 3650 K·day, CDD 0.
    means = [8.3] * 365
    assert dd.heating_degree_days(means, 18.3) == pytest.approx(3650.0, rel=1e-12)
    assert dd.cooling_degree_days(means, 18.3) == 0.0


def test_limit_no_days_gives_zero():
    # Limiting case: an empty month contributes nothing.
    assert dd.heating_degree_days([], 18.0) == 0.0


@pytest.mark.parametrize("base", [math.nan, math.inf, -math.inf, -60.0, 51.0])
def test_bad_base_is_refused(base):
    with pytest.raises(ValueError, match="heating base"):
        dd.heating_degree_days([10.0], base)


@settings(max_examples=200, deadline=None)
@given(st.lists(TEMPS, min_size=1, max_size=400), BASES)
def test_hdd_minus_cdd_is_sum_of_base_minus_mean(means, base):
    # Invariant: max(0, x) - max(0, -x) = x, so HDD_b - CDD_b = Σ (b - T_mean) for any base.
    difference = dd.heating_degree_days(means, base) - dd.cooling_degree_days(means, base)
    expected = math.fsum(base - m for m in means)
    assert difference == pytest.approx(expected, abs=1e-9 * (1 + len(means) * 100))


@settings(max_examples=200, deadline=None)
@given(st.lists(TEMPS, min_size=1, max_size=200), BASES, BASES)
def test_hdd_non_decreasing_and_cdd_non_increasing_in_base(means, base_a, base_b):
    low, high = sorted((base_a, base_b))
    assert dd.heating_degree_days(means, high) >= dd.heating_degree_days(means, low) - 1e-9
    assert dd.cooling_degree_days(means, high) <= dd.cooling_degree_days(means, low) + 1e-9


@settings(max_examples=200, deadline=None)
@given(st.lists(TEMPS, min_size=1, max_size=200), BASES)
def test_ip_degree_days_are_1_8_times_si_at_matching_bases(means, base_c):
    # HDD in °F·day = 1.8 x HDD in K·day when the base is the same temperature
    # (65 °F = 18.33 °C): computed here in °F directly from the definition.
    base_f = c_to_f(base_c)
    hdd_f = math.fsum(max(0.0, base_f - c_to_f(m)) for m in means)
    assert hdd_f == pytest.approx(1.8 * dd.heating_degree_days(means, base_c), rel=1e-9, abs=1e-7)


# --- monthly table -------------------------------------------------------------------------


def test_monthly_table_hand_worked_and_always_twelve_rows():
    # 31 January days at 8 °C and 28 February days at 13 °C, base 18 °C:
    #   January HDD = 31 * 10 = 310; February HDD = 28 * 5 = 140; other months 0, days 0.
    days = make_days([8.0] * 31 + [13.0] * 28)
    rows = dd.monthly_degree_days(days, heating_base_c=18.0, cooling_base_c=18.0)
    assert [r.month for r in rows] == list(range(1, 13))
    assert rows[0].hdd_k_day == pytest.approx(310.0) and rows[0].days == 31
    assert rows[1].hdd_k_day == pytest.approx(140.0) and rows[1].days == 28
    assert all(r.hdd_k_day == 0 and r.cdd_k_day == 0 and r.days == 0 for r in rows[2:])


@settings(max_examples=100, deadline=None)
@given(st.lists(TEMPS, min_size=1, max_size=366), BASES)
def test_monthly_rows_add_up_to_the_annual_total(means, base):
    days = make_days(means)
    rows = dd.monthly_degree_days(days, heating_base_c=base, cooling_base_c=base)
    totals = dd.degree_days(days, heating_base_c=base, cooling_base_c=base)
    assert math.fsum(r.hdd_k_day for r in rows) == pytest.approx(totals.hdd_k_day, abs=1e-7)
    assert math.fsum(r.cdd_k_day for r in rows) == pytest.approx(totals.cdd_k_day, abs=1e-7)
    assert sum(r.days for r in rows) == len(means)


# --- percentiles and design temperatures ---------------------------------------------------


def test_percentile_hand_worked():
    # x = 1..5, p = 0.01: h = 4 * 0.01 = 0.04 -> 1 + 0.04 * (2 - 1) = 1.04.
    # p = 0.99: h = 3.96 -> 4 + 0.96 * (5 - 4) = 4.96.  p = 0 and 1 give min and max.
    values = [5.0, 3.0, 1.0, 4.0, 2.0]
    assert dd.percentile_linear(values, 0.01) == pytest.approx(1.04, abs=1e-12)
    assert dd.percentile_linear(values, 0.99) == pytest.approx(4.96, abs=1e-12)
    assert dd.percentile_linear(values, 0.0) == 1.0
    assert dd.percentile_linear(values, 1.0) == 5.0
    assert dd.percentile_linear([7.0], 0.5) == 7.0  # limiting case: one value


@settings(max_examples=200, deadline=None)
@given(st.lists(TEMPS, min_size=1, max_size=300), st.floats(min_value=0.0, max_value=1.0))
def test_percentile_matches_numpy_default(values, fraction):
    # Outside source: numpy.percentile(method="linear"), Hyndman & Fan definition 7.
    expected = float(np.percentile(values, fraction * 100.0))
    assert dd.percentile_linear(values, fraction) == pytest.approx(expected, abs=1e-9)


def test_design_temperatures_hand_worked():
    # 101 values 0..100: 1st percentile h = 100 * 0.01 = 1 -> 1.0; 99th h = 99 -> 99.0.
    design = dd.design_temperatures([float(v) for v in range(101)], basis="hourly")
    assert (design.heating_c, design.cooling_c, design.basis) == (1.0, 99.0, "hourly")


@pytest.mark.parametrize(("values", "fraction"), [([], 0.5), ([1.0], 1.5), ([1.0], -0.1)])
def test_percentile_refuses_bad_input(values, fraction):
    with pytest.raises(ValueError):
        dd.percentile_linear(values, fraction)


def test_design_basis_must_be_known():
    with pytest.raises(ValueError, match="basis"):
        dd.design_temperatures([1.0], basis="weekly")


# --- thermal climate zone ------------------------------------------------------------------


@pytest.mark.parametrize(
    ("hdd18", "cdd10", "zone"),
    [
        # ASHRAE Standard 169-2013 thermal zone thresholds (from memory), one case per row:
        (0.0, 6500.0, 0),  # 6000 < CDD10
        (0.0, 6000.0, 1),  # 5000 < CDD10 <= 6000 (6000 itself is zone 1)
        (100.0, 5500.0, 1),
        (500.0, 4000.0, 2),  # 3500 < CDD10 <= 5000
        (1500.0, 3000.0, 3),  # CDD10 <= 3500 and HDD18 <= 2000
        (2000.0, 3500.0, 3),  # both limits inclusive
        (2500.0, 2000.0, 4),  # CDD10 <= 3500 and 2000 < HDD18 <= 3000
        (3000.0, 0.0, 4),
        (3500.0, 1000.0, 5),  # 3000 < HDD18 <= 4000
        (4500.0, 500.0, 6),  # 4000 < HDD18 <= 5000
        (6000.0, 100.0, 7),  # 5000 < HDD18 <= 7000
        (7000.0, 0.0, 7),
        (8000.0, 0.0, 8),  # 7000 < HDD18
    ],
)
def test_thermal_climate_zone_thresholds(hdd18, cdd10, zone):
    assert dd.thermal_climate_zone(hdd18, cdd10).number == zone


@settings(max_examples=200, deadline=None)
@given(st.floats(0, 20000), st.floats(0, 10000))
def test_every_climate_gets_exactly_one_zone(hdd18, cdd10):
    # Invariant: the table covers every non-negative pair.
    assert 0 <= dd.thermal_climate_zone(hdd18, cdd10).number <= 8


@pytest.mark.parametrize(("hdd18", "cdd10"), [(-1.0, 0.0), (0.0, -1.0), (math.nan, 0.0)])
def test_climate_zone_refuses_bad_input(hdd18, cdd10):
    with pytest.raises(ValueError):
        dd.thermal_climate_zone(hdd18, cdd10)


# --- balance point and variable-base degree-days -------------------------------------------


def test_balance_point_hand_worked():
    # t_bal = 20 °C - 1000 W / 200 W/K = 20 - 5 = 15 °C (ASHRAE Fundamentals ch. 19).
    assert dd.balance_point_temperature_c(20.0, 1000.0, 200.0) == pytest.approx(15.0)
    # Limiting case: no gains -> the balance point is the setpoint.
    assert dd.balance_point_temperature_c(21.0, 0.0, 150.0) == 21.0


@pytest.mark.parametrize(
    ("setpoint", "gains", "ua", "words"),
    [
        (20.0, 100.0, 0.0, "UA"),
        (20.0, 100.0, -5.0, "UA"),
        (20.0, -1.0, 100.0, "gains"),
        (math.nan, 100.0, 100.0, "setpoint"),
        (20.0, math.inf, 100.0, "gains"),
    ],
)
def test_balance_point_refuses_bad_input(setpoint, gains, ua, words):
    with pytest.raises(ValueError, match=words):
        dd.balance_point_temperature_c(setpoint, gains, ua)


def test_variable_base_degree_days_hand_worked():
    # t_bal = 20 - 500 / 100 = 15 °C; means 10, 12, 16 °C -> HDD = 5 + 3 + 0 = 8 K·day.
    result = dd.variable_base_degree_days(
        make_days([10.0, 12.0, 16.0]), setpoint_c=20.0, internal_gains_w=500.0, ua_w_per_k=100.0
    )
    assert result.balance_point_c == pytest.approx(15.0)
    assert result.hdd_k_day == pytest.approx(8.0)
    assert result.days == 3


def test_variable_base_refuses_an_absurd_balance_point():
    # 20 - 10000 / 10 = -980 °C: the gains or UA are wrong, say so.
    with pytest.raises(ValueError, match="balance point"):
        dd.variable_base_degree_days(
            make_days([0.0]), setpoint_c=20.0, internal_gains_w=10000.0, ua_w_per_k=10.0
        )


@settings(max_examples=100, deadline=None)
@given(
    st.lists(TEMPS, min_size=1, max_size=100),
    st.floats(15.0, 24.0),
    st.floats(0.0, 3000.0),
    st.floats(50.0, 1000.0),
)
def test_more_gains_never_raise_variable_base_hdd(means, setpoint, gains, ua):
    # Invariant: extra gains lower the balance point, so HDD at it cannot grow.
    days = make_days(means)
    base = dd.variable_base_degree_days(
        days, setpoint_c=setpoint, internal_gains_w=0.0, ua_w_per_k=ua
    )
    more = dd.variable_base_degree_days(
        days, setpoint_c=setpoint, internal_gains_w=gains, ua_w_per_k=ua
    )
    assert more.hdd_k_day <= base.hdd_k_day + 1e-9


# --- degree-days by base table -------------------------------------------------------------


def test_interpolate_degree_days_hand_worked():
    # Between (10 °C, 100) and (11 °C, 130): at 10.5 °C, 100 + 0.5 * 30 = 115 K·day.
    assert dd.interpolate_degree_days([10.0, 11.0, 12.0], [100.0, 130.0, 165.0], 10.5) == 115.0
    # At a table base the table value comes back (limiting case).
    assert dd.interpolate_degree_days([10.0, 11.0, 12.0], [100.0, 130.0, 165.0], 12.0) == 165.0


@pytest.mark.parametrize(
    ("bases", "values", "base"),
    [
        ([], [], 1.0),
        ([1.0, 2.0], [1.0], 1.5),
        ([2.0, 1.0], [1.0, 2.0], 1.5),
        ([1.0, 2.0], [1.0, 2.0], 3.0),
    ],
)
def test_interpolate_degree_days_refuses_bad_tables(bases, values, base):
    with pytest.raises(ValueError):
        dd.interpolate_degree_days(bases, values, base)


@settings(max_examples=100, deadline=None)
@given(st.lists(TEMPS, min_size=1, max_size=200), st.floats(0.0, 30.0))
def test_interpolated_hdd_brackets_the_direct_value(means, base):
    # HDD is convex in the base: linear interpolation between 1 K steps is never below the
    # direct value and at most 0.25 K·day per day above it.
    bases = [float(b) for b in range(0, 31)]
    table = [dd.heating_degree_days(means, b) for b in bases]
    direct = dd.heating_degree_days(means, base)
    interpolated = dd.interpolate_degree_days(bases, table, base)
    assert direct - 1e-9 <= interpolated <= direct + 0.25 * len(means) + 1e-9
