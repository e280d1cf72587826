"""Degree-days, design temperatures and the thermal climate zone from outdoor dry-bulb data.

Pure functions, SI inside: temperatures in °C, degree-days in K·day. Unit conversion to
°F and °F·day happens at the edges (:mod:`server.physics.units`).

Definitions used throughout
---------------------------
* Daily mean temperature: the arithmetic mean of the day's hourly values (or the day's single
  value when the data are daily) [1].
* Heating degree-days at base ``b``: HDD_b = Σ_days max(0, b − T_mean,day) [1].
* Cooling degree-days at base ``b``: CDD_b = Σ_days max(0, T_mean,day − b) [1].
* Hence, for any base, HDD_b − CDD_b = Σ_days (b − T_mean,day).

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

#: Reasonable range for any degree-day base or setpoint [°C] (common practice).
BASE_RANGE_C = (-50.0, 50.0)

#: Bases for the climate zone [°C], ASHRAE Standard 169-2013 annex A [4].
ZONE_HEATING_BASE_C = 18.0
ZONE_COOLING_BASE_C = 10.0

#: Thermal climate zones, ASHRAE Standard 169-2013 annex A [4] (from memory).
#: Rows are tested top to bottom; the first that holds gives the zone.
#: (number, name, CDD10 lower bound exclusive, HDD18 upper bound inclusive, HDD18 lower
#: bound exclusive); ``None`` = no limit on that side.
THERMAL_ZONES: tuple[tuple[int, str, float | None, float | None, float | None], ...] = (
    (0, "Extremely Hot", 6000.0, None, None),  # 6000 < CDD10            [4] from memory
    (1, "Very Hot", 5000.0, None, None),  # 5000 < CDD10 <= 6000         [4] from memory
    (2, "Hot", 3500.0, None, None),  # 3500 < CDD10 <= 5000              [4] from memory
    (3, "Warm", None, 2000.0, None),  # CDD10 <= 3500, HDD18 <= 2000     [4] from memory
    (4, "Mixed", None, 3000.0, 2000.0),  # CDD10 <= 3500, 2000 < HDD18 <= 3000  [4]
    (5, "Cool", None, 4000.0, 3000.0),  # 3000 < HDD18 <= 4000          [4] from memory
    (6, "Cold", None, 5000.0, 4000.0),  # 4000 < HDD18 <= 5000          [4] from memory
    (7, "Very Cold", None, 7000.0, 5000.0),  # 5000 < HDD18 <= 7000     [4] from memory
    (8, "Subarctic", None, None, 7000.0),  # 7000 < HDD18               [4] from memory
)


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
class DesignTemperatures:
    """Heating (1st percentile) and cooling (99th percentile) design dry-bulb [°C]."""

    heating_c: float
    cooling_c: float
    basis: str  # "hourly" or "daily" (daily means only: milder than hourly values)


@dataclass(frozen=True, slots=True)
class ClimateZone:
    """Thermal climate zone number (0..8) and name, ASHRAE Standard 169-2013 [4]."""

    number: int
    name: str
    hdd18_k_day: float
    cdd10_k_day: float


@dataclass(frozen=True, slots=True)
class VariableBaseDegreeDays:
    """Heating degree-days at a house's own balance point [K·day]."""

    balance_point_c: float
    hdd_k_day: float
    days: int


def _check_finite(value: float, name: str) -> float:
    if not isinstance(value, int | float) or not math.isfinite(value):
        raise ValueError(f"{name} must be a finite number (not NaN or infinity)")
    return float(value)


def _check_base(base_c: float, name: str) -> float:
    base_c = _check_finite(base_c, name)
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


def percentile_linear(values: Sequence[float], fraction: float) -> float:
    """Sample quantile by linear interpolation between order statistics [3].

    Parameters
    ----------
    values : sequence of float
        The sample (any order) [any unit].
    fraction : float
        Quantile as a fraction, 0 <= p <= 1 (0.01 = 1st percentile) [-].

    Returns
    -------
    float
        With x sorted ascending and h = (n − 1) p:
        Q(p) = x[⌊h⌋] + (h − ⌊h⌋) (x[⌊h⌋ + 1] − x[⌊h⌋]),
        Hyndman & Fan definition 7 [3], the same as ``numpy.percentile(values, 100 p)``.
    """
    if not 0.0 <= fraction <= 1.0:
        raise ValueError("the percentile fraction must be between 0 and 1")
    if not values:
        raise ValueError("there are no values to take a percentile of")
    ordered = sorted(values)
    position = (len(ordered) - 1) * fraction
    lower = math.floor(position)
    upper = min(lower + 1, len(ordered) - 1)
    return ordered[lower] + (position - lower) * (ordered[upper] - ordered[lower])


def design_temperatures(temperatures_c: Sequence[float], *, basis: str) -> DesignTemperatures:
    """Heating and cooling design dry-bulb temperatures [°C].

    Parameters
    ----------
    temperatures_c : sequence of float
        Hourly dry-bulb values (``basis="hourly"``) or daily means (``basis="daily"``) [°C].
    basis : {"hourly", "daily"}
        What the values are. Daily means give milder design values than hourly data.

    Returns
    -------
    DesignTemperatures
        heating = Q(0.01) (the "99 %" condition: 99 % of hours are warmer),
        cooling = Q(0.99) (the "1 %" condition: 1 % of hours are warmer) [2], each by
        :func:`percentile_linear` (linear interpolation, numpy's default) [3].
    """
    if basis not in ("hourly", "daily"):
        raise ValueError("basis must be 'hourly' or 'daily'")
    return DesignTemperatures(
        heating_c=percentile_linear(temperatures_c, 0.01),
        cooling_c=percentile_linear(temperatures_c, 0.99),
        basis=basis,
    )


def thermal_climate_zone(hdd18_k_day: float, cdd10_k_day: float) -> ClimateZone:
    """Thermal climate zone (0..8) from annual HDD18 and CDD10 [K·day], per [4].

    Parameters
    ----------
    hdd18_k_day : float
        Annual heating degree-days at base 18 °C [K·day].
    cdd10_k_day : float
        Annual cooling degree-days at base 10 °C [K·day].

    Returns
    -------
    ClimateZone
        The first row of :data:`THERMAL_ZONES` that holds (ASHRAE Standard 169-2013,
        annex A, from memory). Only the thermal number is given; the moisture letter
        (A/B/C) needs precipitation data that a temperature file does not carry.
    """
    hdd18 = _check_finite(hdd18_k_day, "HDD18")
    cdd10 = _check_finite(cdd10_k_day, "CDD10")
    if hdd18 < 0 or cdd10 < 0:
        raise ValueError("degree-days cannot be negative")
    for number, name, cdd_above, hdd_at_most, hdd_above in THERMAL_ZONES:
        if cdd_above is not None:
            if cdd10 > cdd_above:
                return ClimateZone(number, name, hdd18, cdd10)
            continue
        if (hdd_at_most is None or hdd18 <= hdd_at_most) and (
            hdd_above is None or hdd18 > hdd_above
        ):
            return ClimateZone(number, name, hdd18, cdd10)
    raise AssertionError("unreachable: the zone table covers every value")  # pragma: no cover


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
    gains = _check_finite(internal_gains_w, "internal gains")
    ua = _check_finite(ua_w_per_k, "UA")
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
    base_c = _check_finite(base_c, "base")
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
