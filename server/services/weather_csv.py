"""Plain CSV weather files: the header row, the temperature and time columns told from their names.

A header row (looked for in the first 40 lines) with a timestamp column (or date + time, or
year/month/day[/hour] columns) and a temperature column found by its name (or named by the
caller), in °C or °F (from the column name, else the caller's default, with a warning); a pair
of max and min columns gives their mean. Dates in Y-M-D, M/D/Y or D/M/Y are told from all the
file's dates together; hourly or daily is told from the spacing of the stamps, and hour-ending
stamps (01:00 to 24:00) are moved to the hour they end. Only the used cells of each split line
are kept.
"""

from __future__ import annotations

import csv
import re
from array import array
from collections.abc import Callable, Iterable, Iterator, Sequence
from itertools import chain
from operator import add, itemgetter, methodcaller
from typing import Any

from server.physics.units import f_to_c
from server.services.weather_lines import MAX_KEY_CHARS, day_number, input_error, number
from server.services.weather_series import RawSeries

NOT_WEATHER = (
    "this is not a weather file Warmstead can read: upload an EPW file, a TMY3 file, or a CSV "
    "with a timestamp column and a temperature column"
)
_TEMP_WORDS = {"temp", "temperature", "drybulb", "tout", "tair", "oat", "tavg", "tmean", "t2m"}
_MEAN_WORDS = {"mean", "avg", "average", "tavg", "tmean"}
_MAX_WORDS, _MIN_WORDS = {"max", "maximum", "tmax"}, {"min", "minimum", "tmin"}
_NOT_AIR = {"dew", "dewpoint", "wet", "wetbulb", "soil", "water", "ground", "indoor", "inside"}
_NOT_AIR |= {"room", "setpoint", "source", "uncert", "flag", "quality", "qc", "std", "stdev"}
_NOT_AIR |= {"feels", "apparent", "index", "chill", "sea", "surface", "deep"}
_F_WORDS, _C_WORDS = {"f", "degf", "fahrenheit"}, {"c", "degc", "celsius"}
_DATE = re.compile(r"^(\d{1,4})[-/.](\d{1,2})[-/.](\d{1,4})$")
_CLOCK = re.compile(
    r"^(\d{1,2})(?::(\d{1,2}))?(?::\d{1,2}(?:\.\d*)?)?\s*([AaPp][Mm])?"
    r"\s*(Z|[+-]\d{2}:?\d{2}|UTC|GMT)?$"
)


def _tokens(name: str) -> list[str]:
    name = name.lower().replace("dry-bulb", "drybulb").replace("dry bulb", "drybulb")
    return re.findall(r"[a-z0-9]+", name.replace("°", "deg"))


def _is_temp(tokens: list[str]) -> bool:
    words = set(tokens)
    if words & _NOT_AIR or not tokens:
        return False
    return bool(
        words & (_TEMP_WORDS | {"tmax", "tmin"})
        or tokens[0] in ("t", "tout", "tair")
        or tokens in (["degc"], ["degf"])
    )


def _pick_temperature(names: list[str]) -> tuple[list[int], list[str]]:
    """Index (or max/min pair) of the temperature column, and notes about the choice."""
    scored, highs, lows = [], [], []
    for i, name in enumerate(names):
        tokens = _tokens(name)
        if not _is_temp(tokens):
            continue
        words = set(tokens)
        if words & _MAX_WORDS:
            highs.append(i)
        elif words & _MIN_WORDS:
            lows.append(i)
        else:
            outdoor = words & (_MEAN_WORDS | {"outdoor", "outside", "air", "tair", "tout", "oat"})
            scored.append((-(3 if "drybulb" in words else 2 if outdoor else 1), i))
    if scored:
        scored.sort()
        notes = []
        if len(scored) > 1 and scored[0][0] == scored[1][0]:
            others = ", ".join(f"'{names[i]}'" for _, i in scored[1:4])
            notes.append(
                f"several columns could be the temperature; used '{names[scored[0][1]]}' "
                f"(not {others}); send temperature_column to choose another"
            )
        return [scored[0][1]], notes
    if highs and lows:
        note = (
            f"no mean temperature column: each value is (max + min) / 2 of "
            f"'{names[highs[0]]}' and '{names[lows[0]]}'"
        )
        return [highs[0], lows[0]], [note]
    return [], []


def _unit_hint(names: list[str]) -> str | None:
    hints = set()
    for name in names:
        words = set(_tokens(name))
        if words & _F_WORDS:
            hints.add("F")
        elif words & _C_WORDS:
            hints.add("C")
    return hints.pop() if len(hints) == 1 else None


