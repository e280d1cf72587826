"""Degree-days of an uploaded weather file: parse, compute in SI, answer in the request's units.

The one code path for the JSON calculator and the house pages' weather upload.
"""

from __future__ import annotations

import math
from typing import BinaryIO

from server.documents.climate import (
    DegreeDaysAtBase,
    DegreeDaysResult,
    MonthlyDegreeDays,
    TemperatureBin,
)
from server.errors import InputError
from server.physics import degree_days as dd
from server.physics.units import UnitSystem, c_to_f, delta_k_to_f, f_to_c
from server.services.weather_files import parse_weather_file
from server.services.weather_solar import solar_table

#: Default bases in the request's units: 65 °F, 18.3 °C (common practice; API contract).
DEFAULT_BASE = {"ip": 65.0, "si": 18.3}
#: Bases for ``degree_days_by_base``: 0..30 °C by 1 K, 32..86 °F by 2 °F (common practice).
TABLE_BASES = {"si": [float(b) for b in range(0, 31)], "ip": [float(b) for b in range(32, 87, 2)]}
_UNIT_NAMES = {"c": "C", "°c": "C", "degc": "C", "celsius": "C", "f": "F", "°f": "F"}
_UNIT_NAMES |= {"degf": "F", "fahrenheit": "F"}


def _base_c(value: float | None, units: UnitSystem, field: str) -> tuple[float, float]:
    """(base in the request's units, base in °C) with the default when ``value`` is None."""
    given = DEFAULT_BASE[units] if value is None else value
    if not isinstance(given, int | float) or not math.isfinite(given):
        raise InputError(field=field, message="must be a finite number (not NaN or infinity)")
    base_c = given if units == "si" else f_to_c(given)
    low, high = dd.BASE_RANGE_C
    if not low <= base_c <= high:
        shown = (low, high) if units == "si" else (c_to_f(low), c_to_f(high))
        symbol = "°C" if units == "si" else "°F"
        raise InputError(
            field=field, message=f"must be between {shown[0]:g} and {shown[1]:g} {symbol}"
        )
    return float(given), base_c


def _unit(temperature_unit: str | None) -> str | None:
    if temperature_unit is None or not temperature_unit.strip():
        return None
    unit = _UNIT_NAMES.get(temperature_unit.strip().lower())
    if unit is None:
        raise InputError(field="temperature_unit", message="must be C or F")
    return unit


