"""EPW weather files: 8 header lines, then comma-separated rows whose fields 1–4 are year,
month, day, hour (1..24, hour-ending) and field 7 is dry-bulb [°C] (99.9 marks a missing
value, EPW data dictionary)."""

from __future__ import annotations

from collections.abc import Iterator
from itertools import islice

from server.services.weather_lines import day_number, input_error
from server.services.weather_rows import assemble, hour_ending, match_rows
from server.services.weather_series import RawSeries


def read_epw(lines: Iterator[str]) -> RawSeries:
    header = list(islice(lines, 8))
    days, clocks, values, filled = match_rows(lines, ((0, 1, 2), (3, 4), (6,)))
    if len(header) < 8 or not filled:
        raise input_error("the EPW file has no data rows after its 8 header lines")
    if not values:
        raise input_error("the EPW file has no data rows that can be read")
    raw = assemble(
        "epw",
        filled,
        days,
        clocks,
        values,
        lambda key: day_number(*str(key).split(",")),
        lambda key: hour_ending(*str(key).split(",")),
        99.9,  # missing dry-bulb marker, EPW data dictionary
    )
    location = header[0].split(",")
    raw.station = (location[1].strip() or None) if len(location) > 1 else None
    return raw
