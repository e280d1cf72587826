"""The sun in an EPW or TMY3 weather file: hourly GHI, DNI, DHI and the site -> heating-day table.

Kept apart from :mod:`server.services.weather_files` (which reads the dry-bulb only): this
module reads the same file a second time for its irradiance fields and the site's latitude,
longitude and time zone, then sums the irradiance over the heating days at each base
(:func:`server.physics.solar.heating_day_sums`). The result is the compact ``solar`` table of
``/calc/degree-days`` (24 + 3 sums and a day count per base), which a house document carries
as ``climate.solar`` instead of the file's 8,760 rows.

Fields read:

* EPW: header line 1 ``LOCATION,city,state,country,source,WMO,latitude,longitude,
  time zone,elevation``; data fields 1–4 year, month, day, hour (1..24, hour-ending, local
  standard time), 7 dry-bulb [°C] (99.9 missing), 14 GHI, 15 DNI, 16 DHI [Wh/m² over the
  hour before the stamp] (9999 missing) (the EPW format's data
  dictionary, from memory).
* TMY3: header line 1 ``USAF,name,state,time zone,latitude,longitude,elevation``; columns
  ``Date (MM/DD/YYYY)``, ``Time (HH:MM)`` (hour-ending, local standard time),
  ``GHI (W/m^2)``, ``DNI (W/m^2)``, ``DHI (W/m^2)``, ``Dry-bulb (C)`` (NREL TMY3 User's
  Manual, 2008, from memory).

An hour-ending value is placed at the middle of its hour for the sun's position (common
practice). Hours with a missing irradiance count as zero and are counted in a warning.
"""

from __future__ import annotations

import csv
import io
import math
from collections.abc import Iterator, Sequence
from datetime import date
from typing import BinaryIO

import numpy as np

from server.documents.solar import SolarIn, SolarRowIn
from server.physics import solar
from server.physics.fuels import KWH_J
from server.physics.units import BTU_J, SQFT_M2, UnitSystem
from server.services.weather_lines import MAX_DATA_LINES, MAX_LINE_CHARS

#: missing-value markers: EPW irradiance 9999, EPW dry-bulb 99.9, TMY3 -9900 (from memory)
EPW_MISSING_IRRADIANCE = 9999.0
EPW_MISSING_TEMPERATURE = 99.9
TMY3_MISSING = -9900.0


class _Hours:
    """Hourly rows of one file: day ordinal, hour-ending 1..24, dry-bulb, GHI, DNI, DHI."""

    def __init__(self) -> None:
        self.ordinal: list[int] = []
        self.hour: list[int] = []
        self.temp: list[float] = []
        self.ghi: list[float] = []
        self.dni: list[float] = []
        self.dhi: list[float] = []
        self.missing = 0

    def add(self, day: date, hour: int, temp: float, ghi: float, dni: float, dhi: float) -> None:
        values = [ghi, dni, dhi]
        if any(not (0.0 <= v < 2000.0) for v in values):  # marker, blank or implausible
            self.missing += 1
            values = [v if 0.0 <= v < 2000.0 else 0.0 for v in values]
        self.ordinal.append(day.toordinal())
        self.hour.append(hour)
        self.temp.append(temp)
        self.ghi.append(values[0])
        self.dni.append(values[1])
        self.dhi.append(values[2])


def _lines(data: bytes | BinaryIO) -> Iterator[str]:
    """Text lines, bounded as :mod:`server.services.weather_lines` bounds them."""
    if isinstance(data, bytes | bytearray):
        stream: BinaryIO = io.BytesIO(data)
    else:
        stream = data
    text = io.TextIOWrapper(stream, encoding="utf-8-sig", errors="replace", newline=None)  # type: ignore[arg-type]
    try:
        for count, line in enumerate(iter(lambda: text.readline(MAX_LINE_CHARS + 1), "")):
            if count > MAX_DATA_LINES + 64:
                return
            yield line.rstrip("\r\n")
    finally:
        text.detach()


def _number(text: str) -> float:
    try:
        return float(text)
    except ValueError:
        return math.nan


def _site(values: Sequence[str], at: int) -> tuple[float, float, float] | None:
    """(latitude, longitude, UTC offset) from header fields at ``at``, ``at+1``, ``at+2``."""
    try:
        lat, lon, tz = (float(values[at + k]) for k in range(3))
    except (IndexError, ValueError):
        return None
    if not (-90 <= lat <= 90 and -180 <= lon <= 180 and -14 <= tz <= 14):
        return None
    return lat, lon, tz


