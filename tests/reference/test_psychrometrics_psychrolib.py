"""Psychrometric wrappers against psychrolib and an independent Magnus formula.

Outside sources:
* psychrolib 2.5 (ASHRAE Handbook—Fundamentals 2017, ch. 1, eq. 5 and 6), called directly here.
* The Magnus formula with the Alduchov & Eskridge (1996) coefficients (from memory):
  over water e_s = 610.94 exp(17.625 t / (t + 243.04)) Pa, over ice
  e_s = 611.21 exp(22.587 t / (t + 273.86)) Pa. The two formulations differ by up to about
  0.24 % between 5 °C and 30 °C (Alduchov & Eskridge quote errors under 0.4 % against
  their reference), so the pressure tolerance is 0.3 %; dew points agree within 0.05 K.
"""

from __future__ import annotations

import math

import psychrolib
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from server.physics.psychrometrics import (
    dew_point_c,
    dew_point_from_vapour_pressure_c,
    saturation_vapour_pressure_pa,
    vapour_pressure_pa,
)


def magnus_saturation_pa(temp_c: float) -> float:
    """Alduchov & Eskridge (1996) Magnus form (from memory): ice below 0 °C, water above."""
    if temp_c < 0.0:
        return 611.21 * math.exp(22.587 * temp_c / (temp_c + 273.86))
    return 610.94 * math.exp(17.625 * temp_c / (temp_c + 243.04))


def magnus_dew_point_c(vapour_pressure: float) -> float:
    """Inverse of the over-water Magnus form: t = 243.04 g / (17.625 - g), g = ln(e / 610.94)."""
    g = math.log(vapour_pressure / 610.94)
    return 243.04 * g / (17.625 - g)


def test_published_psychrolib_values():
    # psychrolib GetTDewPointFromRelHum(21.0, 0.40) = 6.8995 °C
    assert dew_point_c(21.0, 0.40) == pytest.approx(6.8995, abs=5e-4)
    # psychrolib GetSatVapPres(21.0) = 2487.67 Pa (over water)
    assert saturation_vapour_pressure_pa(21.0) == pytest.approx(2487.67, abs=0.01)
    # psychrolib GetSatVapPres(-5.0) = 401.76 Pa (over ice)
    assert saturation_vapour_pressure_pa(-5.0) == pytest.approx(401.76, abs=0.01)


def test_over_ice_below_the_triple_point():
    # Over ice the saturation pressure is lower than over supercooled water: at -5 °C the
    # Magnus over-water form gives 610.94 exp(17.625 × -5 / 238.04) = 610.94 × 0.69059
    # = 421.9 Pa; the over-ice value is 401.8 Pa (psychrolib).
    over_water = 610.94 * math.exp(17.625 * -5.0 / (-5.0 + 243.04))
    assert over_water == pytest.approx(421.9, abs=0.1)
    assert saturation_vapour_pressure_pa(-5.0) < over_water - 15.0
    # Continuity at the triple point (0.01 °C): both branches give 611.66 Pa (psychrolib).
    assert saturation_vapour_pressure_pa(0.01) == pytest.approx(611.66, abs=0.05)


def test_vapour_pressure_is_rh_times_saturation():
    # 0.40 × 2487.67 Pa = 995.07 Pa (psychrolib GetVapPresFromRelHum(21, 0.4))
    assert vapour_pressure_pa(21.0, 0.40) == pytest.approx(995.07, abs=0.01)
    psychrolib.SetUnitSystem(psychrolib.SI)
    assert vapour_pressure_pa(-10.0, 0.8) == pytest.approx(
        psychrolib.GetVapPresFromRelHum(-10.0, 0.8), rel=1e-12
    )


def test_survives_another_caller_switching_psychrolib_to_ip():
    # psychrolib's unit system is global state; the wrappers must still answer in SI.
    psychrolib.SetUnitSystem(psychrolib.IP)
    try:
        assert saturation_vapour_pressure_pa(21.0) == pytest.approx(2487.67, abs=0.01)
    finally:
        psychrolib.SetUnitSystem(psychrolib.SI)


@settings(max_examples=200, deadline=None)
@given(st.floats(min_value=-40.0, max_value=50.0))
def test_saturation_matches_magnus_within_0_3_percent(temp_c):
    # Independent check: Alduchov & Eskridge Magnus form (from memory), 0.3 % (see module doc).
    assert saturation_vapour_pressure_pa(temp_c) == pytest.approx(
        magnus_saturation_pa(temp_c), rel=3e-3
    )


@settings(max_examples=200, deadline=None)
@given(st.floats(min_value=5.0, max_value=35.0), st.floats(min_value=0.2, max_value=1.0))
def test_dew_point_matches_magnus_within_0_05_k(temp_c, rh):
    # Dew points above 0 °C (over water), compared with the inverted Magnus form.
    vapour = vapour_pressure_pa(temp_c, rh)
    if magnus_dew_point_c(vapour) > 0.5:
        assert dew_point_c(temp_c, rh) == pytest.approx(magnus_dew_point_c(vapour), abs=0.05)


@settings(max_examples=200, deadline=None)
@given(st.floats(min_value=-40.0, max_value=60.0), st.floats(min_value=0.01, max_value=1.0))
def test_dew_point_is_never_above_the_air_temperature(temp_c, rh):
    # Invariant: saturated air (rh = 1) has its dew point at the air temperature; drier air
    # below it (psychrolib's solver tolerance is 0.001 K).
    assert dew_point_c(temp_c, rh) <= temp_c + 2e-3


def test_limiting_cases():
    # Perfectly dry air has no dew point: the wrapper says so instead of returning -100 °C.
    assert dew_point_from_vapour_pressure_c(0.0) is None
    with pytest.raises(ValueError, match="dry"):
        dew_point_c(21.0, 0.0)
    # Saturated air: the dew point is the air temperature itself (psychrolib, 0.001 K).
    assert dew_point_c(15.0, 1.0) == pytest.approx(15.0, abs=2e-3)


@pytest.mark.parametrize(
    ("temp_c", "rh"),
    [(float("nan"), 0.5), (float("inf"), 0.5), (-150.0, 0.5), (21.0, 1.2), (21.0, -0.1)],
)
def test_bad_input_raises_plain_value_error(temp_c, rh):
    with pytest.raises(ValueError):
        vapour_pressure_pa(temp_c, rh)
