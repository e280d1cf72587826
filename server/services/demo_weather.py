"""The demo house's weather: an invented typical year and two invented billing years.

Nothing here is measured. The typical year is a smooth seasonal cycle with a daily swing and a
seeded day-to-day anomaly, written as an EPW file so the demo reads it through the same reader
as an uploaded file (:mod:`server.services.weather_files`, :mod:`server.services.weather_solar`).
Sunshine is a clear-sky beam (Meinel's transmittance, common practice for a rough clear sky)
dimmed by a seeded daily cloud factor; the sun's position is :func:`server.physics.solar.
solar_position`. The site is invented too ("Demo Valley", 42° N, 75° W, UTC−5): its winter is
that of a cold, cloudy northern US climate, about 6,300 °F·day at 65 °F.
"""

from __future__ import annotations

import math
from datetime import date, timedelta

import numpy as np

from server.physics.solar import solar_position

SITE_NAME = "Demo Valley (invented)"
LATITUDE, LONGITUDE, UTC_OFFSET = 42.0, -75.0, -5.0
#: the EPW's year (the reader takes any non-leap year as one typical year)
TYPICAL_YEAR = 2021
#: annual mean, seasonal amplitude and coldest day of the year of the daily mean [°C, °C, day]
MEAN_C, AMPLITUDE_C, COLDEST_DAY = 9.5, 13.5, 22
#: half the day-night swing of the hourly temperature [°C]; the coldest hour is 05:00
DAILY_SWING_C = 5.0
SOLAR_CONSTANT_W_M2 = 1367.0


def _anomalies(days: int, *, seed: int, sigma_c: float, persistence: float = 0.7) -> np.ndarray:
    """A seeded AR(1) series of daily anomalies [°C] with standard deviation ``sigma_c``."""
    rng = np.random.default_rng(seed)
    shocks = rng.normal(0.0, sigma_c * math.sqrt(1 - persistence**2), days)
    out = np.empty(days)
    level = 0.0
    for i, shock in enumerate(shocks):
        level = persistence * level + shock
        out[i] = level
    return out


def _seasonal_mean_c(day_of_year: np.ndarray) -> np.ndarray:
    return MEAN_C - AMPLITUDE_C * np.cos(2 * math.pi * (day_of_year - COLDEST_DAY) / 365.0)


def typical_daily_means_c() -> list[float]:
    """The invented typical year's 365 daily means [°C] (the hourly file averages to these)."""
    doy = np.arange(1, 366, dtype=float)
    return [float(x) for x in _seasonal_mean_c(doy) + _anomalies(365, seed=2021, sigma_c=4.0)]


def billing_daily_means_c(start: date, days: int) -> list[float]:
    """Invented daily means [°C] of the billing years: the typical cycle with its own weather
    (another seed), each winter a little different from the typical one."""
    doy = np.array([(start + timedelta(days=k)).timetuple().tm_yday for k in range(days)], float)
    return [float(x) for x in _seasonal_mean_c(doy) + _anomalies(days, seed=2024, sigma_c=4.0)]


def _sun(day: date, hours: np.ndarray, clearness: float) -> tuple[np.ndarray, ...]:
    """(GHI, DNI, DHI) [W/m²] over the hours ending at ``hours`` of ``day``."""
    mid = hours - 0.5
    zenith, _azimuth = solar_position(
        np.full(mid.shape, float(day.toordinal())),
        mid,
        latitude=LATITUDE,
        longitude=LONGITUDE,
        utc_offset_h=UTC_OFFSET,
    )
    cos_z = np.cos(np.radians(zenith))
    up = cos_z > 0.02
    air_mass = np.where(up, 1.0 / np.maximum(cos_z, 0.02), 0.0)
    beam_clear = np.where(up, SOLAR_CONSTANT_W_M2 * 0.7 ** (air_mass**0.678), 0.0)
    dni = beam_clear * clearness**2
    dhi = np.where(up, (0.1 + 0.25 * (1 - clearness)) * SOLAR_CONSTANT_W_M2 * cos_z * 0.7, 0.0)
    ghi = dni * np.maximum(cos_z, 0.0) + dhi
    return ghi, dni, dhi


def typical_year_epw() -> bytes:
    """The invented typical year as an EPW file (8 header lines, 8,760 hourly rows)."""
    means = typical_daily_means_c()
    rng = np.random.default_rng(7)
    clearness = np.clip(rng.beta(2.2, 1.8, 365), 0.05, 1.0)
    hours = np.arange(1, 25, dtype=float)
    swing = -DAILY_SWING_C * np.cos(2 * math.pi * (hours - 0.5 - 5.0) / 24.0)
    lines = [
        f"LOCATION,{SITE_NAME},XX,USA,invented for the demo,000000,{LATITUDE},{LONGITUDE},"
        f"{UTC_OFFSET},300.0",
        "DESIGN CONDITIONS,0",
        "TYPICAL/EXTREME PERIODS,0",
        "GROUND TEMPERATURES,0",
        "HOLIDAYS/DAYLIGHT SAVINGS,No,0,0,0",
        "COMMENTS 1,Invented weather for the Warmstead demo house: not a measured year",
        "COMMENTS 2,Seasonal cycle with seeded anomalies and a clear-sky sun dimmed by clouds",
        "DATA PERIODS,1,1,Data,Friday, 1/ 1,12/31",
    ]
    day = date(TYPICAL_YEAR, 1, 1)
    for k in range(365):
        ghi, dni, dhi = _sun(day, hours, float(clearness[k]))
        for h in range(24):
            temp = means[k] + swing[h]
            lines.append(
                f"{day.year},{day.month},{day.day},{h + 1},60,?9?9?9?9E0?9?9?9?9?9?9?9?9?9?9?9?9*9,"
                f"{temp:.1f},{temp - 4:.1f},70,98000,0,0,300,{ghi[h]:.0f},{dni[h]:.0f},"
                f"{dhi[h]:.0f},0,0,0,0,180,2.0,5,5,20.0,77777,9,999999999,10,0.1,0,88,0.2,0,0"
            )
        day += timedelta(days=1)
    return ("\n".join(lines) + "\n").encode("ascii")
