"""TMY3 weather files: two header lines (station, column names), columns ``Date (MM/DD/YYYY)``,
``Time (HH:MM)``, ``Dry-bulb (C)``; hour-ending 01:00..24:00, where 24:00 belongs to the day it
ends (-9900 marks a missing value, TMY3 users' manual)."""

from __future__ import annotations

import csv
from collections.abc import Iterator
from itertools import islice

from server.services.weather_lines import day_number, input_error
from server.services.weather_rows import assemble, hour_ending, match_rows
from server.services.weather_series import RawSeries


def _tmy3_day(key: object) -> int | None:
    month, _, rest = str(key).partition("/")
    day, _, year = rest.partition("/")
    return day_number(year, month, day)


def read_tmy3(lines: Iterator[str]) -> RawSeries:
    first, header = (list(islice(lines, 2)) + ["", ""])[:2]
    names = [c.strip() for c in next(csv.reader([header]))]
    try:
        wanted = [names.index(n) for n in ("Date (MM/DD/YYYY)", "Time (HH:MM)", "Dry-bulb (C)")]
    except ValueError:
        raise input_error("the TMY3 file has no 'Dry-bulb (C)', date or time column") from None
    if wanted != sorted(wanted):
        raise input_error("the TMY3 file's date, time and dry-bulb columns are out of order")
    dates, times, values, filled = match_rows(lines, tuple((i,) for i in wanted))
    if not values:
        raise input_error("the TMY3 file has no data rows that can be read")
    raw = assemble(
        "tmy3",
        filled,
        dates,
        times,
        values,
        _tmy3_day,
        lambda key: hour_ending(str(key).partition(":")[0]),
        -9900.0,  # missing-value marker, TMY3 users' manual
    )
    station = next(csv.reader([first]), [])
    raw.station = (station[1].strip() or None) if len(station) > 1 else None
    return raw
