"""Sun on window planes: solar position, isotropic-sky transposition, heating-day sums.

Everything is SI: angles in degrees at the interface (radians inside), irradiance [W/m²],
irradiation [J/m²], temperatures [°C]. Arrays are numpy arrays of one value per hour.

Method
------
* Solar position by the low-precision solar coordinates of [1] (ch. 25) with the equation of
  time of [2]: geometric (unrefracted) zenith and azimuth, good to about 0.01–0.02° over
  1950–2050 ([2], stated accuracy; checked against the solar position of pvlib in the tests).
* Plane-of-array irradiance by the isotropic-sky model [3]:

      E_poa = DNI · max(0, cos θ) + DHI · (1 + cos β)/2 + ρ · GHI · (1 − cos β)/2,
      cos θ = cos z · cos β + sin z · sin β · cos(γ_s − γ),

  z the solar zenith, γ_s the solar azimuth, β the plane's tilt from horizontal and γ its
  azimuth (degrees from north, clockwise), ρ the ground reflectance.
* Heating-day sums: for each base temperature b, the sums over the hours of the days whose
  daily mean outdoor temperature is below b (the days that count in HDD(b)) of the beam on a
  horizontal plane (DNI · max(0, cos z)), DHI, GHI and the beam on vertical planes at 24 azimuths
  (every 15° from north). Any vertical or horizontal plane is then exact from the sums; a
  tilted plane takes cos β · (horizontal beam) + sin β · (vertical beam), which is exact
  whenever the sun is in front of the vertical plane of the same azimuth and slightly high
  otherwise (the beam's cut-off at cos θ = 0 of a tilted plane is not tracked).

References
----------
[1] J. Meeus, Astronomical Algorithms, 2nd ed., Willmann-Bell (1998), ch. 12, 22, 25.
[2] NOAA Global Monitoring Laboratory, Solar Calculation Details (spreadsheet formulas after
    [1]) (from memory).
[3] B. Y. H. Liu and R. C. Jordan, "The long-term average performance of flat-plate solar
    energy collectors", Solar Energy 7 (1963) 53–74 (isotropic sky); J. A. Duffie and
    W. A. Beckman, Solar Engineering of Thermal Processes, 4th ed. (2013), eq. 2.15.1 and
    2.16.1.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

__all__ = [
    "COMPASS_AZIMUTHS",
    "DEFAULT_GROUND_REFLECTANCE",
    "VERTICAL_AZIMUTHS",
    "HeatingDaySums",
    "heating_day_sums",
    "plane_irradiance",
    "plane_sum",
    "solar_position",
]

Array = NDArray[np.float64]

#: Compass points -> plane azimuth, degrees from north, clockwise (common practice).
COMPASS_AZIMUTHS = {"N": 0.0, "NE": 45.0, "E": 90.0, "SE": 135.0, "S": 180.0, "SW": 225.0,
                    "W": 270.0, "NW": 315.0}  # fmt: skip
#: Azimuths of the vertical planes of the heating-day sums [degrees from north].
VERTICAL_AZIMUTHS = tuple(15.0 * k for k in range(24))
#: Ground reflectance (albedo) of ordinary ground without snow, 0.2 ([3], common practice).
DEFAULT_GROUND_REFLECTANCE = 0.2
#: Julian day of 0001-01-01 00:00 minus Python's ordinal of that date (1) [day].
_JD_OF_ORDINAL_0 = 1721424.5


def solar_position(
    ordinal: Array, hour: Array, *, latitude: float, longitude: float, utc_offset_h: float
) -> tuple[Array, Array]:
    """Geometric solar zenith and azimuth [degrees] ([1] ch. 25, [2]).

    Parameters
    ----------
    ordinal : array of float
        Day number of each instant, Python's ``date.toordinal()`` [day].
    hour : array of float
        Local standard (clock, no daylight saving) time of day [h], e.g. 12.5.
    latitude, longitude : float
        Site [degrees], north and east positive.
    utc_offset_h : float
        Local standard time − UTC [h] (−5 for US Eastern).

    Returns
    -------
    zenith, azimuth : arrays of float
        z [degrees from the vertical] and γ_s [degrees from north, clockwise].

    Notes
    -----
    JD = ordinal + 1721424.5 + (hour − offset)/24; T = (JD − 2451545)/36525;
    L0 = 280.46646 + 36000.76983 T + 0.0003032 T²; M = 357.52911 + 35999.05029 T
    − 0.0001537 T²; e = 0.016708634 − 0.000042037 T − 0.0000001267 T²; C = (1.914602 −
    0.004817 T − 0.000014 T²) sin M + (0.019993 − 0.000101 T) sin 2M + 0.000289 sin 3M;
    Ω = 125.04 − 1934.136 T; λ = L0 + C − 0.00569 − 0.00478 sin Ω; ε = 23°26'21.448" −
    46.815" T + 0.00256 cos Ω; sin δ = sin ε sin λ; y = tan²(ε/2);
    EoT = 4 [y sin 2L0 − 2e sin M + 4 e y sin M cos 2L0 − y²/2 sin 4L0 − 5/4 e² sin 2M] (degrees
    → minutes); hour angle H = 15 (hour − 12) + EoT/4 + longitude − 15 · offset;
    cos z = sin φ sin δ + cos φ cos δ cos H;
    γ_s = 180 + atan2(sin H, cos H sin φ − tan δ cos φ) ([1] eq. 13.5, from the south).
    """
    jd = np.asarray(ordinal, dtype=float) + _JD_OF_ORDINAL_0 + (hour - utc_offset_h) / 24.0
    t = (jd - 2451545.0) / 36525.0
    l0 = np.radians((280.46646 + t * (36000.76983 + t * 0.0003032)) % 360.0)
    m = np.radians(357.52911 + t * (35999.05029 - 0.0001537 * t))
    ecc = 0.016708634 - t * (0.000042037 + 0.0000001267 * t)
    centre = (
        np.sin(m) * (1.914602 - t * (0.004817 + 0.000014 * t))
        + np.sin(2 * m) * (0.019993 - 0.000101 * t)
        + np.sin(3 * m) * 0.000289
    )
    omega = np.radians(125.04 - 1934.136 * t)
    apparent = np.radians(np.degrees(l0) + centre - 0.00569 - 0.00478 * np.sin(omega))
    mean_obliquity = (
        23.0 + (26.0 + (21.448 - t * (46.815 + t * (0.00059 - t * 0.001813))) / 60) / 60
    )
    obliquity = np.radians(mean_obliquity + 0.00256 * np.cos(omega))
    declination = np.arcsin(np.sin(obliquity) * np.sin(apparent))
    y = np.tan(obliquity / 2) ** 2
    eot_min = 4.0 * np.degrees(
        y * np.sin(2 * l0)
        - 2 * ecc * np.sin(m)
        + 4 * ecc * y * np.sin(m) * np.cos(2 * l0)
        - 0.5 * y * y * np.sin(4 * l0)
        - 1.25 * ecc * ecc * np.sin(2 * m)
    )
    hour_angle = np.radians(15.0 * (hour - 12.0) + eot_min / 4.0 + longitude - 15.0 * utc_offset_h)
    phi = np.radians(latitude)
    cos_z = np.sin(phi) * np.sin(declination) + np.cos(phi) * np.cos(declination) * np.cos(
        hour_angle
    )
    zenith = np.degrees(np.arccos(np.clip(cos_z, -1.0, 1.0)))
    azimuth = (
        np.degrees(
            np.arctan2(
                np.sin(hour_angle),
                np.cos(hour_angle) * np.sin(phi) - np.tan(declination) * np.cos(phi),
            )
        )
        + 180.0
    ) % 360.0
    return zenith, azimuth


def _cos_incidence(zenith: Array, azimuth: Array, tilt: float, plane_azimuth: float) -> Array:
    """cos θ of the beam on a plane ([3], Duffie–Beckman eq. 1.6.3)."""
    z, beta = np.radians(zenith), np.radians(tilt)
    return np.cos(z) * np.cos(beta) + np.sin(z) * np.sin(beta) * np.cos(
        np.radians(azimuth - plane_azimuth)
    )


def plane_irradiance(
    *,
    tilt: float,
    azimuth: float,
    zenith: Array,
    solar_azimuth: Array,
    dni: Array,
    dhi: Array,
    ghi: Array,
    ground_reflectance: float = DEFAULT_GROUND_REFLECTANCE,
) -> Array:
    """Irradiance on a plane [W/m²] by the isotropic-sky model [3].

    E = DNI max(0, cos θ) + DHI (1 + cos β)/2 + ρ GHI (1 − cos β)/2. No test on the zenith:
    the file's DNI is zero while the sun is down, and an hour whose middle falls just after
    sunset keeps the beam its DNI says it had (as pvlib does). ``tilt`` β [degrees from horizontal],
    ``azimuth`` γ [degrees from north, clockwise]; irradiances [W/m²].
    """
    beam = dni * np.maximum(_cos_incidence(zenith, solar_azimuth, tilt, azimuth), 0.0)
    cos_beta = np.cos(np.radians(tilt))
    return beam + dhi * (1 + cos_beta) / 2 + ground_reflectance * ghi * (1 - cos_beta) / 2


@dataclass(frozen=True, slots=True)
class HeatingDaySums:
    """Irradiation over the heating days at each base [J/m²] (see the module's Method).

    ``days[k]`` days have a daily mean below ``bases_c[k]``; ``beam_vertical[k][j]`` is the
    beam on the vertical plane of azimuth :data:`VERTICAL_AZIMUTHS`\\ [j] over those days.
    """

    bases_c: tuple[float, ...]
    days: tuple[int, ...]
    beam_horizontal: tuple[float, ...]
    diffuse_horizontal: tuple[float, ...]
    global_horizontal: tuple[float, ...]
    beam_vertical: tuple[tuple[float, ...], ...]


def heating_day_sums(
    *,
    day: Array,
    daily_mean_c: Sequence[float],
    zenith: Array,
    solar_azimuth: Array,
    dni: Array,
    dhi: Array,
    ghi: Array,
    bases_c: Sequence[float],
    hour_s: float = 3600.0,
) -> HeatingDaySums:
    """Sums over the heating days at each base of the hourly irradiance components [J/m²].

    Parameters
    ----------
    day : array of int
        Each hour's index into ``daily_mean_c``.
    daily_mean_c : sequence of float
        Daily mean outdoor dry-bulb [°C], the same means as the degree-days.
    zenith, solar_azimuth : arrays of float
        Sun at each hour's middle [degrees].
    dni, dhi, ghi : arrays of float
        Hourly mean direct normal, diffuse and global horizontal irradiance [W/m²].
    bases_c : sequence of float
        Base temperatures [°C].
    hour_s : float
        Length of one value's interval [s].

    Returns
    -------
    HeatingDaySums
        H_x(b) = Σ_{hours of days with T_mean < b} E_x · Δt [J/m²] for each component x.
    """
    beam_h = dni * np.maximum(np.cos(np.radians(zenith)), 0.0)
    vertical = np.stack(
        [
            dni * np.maximum(_cos_incidence(zenith, solar_azimuth, 90.0, a), 0.0)
            for a in VERTICAL_AZIMUTHS
        ],
        axis=1,
    )
    means = np.asarray(daily_mean_c, dtype=float)
    day = np.asarray(day, dtype=int)
    days, bh, dh, gh, bv = [], [], [], [], []
    for base in bases_c:
        heating_day = means < base
        hours = heating_day[day]
        days.append(int(heating_day.sum()))
        bh.append(float(beam_h[hours].sum() * hour_s))
        dh.append(float(dhi[hours].sum() * hour_s))
        gh.append(float(ghi[hours].sum() * hour_s))
        bv.append(tuple(float(v) for v in vertical[hours].sum(axis=0) * hour_s))
    return HeatingDaySums(
        bases_c=tuple(float(b) for b in bases_c),
        days=tuple(days),
        beam_horizontal=tuple(bh),
        diffuse_horizontal=tuple(dh),
        global_horizontal=tuple(gh),
        beam_vertical=tuple(bv),
    )


def vertical_beam_at(beam_vertical: Sequence[float], azimuth: float) -> float:
    """Vertical-plane beam at any azimuth: linear between the 15° planes (0 for 24 zeros)."""
    step = 360.0 / len(beam_vertical)
    position = (azimuth % 360.0) / step
    low = int(position) % len(beam_vertical)
    share = position - int(position)
    return (1 - share) * beam_vertical[low] + share * beam_vertical[(low + 1) % len(beam_vertical)]


def plane_sum(
    *,
    tilt: float,
    azimuth: float,
    beam_horizontal: float,
    diffuse_horizontal: float,
    global_horizontal: float,
    beam_vertical: Sequence[float],
    ground_reflectance: float = DEFAULT_GROUND_REFLECTANCE,
) -> float:
    """Irradiation on a plane from the heating-day sums (any energy-per-area unit).

    H = cos β · H_b,h + sin β · H_b,v(γ) + H_d,h (1 + cos β)/2 + ρ H_g,h (1 − cos β)/2, with
    H_b,v(γ) linear between the 15° planes; exact for vertical and horizontal planes (see
    the module's Method for tilted ones) [3].
    """
    beta = np.radians(tilt)
    cos_b, sin_b = float(np.cos(beta)), float(np.sin(beta))
    if tilt >= 90.0:
        cos_b, sin_b = 0.0, 1.0
    beam = max(cos_b, 0.0) * beam_horizontal + sin_b * vertical_beam_at(beam_vertical, azimuth)
    return (
        beam
        + diffuse_horizontal * (1 + cos_b) / 2
        + ground_reflectance * global_horizontal * (1 - cos_b) / 2
    )