def _read_epw(lines: Iterator[str]) -> tuple[tuple[float, float, float] | None, _Hours]:
    header = [next(lines, "") for _ in range(8)]
    location = header[0].split(",")
    site = _site(location, 6)  # LOCATION,city,state,country,source,WMO,lat,lon,tz
    hours = _Hours()
    for line in lines:
        fields = line.split(",")
        if len(fields) < 16:
            continue
        try:
            day = date(int(fields[0]), int(fields[1]), int(fields[2]))
            hour = int(fields[3])
        except ValueError:
            continue
        temp = _number(fields[6])
        if temp == EPW_MISSING_TEMPERATURE:
            temp = math.nan
        hours.add(day, hour, temp, *(_number(fields[k]) for k in (13, 14, 15)))
    return site, hours


def _read_tmy3(lines: Iterator[str]) -> tuple[tuple[float, float, float] | None, _Hours]:
    first = next(csv.reader([next(lines, "")]), [])
    site = _site([first[4], first[5], first[3]] if len(first) > 5 else [], 0)
    names = [c.strip() for c in next(csv.reader([next(lines, "")]), [])]
    wanted = ("Date (MM/DD/YYYY)", "Time (HH:MM)", "Dry-bulb (C)", "GHI (W/m^2)", "DNI (W/m^2)",
              "DHI (W/m^2)")  # fmt: skip
    hours = _Hours()
    if any(name not in names for name in wanted):
        return site, hours
    at = [names.index(name) for name in wanted]
    for line in lines:
        fields = line.split(",")
        if len(fields) <= max(at):
            continue
        month, _, rest = fields[at[0]].partition("/")
        day_text, _, year = rest.partition("/")
        try:
            day = date(int(year), int(month), int(day_text))
            hour = int(fields[at[1]].partition(":")[0])
        except ValueError:
            continue
        temp = _number(fields[at[2]])
        if temp == TMY3_MISSING:
            temp = math.nan
        hours.add(day, hour, temp, *(_number(fields[k]) for k in at[3:]))
    return site, hours


def _to_units(value_j_m2: float, units: UnitSystem) -> float:
    """J/m² -> Btu/ft² (ip) or kWh/m² (si), rounded to 0.001."""
    return round(value_j_m2 / (BTU_J / SQFT_M2 if units == "ip" else KWH_J), 3)


def solar_table(
    data: bytes | BinaryIO,
    *,
    kind: str,
    units: UnitSystem,
    bases: Sequence[float],
    bases_c: Sequence[float],
    station: str | None = None,
) -> tuple[SolarIn | None, list[str]]:
    """The heating-day irradiation table of an EPW or TMY3 file, in ``units``.

    ``data`` is read from its start (a file is rewound). ``bases`` are in the request's units
    and ``bases_c`` the same in °C. Returns ``(None, [])`` when the file carries no usable
    irradiance or site; never raises for a file the dry-bulb reader accepted.
    """
    if kind not in ("epw", "tmy3"):
        return None, []
    if not isinstance(data, bytes | bytearray):
        data.seek(0)
    site, hours = (_read_epw if kind == "epw" else _read_tmy3)(_lines(data))
    if site is None or not hours.ordinal or not any(hours.ghi):
        return None, []  # no site or no irradiance (a made-up file): ``solar`` stays null
    latitude, longitude, offset = site
    ordinal = np.asarray(hours.ordinal, dtype=float)
    zenith, azimuth = solar.solar_position(
        ordinal,
        np.asarray(hours.hour, dtype=float) - 0.5,
        latitude=latitude,
        longitude=longitude,
        utc_offset_h=offset,
    )
    # daily means of the dry-bulb, the days of the degree-days (hour 24 ends its own day)
    days = sorted(set(hours.ordinal))
    position = {d: k for k, d in enumerate(days)}
    day_index = np.asarray([position[d] for d in hours.ordinal], dtype=int)
    temps = np.asarray(hours.temp, dtype=float)
    known = ~np.isnan(temps)
    sums = np.bincount(day_index[known], weights=temps[known], minlength=len(days))
    counts = np.bincount(day_index[known], minlength=len(days))
    means = np.where(counts > 0, sums / np.maximum(counts, 1), np.inf)  # no data: never heating
    found = solar.heating_day_sums(
        day=day_index,
        daily_mean_c=means.tolist(),
        zenith=zenith,
        solar_azimuth=azimuth,
        dni=np.asarray(hours.dni),
        dhi=np.asarray(hours.dhi),
        ghi=np.asarray(hours.ghi),
        bases_c=bases_c,
    )
    rows = [
        SolarRowIn(
            base=base,
            days=found.days[k],
            beam_horizontal=_to_units(found.beam_horizontal[k], units),
            diffuse_horizontal=_to_units(found.diffuse_horizontal[k], units),
            global_horizontal=_to_units(found.global_horizontal[k], units),
            beam_vertical=[_to_units(v, units) for v in found.beam_vertical[k]],
        )
        for k, base in enumerate(bases)
    ]
    notes = []
    if hours.missing:
        notes.append(f"{hours.missing:,} hours have a missing irradiance value, counted as zero")
    return (
        SolarIn(
            station=(station or None) and station[:200],
            latitude=latitude,
            longitude=longitude,
            table=rows,
        ),
        notes,
    )
