"""Moist-air properties for the condensation check: thin SI wrappers over psychrolib.

psychrolib implements the ASHRAE formulation [1]; it keeps its unit system as global state,
so this module sets SI once on import and re-asserts it before each call (another caller could
have switched it).

Relative humidity is a fraction from 0 to 1 everywhere here (0.40 means 40 %).

References
----------
[1] ASHRAE Handbook—Fundamentals (2017), ch. 1 "Psychrometrics", eq. 5 (saturation pressure
    over ice, -100 °C to 0 °C), eq. 6 (over liquid water, 0 °C to 200 °C), eq. 12 and 24
    (relative humidity as the ratio of vapour pressure to saturation pressure).
[2] D. Meyer and D. Thevenard, "PsychroLib: a library of psychrometric functions to calculate
    thermodynamic properties of air", Journal of Open Source Software 4(33), 1137 (2019).
"""

from __future__ import annotations

import math

import psychrolib

psychrolib.SetUnitSystem(psychrolib.SI)

#: Validity range of the ASHRAE saturation-pressure equations [1], [°C].
MIN_TEMP_C = -100.0
MAX_TEMP_C = 200.0
#: psychrolib switches from ice to liquid water at the triple point, 0.01 °C [2].
TRIPLE_POINT_C = 0.01


def _ensure_si() -> None:
    if psychrolib.GetUnitSystem() is not psychrolib.SI:
        psychrolib.SetUnitSystem(psychrolib.SI)


def _check_temp(temp_c: float, what: str = "temperature") -> float:
    value = float(temp_c)
    if not math.isfinite(value):
        raise ValueError(f"the {what} must be a number")
    if value < MIN_TEMP_C or value > MAX_TEMP_C:
        raise ValueError(
            f"the {what} must be between {MIN_TEMP_C:g} °C and {MAX_TEMP_C:g} °C (got {value:g} °C)"
        )
    return value


def _check_rh(rh: float, what: str = "relative humidity") -> float:
    value = float(rh)
    if not math.isfinite(value) or value < 0.0 or value > 1.0:
        raise ValueError(f"the {what} must be a fraction from 0 to 1 (0.40 means 40 %)")
    return value


def saturation_vapour_pressure_pa(temp_c: float) -> float:
    """Saturation pressure of water vapour [Pa], over ice at or below 0.01 °C.

    Parameters
    ----------
    temp_c : float
        Temperature [°C], from -100 to 200.

    Returns
    -------
    float
        Saturation vapour pressure p_sat [Pa].

    Notes
    -----
    ln p_sat = C1/T + C2 + C3 T + C4 T² + C5 T³ + C6 T⁴ + C7 ln T over ice, and
    ln p_sat = C8/T + C9 + C10 T + C11 T² + C12 T³ + C13 ln T over water, with T in kelvin and
    the coefficients of [1] eq. 5 and 6 (psychrolib [2] uses the triple point as the switch).

    Examples
    --------
    >>> round(saturation_vapour_pressure_pa(21.0), 2)
    2487.67
    """
    value = _check_temp(temp_c)
    _ensure_si()
    return float(psychrolib.GetSatVapPres(value))


def vapour_pressure_pa(temp_c: float, rh: float) -> float:
    """Partial pressure of water vapour in moist air [Pa].

    Parameters
    ----------
    temp_c : float
        Dry-bulb temperature [°C], from -100 to 200.
    rh : float
        Relative humidity [-], a fraction from 0 to 1.

    Returns
    -------
    float
        Vapour pressure p_v = rh × p_sat(temp_c) [Pa] ([1] eq. 12 and 24).
    """
    value = _check_temp(temp_c)
    humidity = _check_rh(rh)
    _ensure_si()
    return float(psychrolib.GetVapPresFromRelHum(value, humidity))


def dew_point_from_vapour_pressure_c(vapour_pressure_pa: float) -> float | None:
    """Dew-point (or frost-point) temperature of a vapour pressure [°C].

    Parameters
    ----------
    vapour_pressure_pa : float
        Partial pressure of water vapour [Pa], zero or more.

    Returns
    -------
    float or None
        The temperature whose saturation pressure equals ``vapour_pressure_pa`` [°C], found by
        inverting [1] eq. 5/6 (psychrolib [2], Newton-Raphson); ``None`` when the air is so dry
        that the dew point lies below -100 °C (for example a vapour pressure of 0).
    """
    pressure = float(vapour_pressure_pa)
    if not math.isfinite(pressure) or pressure < 0.0:
        raise ValueError("a vapour pressure must be zero or more")
    _ensure_si()
    if pressure < psychrolib.GetSatVapPres(MIN_TEMP_C):
        return None
    if pressure > psychrolib.GetSatVapPres(MAX_TEMP_C):
        raise ValueError("the vapour pressure is above saturation at 200 °C")
    return float(psychrolib.GetTDewPointFromVapPres(MAX_TEMP_C, pressure))


def dew_point_c(temp_c: float, rh: float) -> float:
    """Dew-point temperature of moist air [°C] (frost point below 0.01 °C).

    Parameters
    ----------
    temp_c : float
        Dry-bulb temperature [°C], from -100 to 200.
    rh : float
        Relative humidity [-], a fraction greater than 0 and at most 1.

    Returns
    -------
    float
        T_dp with p_sat(T_dp) = rh × p_sat(temp_c) [°C] ([1] eq. 5, 6; psychrolib [2]).

    Examples
    --------
    >>> round(dew_point_c(21.0, 0.40), 4)
    6.8995
    """
    value = _check_temp(temp_c)
    humidity = _check_rh(rh)
    if humidity == 0.0:
        raise ValueError("perfectly dry air has no dew point; give a relative humidity above 0")
    result = dew_point_from_vapour_pressure_c(vapour_pressure_pa(value, humidity))
    if result is None:
        raise ValueError("the air is so dry that its dew point is below -100 °C")
    return result
