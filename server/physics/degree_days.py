"""Degree-days from outdoor dry-bulb data: fixed base, by month, and the variable base.

Pure functions, SI inside: temperatures in °C, degree-days in K·day. Unit conversion to
°F and °F·day happens at the edges (:mod:`server.physics.units`).

Definitions used throughout
---------------------------
* Daily mean temperature: the arithmetic mean of the day's hourly values (or the day's single
  value when the data are daily) [1].
* Heating degree-days at base ``b``: HDD_b = Σ_days max(0, b − T_mean,day) [1].
* Cooling degree-days at base ``b``: CDD_b = Σ_days max(0, T_mean,day − b) [1].
* Hence, for any base, HDD_b − CDD_b = Σ_days (b − T_mean,day).

Design temperatures and the thermal climate zone are in :mod:`.climate_design`; this module
re-exports them (importers use ``degree_days.<name>``).

References
----------
[1] ASHRAE Handbook—Fundamentals (2021), ch. 19 "Energy Estimating and Modeling Methods",
    degree-day and variable-base degree-day methods.
[2] ASHRAE Handbook—Fundamentals (2021), ch. 14 "Climatic Design Information": the 99 %
    heating and 1 % cooling dry-bulb design conditions are the values exceeded (or not
    reached) in that share of the hours of the year.
[3] R. J. Hyndman and Y. Fan (1996), "Sample quantiles in statistical packages",
    The American Statistician 50(4), 361–365: definition 7 (linear interpolation between
    order statistics, numpy's default ``method="linear"``).
[4] ASHRAE Standard 169-2013, "Climatic Data for Building Design Standards", normative
    annex A, thermal climate zone definitions (SI: HDD18 and CDD10 in K·day). From memory.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from datetime import date

from server.physics.climate_design import (
    THERMAL_ZONES,
    ZONE_COOLING_BASE_C,
    ZONE_HEATING_BASE_C,
    ClimateZone,
    DesignTemperatures,
    check_finite,
    design_temperatures,
    percentile_linear,
    thermal_climate_zone,
)

#: this module's names and the design names it re-exports (importers use ``degree_days.<name>``)
__all__ = [
    "BASE_RANGE_C",
    "ClimateZone",
    "DailyMean",
    "DegreeDays",
    "DesignTemperatures",
    "MonthlyDegreeDays",
    "THERMAL_ZONES",
    "VariableBaseDegreeDays",
    "ZONE_COOLING_BASE_C",
    "ZONE_HEATING_BASE_C",
    "balance_point_temperature_c",
    "cooling_degree_days",
    "daily_means",
    "degree_days",
    "design_temperatures",
    "heating_degree_days",
    "interpolate_degree_days",
    "monthly_degree_days",
    "percentile_linear",
    "thermal_climate_zone",
    "variable_base_degree_days",
]


#: Reasonable range for any degree-day base or setpoint [°C] (common practice).
BASE_RANGE_C = (-50.0, 50.0)


@dataclass(frozen=True, slots=True)
class DailyMean:
    """One day's mean outdoor dry-bulb temperature."""

    day: date
    mean_c: float  # [°C]
    values: int  # how many values went into the mean (24 for a complete hourly day)


@dataclass(frozen=True, slots=True)
class DegreeDays:
    """Heating and cooling degree-days at one base each [K·day]."""

    heating_base_c: float
    cooling_base_c: float
    hdd_k_day: float
    cdd_k_day: float
    days: int


@dataclass(frozen=True, slots=True)
class MonthlyDegreeDays:
    """Degree-days of one calendar month (1..12) [K·day]; ``days`` = days with data."""

    month: int
    hdd_k_day: float
    cdd_k_day: float
    days: int


@dataclass(frozen=True, slots=True)
class VariableBaseDegreeDays:
    """Heating degree-days at a house's own balance point [K·day]."""

    balance_point_c: float
    hdd_k_day: float
    days: int