def compute_degree_days(
    data: bytes | BinaryIO,
    *,
    units: str,
    heating_base: float | None,
    cooling_base: float | None,
    temperature_column: str | None = None,
    temperature_unit: str | None = None,
) -> DegreeDaysResult:
    """Degree-days, monthly table, design temperatures and climate zone of a weather file.

    ``data`` is the file's bytes or a seekable binary file (an upload's spooled file), read
    one bounded line at a time (:func:`server.services.weather_files.parse_weather_file`).

    ``units`` is "ip" (°F, °F·day) or "si" (°C, K·day); bases default to 65 °F / 18.3 °C.
    Raises :class:`InputError` (HTTP 422) for anything that cannot be computed.
    """
    if units not in ("ip", "si"):
        raise InputError(field="units", message="must be 'ip' or 'si'")
    system: UnitSystem = "ip" if units == "ip" else "si"
    heating_shown, heating_c = _base_c(heating_base, system, "heating_base")
    cooling_shown, cooling_c = _base_c(cooling_base, system, "cooling_base")
    column = (
        temperature_column.strip() if temperature_column and temperature_column.strip() else None
    )
    series = parse_weather_file(
        data,
        temperature_column=column,
        temperature_unit=_unit(temperature_unit),
        default_unit="F" if system == "ip" else "C",
    )
    warnings = list(series.warnings)
    try:
        days = dd.daily_means(series.dates, series.temperatures_c)
        totals = dd.degree_days(days, heating_base_c=heating_c, cooling_base_c=cooling_c)
        months = dd.monthly_degree_days(days, heating_base_c=heating_c, cooling_base_c=cooling_c)
        basis = "hourly" if series.is_hourly else "daily"
        design_values = series.temperatures_c if series.is_hourly else [d.mean_c for d in days]
        design = dd.design_temperatures(design_values, basis=basis)
        means = [d.mean_c for d in days]
        per_year = 365.25 / len(days) if len(days) > 366 else 1.0
        zone = dd.thermal_climate_zone(
            dd.heating_degree_days(means, dd.ZONE_HEATING_BASE_C) * per_year,
            dd.cooling_degree_days(means, dd.ZONE_COOLING_BASE_C) * per_year,
        )
        table = [
            (base, dd.heating_degree_days(means, c), dd.cooling_degree_days(means, c))
            for base in TABLE_BASES[system]
            for c in [base if system == "si" else f_to_c(base)]
        ]
    except ValueError as exc:
        raise InputError(field="file", message=str(exc)) from exc
    if series.is_hourly:
        short = sum(1 for d in days if d.values < 24)
        if short:
            warnings.append(
                f"{short:,} days have fewer than 24 hourly values; their means use the hours "
                "present"
            )
    else:
        warnings.append(
            "the file has daily values only: the design temperatures are percentiles of daily "
            "means, milder than design values from hourly data"
        )
    if len(days) < 365:
        warnings.append(
            f"the climate zone assumes a full year; this file covers {len(days):,} days"
        )
    elif per_year != 1.0:
        warnings.append("the climate zone uses the file's degree-days per year (365.25 days)")
    solar, solar_notes = solar_table(  # the sun's table: a second read, EPW and TMY3 only
        data,
        kind=series.kind,
        units=system,
        bases=TABLE_BASES[system],
        bases_c=[b if system == "si" else f_to_c(b) for b in TABLE_BASES[system]],
        station=series.station,
    )
    warnings.extend(solar_notes)
    to_dd = (lambda k: k) if system == "si" else delta_k_to_f
    to_t = (lambda c: c) if system == "si" else c_to_f
    return DegreeDaysResult(
        units=system,
        kind=series.kind,  # type: ignore[arg-type]
        station=series.station,
        hdd=to_dd(totals.hdd_k_day),
        cdd=to_dd(totals.cdd_k_day),
        heating_base=heating_shown,
        cooling_base=cooling_shown,
        days=totals.days,
        hours=len(series.temperatures_c) if series.is_hourly else None,
        first_date=series.dates[0],
        last_date=series.dates[-1],
        monthly=[
            MonthlyDegreeDays(
                month=m.month, hdd=to_dd(m.hdd_k_day), cdd=to_dd(m.cdd_k_day), days=m.days
            )
            for m in months
        ],
        heating_design_temperature=to_t(design.heating_c),
        cooling_design_temperature=to_t(design.cooling_c),
        design_temperature_basis=design.basis,  # type: ignore[arg-type]
        climate_zone=str(zone.number),
        climate_zone_name=zone.name,
        hdd18=to_dd(zone.hdd18_k_day),
        cdd10=to_dd(zone.cdd10_k_day),
        degree_days_by_base=[
            DegreeDaysAtBase(base=base, hdd=to_dd(hdd), cdd=to_dd(cdd)) for base, hdd, cdd in table
        ],
        temperature_bins=_bins(series.temperatures_c, system) if series.is_hourly else None,
        solar=solar,
        warnings=warnings,
    )


#: bin width in the request's units: 1 K (si), 2 °F (ip) (common practice for bin tables)
BIN_WIDTH = {"si": 1.0, "ip": 2.0}


def _bins(temperatures_c: tuple[float, ...], units: UnitSystem) -> list[TemperatureBin]:
    """Hours per dry-bulb bin of an hourly series, in the request's temperature unit."""
    from server.physics.heat_pump import bins_from_hourly

    values = temperatures_c if units == "si" else [c_to_f(t) for t in temperatures_c]
    return [
        TemperatureBin(temperature=centre, hours=hours)
        for centre, hours in bins_from_hourly(values, BIN_WIDTH[units])
    ]