def _time_layout(names: list[str]) -> tuple[str, list[int]]:
    """How the stamps are given: "stamp" [col], "date+time" [date, time] or "ymdh" [...]."""
    words = [set(_tokens(n)) for n in names]

    def find(test: Callable[[set[str]], bool]) -> int | None:
        return next((i for i, w in enumerate(words) if test(w)), None)

    combined = find(lambda w: bool(w & {"timestamp", "datetime", "valid"}) or {"date", "time"} <= w)
    day = find(lambda w: "date" in w)
    clock = find(lambda w: bool(w & {"time", "hour", "hr"}) and "date" not in w)
    if combined is not None:
        return "stamp", [combined]
    if day is not None:
        return ("date+time", [day, clock]) if clock is not None else ("stamp", [day])
    year, month = (
        find(lambda w: bool(w & {"year", "yr"})),
        find(lambda w: bool(w & {"month", "mo"})),
    )
    day = find(lambda w: "day" in w)
    if year is not None and month is not None and day is not None:
        return "ymdh", [year, month, day] + ([clock] if clock is not None else [])
    return "stamp", [clock if clock is not None else 0]


def _clock_minutes(text: object) -> int | None:
    """Minute of the day of a clock text ("13:00", "1:00 PM", "13"); -1 when there is none."""
    text = str(text).strip()
    if not text:
        return -1
    match = _CLOCK.match(text)
    if match is None:
        return None
    hour, minute = int(match.group(1)), int(match.group(2) or 0)
    if match.group(3):
        hour = hour % 12 + (12 if match.group(3).lower() == "pm" else 0)
    if hour > 24 or minute > 59 or (hour == 24 and minute):
        return None
    return hour * 60 + minute


def _date_reader(keys: set[str]) -> Callable[[object], int | None]:
    """Day ordinals of date texts, with Y-M-D, M/D/Y or D/M/Y told from all the dates."""
    parts = {}
    for key in keys:
        match = _DATE.match(key)
        if match:
            parts[key] = tuple(int(g) for g in match.groups())
    firsts = [p[0] for p in parts.values()]
    seconds = [p[1] for p in parts.values()]
    dotted = any("." in key for key in parts)
    ymd = any(a >= 100 for a in firsts)
    dmy = not ymd and (any(a > 12 for a in firsts) or (dotted and all(b <= 12 for b in seconds)))

    def read(key: object) -> int | None:
        if key not in parts:
            return None
        a, b, c = parts[key]
        year, month, day = (a, b, c) if ymd else (c, b, a) if dmy else (c, a, b)
        year += 2000 if year < 70 else 1900 if year < 100 else 0
        return day_number(year, month, day)

    return read


def _find_header(
    lines: list[str], wanted: str | None
) -> tuple[int, list[str], str, list[int], list[str]]:
    first_row: list[str] = []
    for i, line in enumerate(lines[:40]):
        if not line.strip() or line.lstrip().startswith("#"):
            continue
        delimiter = max((",", ";", "\t"), key=line.count)
        row = [c.strip() for c in next(csv.reader([line], delimiter=delimiter))]
        if len(row) < 2:
            continue
        first_row = first_row or row
        if wanted is not None:
            lowered = [c.lower() for c in row]
            if wanted.strip().lower() in lowered:
                return i, row, delimiter, [lowered.index(wanted.strip().lower())], []
            continue
        columns, notes = _pick_temperature(row)
        if columns:
            return i, row, delimiter, columns, notes
    if wanted is not None and first_row:
        listing = ", ".join(f"'{c}'" for c in first_row if c)
        raise input_error(
            f"no column named '{wanted}'; the columns are: {listing}", "temperature_column"
        )
    if first_row:
        raise input_error(
            "no temperature column found: name it temp, temperature or dry-bulb, or send "
            "temperature_column with the column's name"
        )
    raise input_error(NOT_WEATHER)


def _csv_rows(
    lines: Iterable[str], delimiter: str, time_cols: list[int], temp_cols: list[int]
) -> tuple[list[Any], array[float], int]:
    """Each data row's time texts and temperature, and the number of rows skipped.

    A row's time texts are one string for one time column, else a tuple in ``time_cols``
    order; only those cells and the temperature are kept, and a pair of temperature columns
    (max, min) gives their mean.
    """
    width = max(time_cols + temp_cols) + 1
    decimal_comma = delimiter == ";"
    take_time = itemgetter(*time_cols)
    one_time = len(time_cols) == 1
    first_temp, last_temp = temp_cols[0], temp_cols[-1]
    times: list[Any] = []
    values: array[float] = array("d")
    skipped = 0
    for line in lines:
        if '"' in line:
            try:
                row = next(csv.reader([line], delimiter=delimiter), [])
            except csv.Error:
                row = []
        else:
            row = line.split(delimiter)
        if len(row) < width:  # blank or short rows
            skipped += bool("".join(row).strip())
            continue
        stamp = take_time(row)
        if (len(stamp) if one_time else max(map(len, stamp))) > MAX_KEY_CHARS:
            skipped += 1
            continue
        times.append(stamp)
        first, last = row[first_temp], row[last_temp]
        if decimal_comma:
            first, last = first.replace(",", "."), last.replace(",", ".")
        try:
            value = float(first) if first_temp == last_temp else (float(first) + float(last)) / 2
        except ValueError:
            value = (number(first) + number(last)) / 2
        values.append(value)
    return times, values, skipped


