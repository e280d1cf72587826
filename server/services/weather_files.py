"""Read an uploaded weather file into a dry-bulb temperature series (:func:`parse_weather_file`).

Kinds read:

* ``epw``: EPW weather file (:mod:`server.services.weather_epw`).
* ``tmy3``: TMY3 file (:mod:`server.services.weather_tmy3`).
* ``csv-hourly`` / ``csv-daily``: a header row with a timestamp column (or date + time, or
  year/month/day[/hour] columns) and a temperature column found by its name; hourly or daily
  is told from the spacing of the stamps (:mod:`server.services.weather_csv`).

The file is read one bounded line at a time (:mod:`server.services.weather_lines`); each value
is stored against the hour its interval *starts*, and the values are cleaned (implausible,
missing, duplicate, gaps) by :mod:`server.services.weather_cleaning`. Problems that still allow
a result become plain-words warnings; an unreadable file raises
:class:`server.errors.InputError` with ``field="file"``.
"""

from __future__ import annotations

import io
from itertools import chain, islice
from typing import BinaryIO

from server.services.weather_cleaning import clean_series
from server.services.weather_csv import read_csv
from server.services.weather_epw import read_epw
from server.services.weather_lines import UploadLines, input_error
from server.services.weather_series import WeatherSeries
from server.services.weather_tmy3 import read_tmy3


def parse_weather_file(
    data: bytes | BinaryIO,
    *,
    temperature_column: str | None = None,
    temperature_unit: str | None = None,
    default_unit: str = "C",
) -> WeatherSeries:
    """Parse an uploaded weather file into a :class:`WeatherSeries` (values in °C).

    Parameters
    ----------
    data : bytes or binary file
        The uploaded file's content, or a seekable binary file holding it (read from its
        current position, one bounded line at a time; left open).
    temperature_column : str, optional
        Plain CSV only: the name of the temperature column (otherwise found by name).
    temperature_unit : {"C", "F"}, optional
        Plain CSV only: the unit of that column (otherwise from the column name, else
        ``default_unit``).
    default_unit : {"C", "F"}
        Unit assumed for a CSV column that names none (a warning says so).

    Raises
    ------
    InputError
        ``field="file"`` for an empty, binary or unreadable file, one that is not a weather
        file, or one longer than a weather year (``weather_lines.MAX_DATA_LINES``, refused
        before the rest is read); ``field="temperature_column"`` when the named column is not
        there.
    """
    for name, unit in (("temperature_unit", temperature_unit), ("default_unit", default_unit)):
        if unit is not None and unit not in ("C", "F"):
            raise input_error("must be C or F", name)
    lines = UploadLines(io.BytesIO(data) if isinstance(data, bytes | bytearray) else data)
    try:
        head = list(islice(lines, 40))  # where a CSV's header row is looked for
        if not any(line.strip() for line in head) and not any(line.strip() for line in lines):
            raise input_error("the file is empty")
        rest = chain(head, lines)
        if head[0].lstrip().upper().startswith("LOCATION,"):
            raw = read_epw(rest)
        elif len(head) > 1 and "Date (MM/DD/YYYY)" in head[1] and "Dry-bulb (C)" in head[1]:
            raw = read_tmy3(rest)
        else:
            raw = read_csv(head, lines, temperature_column, temperature_unit, default_unit)
    finally:
        lines.close()
    if raw.kind in ("epw", "tmy3") and (temperature_column or temperature_unit not in (None, "C")):
        raw.notes.append(
            f"temperature_column and temperature_unit apply to plain CSV files; the {raw.kind} "
            "file's dry-bulb field (°C) was used"
        )
    return clean_series(raw)