def _check_base(base_c: float, name: str) -> float:
    base_c = check_finite(base_c, name)
    low, high = BASE_RANGE_C
    if not low <= base_c <= high:
        raise ValueError(f"{name} must be between {low:g} and {high:g} °C")
    return base_c


def daily_means(dates: Sequence[date], temperatures_c: Sequence[float]) -> tuple[DailyMean, ...]:
    """Group values by calendar day and average them.

    Parameters
    ----------
    dates : sequence of datetime.date
        The day each value belongs to (for hour-ending data, the day the hour ends in).
    temperatures_c : sequence of float
        Outdoor dry-bulb temperature of each value [°C].

    Returns
    -------
    tuple of DailyMean
        One entry per day, in order of first appearance:
        T_mean,day = (1/n_day) Σ T_i over the day's n_day values [1].

    Raises
    ------
    ValueError
        When the sequences differ in length, are empty, or hold NaN/infinity.
    """
    if len(dates) != len(temperatures_c):
        raise ValueError("every temperature needs exactly one date")
    if not temperatures_c:
        raise ValueError("there are no temperatures to average")
    sums: dict[date, float] = {}
    counts: dict[date, int] = {}
    for day, value in zip(dates, temperatures_c, strict=True):
        if day in sums:
            sums[day] += value
            counts[day] += 1
        else:
            sums[day] = value
            counts[day] = 1
    out = []
    for day, total in sums.items():
        mean = total / counts[day]
        if not math.isfinite(mean):
            raise ValueError(f"the temperatures of {day.isoformat()} are not finite numbers")
        out.append(DailyMean(day=day, mean_c=mean, values=counts[day]))
    return tuple(out)


def heating_degree_days(daily_means_c: Sequence[float], base_c: float) -> float:
    """Heating degree-days [K·day]: HDD_b = Σ max(0, b − T_mean,day) [1].

    Parameters
    ----------
    daily_means_c : sequence of float
        Daily mean temperatures [°C].
    base_c : float
        Base temperature b [°C].
    """
    base_c = _check_base(base_c, "heating base")
    return math.fsum(base_c - mean for mean in daily_means_c if mean < base_c)


def cooling_degree_days(daily_means_c: Sequence[float], base_c: float) -> float:
    """Cooling degree-days [K·day]: CDD_b = Σ max(0, T_mean,day − b) [1].

    Parameters
    ----------
    daily_means_c : sequence of float
        Daily mean temperatures [°C].
    base_c : float
        Base temperature b [°C].
    """
    base_c = _check_base(base_c, "cooling base")
    return math.fsum(mean - base_c for mean in daily_means_c if mean > base_c)


def degree_days(
    days: Sequence[DailyMean], *, heating_base_c: float, cooling_base_c: float
) -> DegreeDays:
    """HDD and CDD [K·day] of a run of days, each at its own base [°C] (see module notes)."""
    means = [d.mean_c for d in days]
    return DegreeDays(
        heating_base_c=float(heating_base_c),
        cooling_base_c=float(cooling_base_c),
        hdd_k_day=heating_degree_days(means, heating_base_c),
        cdd_k_day=cooling_degree_days(means, cooling_base_c),
        days=len(means),
    )


def monthly_degree_days(
    days: Sequence[DailyMean], *, heating_base_c: float, cooling_base_c: float
) -> tuple[MonthlyDegreeDays, ...]:
    """Degree-days per calendar month, always 12 rows (January = 1) [K·day].

    A month with no data has zero degree-days and ``days == 0``. Multi-year data add every
    January together, and so on.
    """
    by_month: list[list[float]] = [[] for _ in range(12)]
    for entry in days:
        by_month[entry.day.month - 1].append(entry.mean_c)
    return tuple(
        MonthlyDegreeDays(
            month=index + 1,
            hdd_k_day=heating_degree_days(means, heating_base_c),
            cdd_k_day=cooling_degree_days(means, cooling_base_c),
            days=len(means),
        )
        for index, means in enumerate(by_month)
    )