def read_csv(
    head: list[str], rest: Iterator[str], wanted: str | None, unit: str | None, default_unit: str
) -> RawSeries:
    header_at, names, delimiter, temp_cols, notes = _find_header(head, wanted)
    if unit is None:
        unit = _unit_hint([names[i] for i in temp_cols])
        if unit is None:
            unit = default_unit
            notes.append(
                f"the temperature column {' and '.join(repr(names[i]) for i in temp_cols)} names "
                f"no unit; its values were read as °{unit}; send temperature_unit to say otherwise"
            )
    layout, time_cols = _time_layout(names)
    rows, numbers, skipped = _csv_rows(
        chain(head[header_at + 1 :], rest), delimiter, time_cols, temp_cols
    )
    if not rows:
        raise input_error("the file has a header but no data rows")

    def column(position: int) -> list[str]:
        """The texts of the ``position``-th time column."""
        return rows if len(time_cols) == 1 else list(map(itemgetter(position), rows))

    day_of: Callable[[object], int | None]
    if layout == "ymdh":
        day_keys: list[object] = list(zip(*(column(i) for i in range(3)), strict=True))
        hours = column(3) if len(time_cols) > 3 else None
        clock_keys: list[object] = [f"{h.strip()}:00" for h in hours] if hours else [""] * len(rows)
        day_of = lambda key: day_number(*key)  # type: ignore[misc]  # noqa: E731
    else:
        if layout == "date+time":
            day_keys = [text.strip() for text in column(0)]
            clock_keys = [text.strip() for text in column(1)]
        else:
            stamps_text = column(0)
            separator = "T" if re.match(r"\s*\d[\d/.-]*T\d", stamps_text[0]) else None
            pieces = list(map(methodcaller("split", separator, 1), stamps_text))
            sizes = set(map(len, pieces))  # 2: date and clock; 1: date only; 0: blank
            if sizes == {2}:
                day_keys = list(map(str.strip, map(itemgetter(0), pieces)))
                clock_keys = list(map(str.strip, map(itemgetter(1), pieces)))
            else:
                day_keys = [p[0].strip() if p else "" for p in pieces]
                clock_keys = [p[1].strip() if len(p) > 1 else "" for p in pieces]
        day_of = _date_reader({str(key) for key in day_keys})
    values: Sequence[float] = list(map(f_to_c, numbers)) if unit == "F" else numbers
    distinct_days, distinct_clocks = set(day_keys), set(clock_keys)
    days = {key: day for key in distinct_days if (day := day_of(key)) is not None}
    clocks = {key: m for key in distinct_clocks if (m := _clock_minutes(key)) is not None}
    if any("Z" in str(k) or "+" in str(k) or "GMT" in str(k) or "UTC" in str(k) for k in clocks):
        notes.append("time-zone offsets in the timestamps were ignored; clock times were used")
    if len(days) < len(distinct_days) or len(clocks) < len(distinct_clocks):
        keep = [
            i
            for i, (d, c) in enumerate(zip(day_keys, clock_keys, strict=True))
            if d in days and c in clocks
        ]
        skipped += len(rows) - len(keep)
        if not keep:
            where = " and ".join(f"'{names[i]}'" for i in time_cols[:2])
            raise input_error(
                f"the dates in {where} could not be read; write them like 2024-01-31 13:00 or "
                "01/31/2024 13:00"
            )
        day_keys, clock_keys = [day_keys[i] for i in keep], [clock_keys[i] for i in keep]
        values = [values[i] for i in keep]
    if not any(v == v for v in values):  # every value is NaN (v == v is False only for NaN)
        raise input_error(f"the temperature column '{names[temp_cols[0]]}' holds no numbers")
    ordinals = list(map(days.__getitem__, day_keys))
    minutes = list(map(clocks.__getitem__, clock_keys))
    day_starts = {key: day * 1440 for key, day in days.items()}
    clock_starts = {key: max(m, 0) for key, m in clocks.items()}
    stamps = list(
        map(add, map(day_starts.__getitem__, day_keys), map(clock_starts.__getitem__, clock_keys))
    )
    if max(minutes) < 0 or len(set(stamps)) == len(set(ordinals)):
        # no clock times, or one time a day: daily values
        return RawSeries("csv-daily", ordinals, values, False, notes, skipped=skipped)
    on_hour = all(m % 60 == 0 for m in minutes)
    if on_hour and (1440 in minutes or (minutes[0] == 60 and minutes[-1] == 0)):
        stamps = [s - 60 for s in stamps]  # hour-ending: each value is for the hour before
        notes.append(
            "timestamps were read as hour-ending (the file runs 01:00 to 24:00 or 00:00), so "
            "each value counts toward the hour before its stamp"
        )
    return RawSeries(
        "csv-hourly", stamps, values, True, notes, skipped=skipped, sub_hourly=not on_hour
    )
