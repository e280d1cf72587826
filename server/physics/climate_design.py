"""Design temperatures and the thermal climate zone from outdoor dry-bulb data.

Pure functions, SI inside: temperatures in °C, degree-days in K·day (the zone's HDD18 and CDD10
come from :mod:`.degree_days`).

References
----------
[2] ASHRAE Handbook—Fundamentals (2021), ch. 14 "Climatic Design Information": the 99 %
    heating and 1 % cooling dry-bulb design conditions are the values exceeded (or not
    reached) in that share of the hours of the year.
[3] R. J. Hyndman and Y. Fan (1996), "Sample quantiles in statistical packages",
    The American Statistician 50(4), 361–365: definition 7 (linear interpolation between
    order statistics, numpy's default ``method="linear"``).
[4] ASHRAE Standard 169-2013, "Climatic Data for Building Design Standards", normative
    annex A, thermal climate zone definitions (SI: HDD18 and CDD10 in K·day). From memory.

The numbering is that of :mod:`.degree_days`.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

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


def check_finite(value: float, name: str) -> float:
    """``value`` as a float, or ValueError naming it when it is not a finite number."""
    if not isinstance(value, int | float) or not math.isfinite(value):
        raise ValueError(f"{name} must be a finite number (not NaN or infinity)")
    return float(value)


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
    hdd18 = check_finite(hdd18_k_day, "HDD18")
    cdd10 = check_finite(cdd10_k_day, "CDD10")
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