def balance_point_temperature_c(
    setpoint_c: float, internal_gains_w: float, ua_w_per_k: float
) -> float:
    """Balance-point temperature of a house [°C], variable-base degree-day method [1].

    Parameters
    ----------
    setpoint_c : float
        Indoor heating thermostat setpoint t_set [°C].
    internal_gains_w : float
        Average internal (and, if wanted, useful solar) heat gains Q_gain [W], >= 0.
    ua_w_per_k : float
        Whole-house heat-loss coefficient UA, conduction plus infiltration [W/K], > 0.

    Returns
    -------
    float
        t_bal = t_set − Q_gain / UA [°C]: the outdoor temperature below which the heating
        system must run [1].
    """
    setpoint_c = _check_base(setpoint_c, "setpoint")
    gains = check_finite(internal_gains_w, "internal gains")
    ua = check_finite(ua_w_per_k, "UA")
    if gains < 0:
        raise ValueError("internal gains cannot be negative")
    if ua <= 0:
        raise ValueError("UA must be greater than zero")
    return setpoint_c - gains / ua


def variable_base_degree_days(
    days: Sequence[DailyMean],
    *,
    setpoint_c: float,
    internal_gains_w: float,
    ua_w_per_k: float,
) -> VariableBaseDegreeDays:
    """Heating degree-days at the house's balance point [K·day], variable-base method [1].

    HDD(t_bal) = Σ max(0, t_bal − T_mean,day), with t_bal from
    :func:`balance_point_temperature_c` and the same daily means as the fixed-base figures.
    A balance point outside :data:`BASE_RANGE_C` is refused.
    """
    balance = balance_point_temperature_c(setpoint_c, internal_gains_w, ua_w_per_k)
    low, high = BASE_RANGE_C
    if not low <= balance <= high:
        raise ValueError(
            f"the balance point ({balance:.1f} °C) is outside {low:g} to {high:g} °C: "
            "check the gains and UA"
        )
    hdd = heating_degree_days([d.mean_c for d in days], balance)
    return VariableBaseDegreeDays(balance_point_c=balance, hdd_k_day=hdd, days=len(days))


def interpolate_degree_days(
    bases_c: Sequence[float], degree_days_k_day: Sequence[float], base_c: float
) -> float:
    """Degree-days at any base from a table of degree-days by base [K·day].

    Parameters
    ----------
    bases_c : sequence of float
        Table bases in ascending order [°C] (e.g. a saved climate's ``degree_days_by_base``).
    degree_days_k_day : sequence of float
        HDD (or CDD) at each table base [K·day].
    base_c : float
        The base wanted, e.g. a balance point from :func:`balance_point_temperature_c` [°C].

    Returns
    -------
    float
        DD(b) = DD_i + (b − b_i) (DD_{i+1} − DD_i) / (b_{i+1} − b_i) for b_i <= b <= b_{i+1}.
        HDD is convex in the base, so this slightly overestimates between table points (by at
        most a quarter of the step per day whose mean lies between them); use
        :func:`variable_base_degree_days` when the daily means are at hand [1].

    Raises
    ------
    ValueError
        When the table is empty, not ascending, of unequal lengths, or ``base_c`` lies outside.
    """
    base_c = check_finite(base_c, "base")
    if len(bases_c) != len(degree_days_k_day) or not bases_c:
        raise ValueError("the table needs one degree-day value per base")
    if any(upper <= lower for lower, upper in zip(bases_c, bases_c[1:], strict=False)):
        raise ValueError("the table bases must be in ascending order")
    if not bases_c[0] <= base_c <= bases_c[-1]:
        raise ValueError(
            f"the base {base_c:g} °C is outside the table ({bases_c[0]:g} to {bases_c[-1]:g} °C)"
        )
    for index in range(len(bases_c) - 1):
        low, high = bases_c[index], bases_c[index + 1]
        if low <= base_c <= high:
            share = (base_c - low) / (high - low)
            lower, upper = degree_days_k_day[index], degree_days_k_day[index + 1]
            return lower + share * (upper - lower)
    return float(degree_days_k_day[0])  # a one-row table holding exactly this base
