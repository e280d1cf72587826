"""Read an uploaded weather file into a dry-bulb temperature series, one bounded line at a time.

Kinds read:

* ``epw``: EPW weather file: 8 header lines, then comma-separated rows whose fields
  1–4 are year, month, day, hour (1..24, hour-ending) and field 7 is dry-bulb [°C]
  (99.9 marks a missing value).
* ``tmy3``: two header lines (station, column names), columns ``Date (MM/DD/YYYY)``,
  ``Time (HH:MM)``, ``Dry-bulb (C)``; hour-ending 01:00..24:00, where 24:00 belongs to the day
  it ends (-9900 marks a missing value).
* ``csv-hourly`` / ``csv-daily``: a header row with a timestamp column (or date + time, or
  year/month/day[/hour] columns) and a temperature column found by its name; hourly or daily
  is told from the spacing of the stamps.

Each value is stored against the hour its interval *starts* (an hour-ending 24:00 value is
hour 23 of the same day), so grouping by date gives whole days. Problems that still allow a
result become plain-words warnings; an unreadable file raises
:class:`server.errors.InputError` with ``field="file"``.

Bounded reading: the file (bytes, or a seekable binary file such as an upload's spooled
temporary file) is read through a text wrapper one line at a time; no line longer than
:data:`MAX_LINE_CHARS` is read whole, and the read stops with an error as soon as the file has
more than :data:`MAX_DATA_LINES` non-blank lines, however large the file is. Each row keeps
only the fields used (its date and time texts, shared between rows that repeat them, and its
temperature as a float in an ``array('d')``), so a file's whole footprint is a few MB at most.

Speed: the EPW and TMY3 readers match one compiled regular expression per line that captures
only the needed fields, and the CSV reader keeps only the used cells of each split line: an
8,760-hour file takes about 15 ms of CPU.
"""

from __future__ import annotations

import codecs
import csv
import io
import math
import re
import statistics
from array import array
from collections.abc import Callable, Iterable, Iterator, Sequence
from dataclasses import dataclass, field
from datetime import date, datetime
from itertools import chain, islice, repeat
from operator import add, floordiv, itemgetter, methodcaller, mod
from typing import Any, BinaryIO

from server.errors import InputError
from server.physics.units import f_to_c

#: Plausible outdoor dry-bulb range [°C] (common practice: wider than the record of any
#: inhabited place); values outside it are left out and counted.
PLAUSIBLE_RANGE_C = (-70.0, 60.0)
#: Rows in the longest weather year [rows]: 366 days x 24 hours (a leap year of hourly
#: values; a daily year is at most 366 rows).
MAX_YEAR_ROWS = 8784
#: Most non-blank lines read [lines]: a leap year of hourly rows plus a margin for header
#: lines (EPW has 8; a CSV's header row is looked for in its first 40 lines) and a few extra
#: rows (a repeated hour at a clock change, the next year's first hour) (common practice).
#: A longer file is refused as soon as its next line is read, before the rest is.
MAX_DATA_LINES = MAX_YEAR_ROWS + 64
#: Longest line read [characters]: an EPW row is about 150, a TMY3 row about 200 (common
#: practice); a longer "line" is not a weather row and is not read whole.
MAX_LINE_CHARS = 4096
#: Blank lines are not kept but take time to read: at most this many in all.
MAX_BLANK_LINES = 4 * MAX_DATA_LINES
#: Longest date or time text kept for a row [characters]; a longer cell is no date.
MAX_KEY_CHARS = 64
#: Bytes looked at to tell a text file from an archive or a binary file.
SNIFF_BYTES = 8192
TOO_MANY_LINES = (
    f"the file has more than {MAX_DATA_LINES:,} lines: a weather year is at most "
    f"{MAX_YEAR_ROWS:,} hourly rows (366 days of 24 hours) or 366 daily rows; upload one "
    "year of hourly or daily data"
)
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
_CONTROL = re.compile(r"[\x00-\x08\x0b\x0c\x0e-\x1f\x7f]")


@dataclass(frozen=True, slots=True)
class WeatherSeries:
    """Outdoor dry-bulb values [°C], in the file's order (chronological unless a typical year).

    ``hours`` holds the hour (0..23) each value's interval starts, or is ``None`` for daily
    data.
    """

    kind: str  # "epw" | "tmy3" | "csv-hourly" | "csv-daily"
    dates: tuple[date, ...]
    hours: tuple[int, ...] | None
    temperatures_c: tuple[float, ...]
    warnings: tuple[str, ...] = ()
    station: str | None = None

    @property
    def is_hourly(self) -> bool:
        return self.hours is not None

    def timestamps(self) -> list[datetime]:
        """Start of each value's interval (local clock time, naive)."""
        if self.hours is None:
            return [datetime(d.year, d.month, d.day) for d in self.dates]
        return [
            datetime(d.year, d.month, d.day, h) for d, h in zip(self.dates, self.hours, strict=True)
        ]


@dataclass
class _Raw:
    kind: str
    stamps: list[int]  # minutes since day 1 of year 1 (hourly) or date ordinals (daily)
    values: Sequence[float]  # °C, NaN = missing or unreadable
    hourly: bool
    notes: list[str] = field(default_factory=list)
    station: str | None = None
    skipped: int = 0  # rows that could not be read at all
    markers: int = 0  # values equal to the format's missing-value marker
    sub_hourly: bool = False  # some stamps fall between whole hours


def _fail(message: str, field_name: str = "file") -> InputError:
    return InputError(field=field_name, message=message)


def _latin1_fallback(error: UnicodeError) -> tuple[str, int]:
    """Codec error handler: bytes that are not UTF-8 are read as Latin-1 (one char a byte)."""
    if not isinstance(error, UnicodeDecodeError):
        raise error
    return error.object[error.start : error.end].decode("latin-1"), error.end


codecs.register_error("warmstead-latin1", _latin1_fallback)


class _Lines:
    """The text lines of an uploaded file (newline removed), read one at a time, bounded.

    UTF-16 when the file starts with its byte-order mark, else UTF-8 (a leading BOM
    dropped) with any byte that is not UTF-8 read as Latin-1; ``\\r\\n``, ``\\r`` and ``\\n``
    all end a line. Raises :class:`InputError` for an empty, compressed or binary file, a line
    longer than :data:`MAX_LINE_CHARS`, or more than :data:`MAX_DATA_LINES` non-blank lines.
    """

    def __init__(self, stream: BinaryIO) -> None:
        start = stream.tell()
        head = stream.read(SNIFF_BYTES)
        stream.seek(start)
        if not head:
            raise _fail("the file is empty")
        if head[:2] == b"PK":
            raise _fail("the file is a ZIP archive: unzip it and upload the .epw or .csv inside")
        if head[:2] == b"\x1f\x8b":
            raise _fail("the file is gzip-compressed: decompress it and upload the text file")
        if head[:2] in (b"\xff\xfe", b"\xfe\xff"):
            encoding, errors = "utf-16", "replace"
        elif b"\x00" in head:
            raise _fail("the file is binary, not a text weather file")
        else:
            encoding, errors = "utf-8-sig", "warmstead-latin1"
        text = head.decode(encoding, errors="replace" if encoding == "utf-16" else errors)
        if len(_CONTROL.findall(text)) > len(text) // 100:
            raise _fail("the file is binary, not a text weather file")
        self._text = io.TextIOWrapper(stream, encoding=encoding, errors=errors, newline=None)  # type: ignore[arg-type]
        self.filled = 0  # non-blank lines read so far
        self._blank = 0

    def __iter__(self) -> Iterator[str]:
        return self

    def __next__(self) -> str:
        line = self._text.readline(MAX_LINE_CHARS + 1)
        if not line:
            raise StopIteration
        if line.endswith("\n"):
            line = line[:-1]
        elif len(line) > MAX_LINE_CHARS:
            raise _fail(
                f"line {self.filled + self._blank + 1:,} is longer than {MAX_LINE_CHARS:,} "
                "characters; a weather file's rows are a few hundred characters at most"
            )
        if line and not line.isspace():
            self.filled += 1
            if self.filled > MAX_DATA_LINES:
                raise _fail(TOO_MANY_LINES)
        else:
            self._blank += 1
            if self._blank > MAX_BLANK_LINES:
                raise _fail(f"the file has more than {MAX_BLANK_LINES:,} blank lines")
        return line

    def close(self) -> None:
        """Let go of the binary file without closing it (its owner closes it)."""
        self._text.detach()


def _number(text: str) -> float:
    """A cell's number; NaN where it is blank or not a number."""
    try:
        return float(text)
    except ValueError:
        return math.nan


def _day_number(year: str | int, month: str | int, day: str | int) -> int | None:
    try:
        return date(int(year), int(month), int(day)).toordinal()
    except ValueError:
        return None


def _line_pattern(groups: tuple[tuple[int, ...], ...]) -> re.Pattern[str]:
    """A regex capturing, in one line, each group of adjacent 0-based comma-separated fields.

    ``((0, 1, 2), (6,))`` captures ``"2001,1,31"`` and field 6: one string per group, so the
    captured keys hash fast and repeat (one distinct date string per day).
    """
    field_text = "[^,]*+"
    parts, at = ["^"], 0
    for group in groups:
        parts.append((field_text + ",") * (group[0] - at))
        parts.append("(" + ",".join([field_text] * len(group)) + ")")
        at = group[-1] + 1
        parts.append(",")
    parts[-1] = ""
    return re.compile("".join(parts))


def _match_rows(
    lines: Iterable[str], groups: tuple[tuple[int, ...], ...]
) -> tuple[list[str], list[str], array[float], int]:
    """Day keys, clock keys and temperatures of the lines that match, and the non-blank count.

    ``groups`` are the day, clock and temperature fields. Equal keys are stored once.
    """
    pattern = _line_pattern(groups)
    shared: dict[str, str] = {}
    days: list[str] = []
    clocks: list[str] = []
    values: array[float] = array("d")
    filled = 0
    for line in lines:
        if not line.strip():
            continue
        filled += 1
        match = pattern.match(line)
        if match is None:
            continue
        day, clock, temperature = match.groups()
        if len(day) > MAX_KEY_CHARS or len(clock) > MAX_KEY_CHARS:
            continue
        days.append(shared.setdefault(day, day))
        clocks.append(shared.setdefault(clock, clock))
        values.append(_number(temperature))
    return days, clocks, values, filled


def _assemble(
    kind: str,
    lines: int,
    day_keys: Sequence[object],
    clock_keys: Sequence[object],
    values: Sequence[float],
    day_of: Callable[[object], int | None],
    minute_of: Callable[[object], int | None],
    marker: float,
) -> _Raw:
    """Stamps from day and clock keys, each mapped once through a cache (few are distinct)."""
    days = {key: day_of(key) for key in set(day_keys)}
    clocks = {key: minute_of(key) for key in set(clock_keys)}
    if None in days.values() or None in clocks.values():
        keep = [
            i
            for i, (d, c) in enumerate(zip(day_keys, clock_keys, strict=True))
            if days[d] is not None and clocks[c] is not None
        ]
        day_keys, clock_keys = [day_keys[i] for i in keep], [clock_keys[i] for i in keep]
        values = [values[i] for i in keep]
    day_starts = {key: day * 1440 for key, day in days.items() if day is not None}
    stamps = list(
        map(add, map(day_starts.__getitem__, day_keys), map(clocks.__getitem__, clock_keys))
    )
    if not stamps:
        raise _fail(f"the {kind.upper()} file has no data rows that can be read")
    sub_hourly = any(minute % 60 for minute in clocks.values() if minute is not None)
    return _Raw(
        kind,
        stamps,
        values,
        True,
        skipped=max(0, lines - len(stamps)),
        markers=values.count(marker),
        sub_hourly=sub_hourly,
    )


def _hour_ending(hour_text: str, minute_text: str = "0") -> int | None:
    """Minute of the day an hour-ending stamp's hour starts: hour 1..24 -> 0..1380."""
    try:
        hour, minute = int(hour_text), int(float(minute_text or 0)) % 60
    except ValueError:
        return None
    return (hour - 1) * 60 + minute if 1 <= hour <= 24 else None


def _read_epw(lines: Iterator[str]) -> _Raw:
    header = list(islice(lines, 8))
    days, clocks, values, filled = _match_rows(lines, ((0, 1, 2), (3, 4), (6,)))
    if len(header) < 8 or not filled:
        raise _fail("the EPW file has no data rows after its 8 header lines")
    if not values:
        raise _fail("the EPW file has no data rows that can be read")
    raw = _assemble(
        "epw",
        filled,
        days,
        clocks,
        values,
        lambda key: _day_number(*str(key).split(",")),
        lambda key: _hour_ending(*str(key).split(",")),
        99.9,  # missing dry-bulb marker, EPW data dictionary
    )
    location = header[0].split(",")
    raw.station = (location[1].strip() or None) if len(location) > 1 else None
    return raw


def _tmy3_day(key: object) -> int | None:
    month, _, rest = str(key).partition("/")
    day, _, year = rest.partition("/")
    return _day_number(year, month, day)


def _read_tmy3(lines: Iterator[str]) -> _Raw:
    first, header = (list(islice(lines, 2)) + ["", ""])[:2]
    names = [c.strip() for c in next(csv.reader([header]))]
    try:
        wanted = [names.index(n) for n in ("Date (MM/DD/YYYY)", "Time (HH:MM)", "Dry-bulb (C)")]
    except ValueError:
        raise _fail("the TMY3 file has no 'Dry-bulb (C)', date or time column") from None
    if wanted != sorted(wanted):
        raise _fail("the TMY3 file's date, time and dry-bulb columns are out of order")
    dates, times, values, filled = _match_rows(lines, tuple((i,) for i in wanted))
    if not values:
        raise _fail("the TMY3 file has no data rows that can be read")
    raw = _assemble(
        "tmy3",
        filled,
        dates,
        times,
        values,
        _tmy3_day,
        lambda key: _hour_ending(str(key).partition(":")[0]),
        -9900.0,  # missing-value marker, TMY3 users' manual
    )
    station = next(csv.reader([first]), [])
    raw.station = (station[1].strip() or None) if len(station) > 1 else None
    return raw


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
        return _day_number(year, month, day)

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
        raise _fail(f"no column named '{wanted}'; the columns are: {listing}", "temperature_column")
    if first_row:
        raise _fail(
            "no temperature column found: name it temp, temperature or dry-bulb, or send "
            "temperature_column with the column's name"
        )
    raise _fail(NOT_WEATHER)


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
            value = (_number(first) + _number(last)) / 2
        values.append(value)
    return times, values, skipped


def _read_csv(
    head: list[str], rest: Iterator[str], wanted: str | None, unit: str | None, default_unit: str
) -> _Raw:
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
        raise _fail("the file has a header but no data rows")

    def column(position: int) -> list[str]:
        """The texts of the ``position``-th time column."""
        return rows if len(time_cols) == 1 else list(map(itemgetter(position), rows))

    day_of: Callable[[object], int | None]
    if layout == "ymdh":
        day_keys: list[object] = list(zip(*(column(i) for i in range(3)), strict=True))
        hours = column(3) if len(time_cols) > 3 else None
        clock_keys: list[object] = [f"{h.strip()}:00" for h in hours] if hours else [""] * len(rows)
        day_of = lambda key: _day_number(*key)  # type: ignore[misc]  # noqa: E731
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
            raise _fail(
                f"the dates in {where} could not be read; write them like 2024-01-31 13:00 or "
                "01/31/2024 13:00"
            )
        day_keys, clock_keys = [day_keys[i] for i in keep], [clock_keys[i] for i in keep]
        values = [values[i] for i in keep]
    if not any(v == v for v in values):  # every value is NaN (v == v is False only for NaN)
        raise _fail(f"the temperature column '{names[temp_cols[0]]}' holds no numbers")
    ordinals = list(map(days.__getitem__, day_keys))
    minutes = list(map(clocks.__getitem__, clock_keys))
    day_starts = {key: day * 1440 for key, day in days.items()}
    clock_starts = {key: max(m, 0) for key, m in clocks.items()}
    stamps = list(
        map(add, map(day_starts.__getitem__, day_keys), map(clock_starts.__getitem__, clock_keys))
    )
    if max(minutes) < 0 or len(set(stamps)) == len(set(ordinals)):
        # no clock times, or one time a day: daily values
        return _Raw("csv-daily", ordinals, values, False, notes, skipped=skipped)
    on_hour = all(m % 60 == 0 for m in minutes)
    if on_hour and (1440 in minutes or (minutes[0] == 60 and minutes[-1] == 0)):
        stamps = [s - 60 for s in stamps]  # hour-ending: each value is for the hour before
        notes.append(
            "timestamps were read as hour-ending (the file runs 01:00 to 24:00 or 00:00), so "
            "each value counts toward the hour before its stamp"
        )
    return _Raw("csv-hourly", stamps, values, True, notes, skipped=skipped, sub_hourly=not on_hour)


def _keep_plausible(raw: _Raw, notes: list[str]) -> tuple[list[int], Sequence[float]]:
    low, high = PLAUSIBLE_RANGE_C
    stamps, values = raw.stamps, raw.values
    total = math.fsum(values) if values else math.nan
    if not (math.isfinite(total) and low <= min(values) and max(values) <= high):
        pairs = [(s, v) for s, v in zip(stamps, values, strict=True) if low <= v <= high]
        stamps, values = [p[0] for p in pairs], [p[1] for p in pairs]
    dropped = len(raw.values) - len(values)
    blank = sum(1 for v in raw.values if v != v) if dropped else 0
    if raw.skipped:
        notes.append(f"{raw.skipped:,} rows could not be read and were skipped")
    if blank or raw.markers:
        notes.append(
            f"{blank + raw.markers:,} values were blank or marked missing and were left out"
        )
    if dropped - blank - raw.markers > 0:
        notes.append(
            f"{dropped - blank - raw.markers:,} values outside −70 to 60 °C were left out as "
            "implausible"
        )
    if not values:
        raise _fail("the file has no usable temperatures: " + "; ".join(notes))
    return stamps, values


def _dedupe(
    raw: _Raw, stamps: list[int], values: Sequence[float], notes: list[str]
) -> tuple[list[int], Sequence[float]]:
    if len(set(stamps)) < len(stamps):
        first: dict[int, float] = {}
        for stamp, value in zip(stamps, values, strict=True):
            first.setdefault(stamp, value)
        notes.append(
            f"{len(stamps) - len(first):,} duplicate {'hours' if raw.hourly else 'days'} were "
            "found; the first value of each was kept"
        )
        stamps, values = list(first), list(first.values())
    if raw.sub_hourly:
        sums: dict[int, list[float]] = {}
        for stamp, value in zip(stamps, values, strict=True):
            sums.setdefault(stamp - stamp % 60, []).append(value)
        stamps = list(sums)
        values = [math.fsum(v) / len(v) for v in sums.values()]
        notes.append("values more often than hourly were averaged into hourly values")
    return stamps, values


def _finish(raw: _Raw) -> WeatherSeries:
    notes = list(raw.notes)
    stamps, values = _keep_plausible(raw, notes)
    stamps, values = _dedupe(raw, stamps, values, notes)
    per_day = 1440 if raw.hourly else 1
    ordinals = _days_of(stamps) if raw.hourly else stamps
    days = {o: date.fromordinal(o) for o in dict.fromkeys(ordinals)}
    years = sorted({d.year for d in days.values()})
    composite = _is_typical_year(list(days.values()))
    calendar = {o: o * per_day for o in days}
    if composite:
        notes.append(
            f"the file mixes years ({years[0]}–{years[-1]}), as typical-year files do: each "
            "month may come from a different year, and the results describe that typical year"
        )
        leap = any(d.month == 2 and d.day == 29 for d in days.values())
        calendar = {  # place each day in one reference year to look for gaps
            o: date(2000 if leap else 2001, d.month, d.day).toordinal() * per_day
            for o, d in days.items()
        }
    else:
        if stamps != sorted(stamps):
            pairs = sorted(zip(stamps, values, strict=True))
            stamps, values = [p[0] for p in pairs], [p[1] for p in pairs]
            ordinals = _days_of(stamps) if raw.hourly else stamps
        span = ordinals[-1] - ordinals[0] + 1
        if span > 366:
            notes.append(
                f"the file covers {span:,} days, more than a year: totals are for the whole "
                "period, not per year"
            )
    starts = sorted(calendar.values())
    whole_days = not raw.hourly or len(stamps) == 24 * len(days)  # stamps are distinct hours
    if not (whole_days and starts[-1] - starts[0] == (len(starts) - 1) * per_day):
        positions = [calendar[o] + s % per_day for o, s in zip(ordinals, stamps, strict=True)]
        _note_gaps(positions, stamps, raw.hourly, notes)
    count = len(values)
    if raw.hourly and count not in (8760, 8784):
        notes.append(f"the file has {count:,} hours; a full year has 8,760 (8,784 in a leap year)")
    elif not raw.hourly and count not in (365, 366):
        notes.append(f"the file has {count:,} days; a full year has 365 (366 in a leap year)")
    return WeatherSeries(
        kind=raw.kind,
        dates=tuple(map(days.__getitem__, ordinals)),
        hours=tuple(map(floordiv, map(mod, stamps, repeat(1440)), repeat(60)))
        if raw.hourly
        else None,
        temperatures_c=tuple(values),
        warnings=tuple(notes),
        station=raw.station,
    )


def _is_typical_year(days: list[date]) -> bool:
    """True for a typical-year file: months in calendar order, taken from different years.

    ``days`` are the distinct days in file order. A chronological file changes year only
    between Dec 31 and Jan 1 (or across a gap, where the month number then goes down).
    """
    pairs = list(zip(days, days[1:], strict=False))
    odd_change = any(a.year != b.year and abs(b.toordinal() - a.toordinal()) > 1 for a, b in pairs)
    return odd_change and all(a.month <= b.month for a, b in pairs)


def _days_of(stamps: list[int]) -> list[int]:
    """Day ordinals of minute stamps (C-level map: this runs on every hour of the file)."""
    return list(map(floordiv, stamps, repeat(1440)))


def _label(stamp: int, hourly: bool) -> str:
    day = date.fromordinal(stamp // 1440 if hourly else stamp)
    return f"{day.isoformat()} {stamp % 1440 // 60:02d}:00" if hourly else day.isoformat()


def _note_gaps(positions: list[int], stamps: list[int], hourly: bool, notes: list[str]) -> None:
    ordered = sorted(set(positions))
    unit = 60 if hourly else 1
    if len(ordered) < 2:
        return
    diffs = [b - a for a, b in zip(ordered, ordered[1:], strict=False)]
    step = unit
    if hourly:
        typical = int(statistics.median(diffs))
        step = typical if typical > 60 and typical % 60 == 0 else 60
        if step > 60:
            notes.append(f"values come every {step // 60} hours, not every hour")
    missing = gaps = 0
    first_after: int | None = None
    for at, diff in zip(ordered[:-1], diffs, strict=True):
        if diff > step:
            gaps += 1
            missing += diff // step - 1
            first_after = at if first_after is None else first_after
    if first_after is None:
        return
    what = ("hours" if step == 60 else "readings") if hourly else "days"
    label = _label(stamps[positions.index(first_after)], hourly)
    notes.append(
        f"{missing:,} {what} are missing in {gaps:,} gap{'s' if gaps > 1 else ''} (the first "
        f"after {label}); degree-days count only the days with data"
    )


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
        file, or one longer than a weather year (:data:`MAX_DATA_LINES`, refused before the
        rest is read); ``field="temperature_column"`` when the named column is not there.
    """
    for name, unit in (("temperature_unit", temperature_unit), ("default_unit", default_unit)):
        if unit is not None and unit not in ("C", "F"):
            raise _fail("must be C or F", name)
    lines = _Lines(io.BytesIO(data) if isinstance(data, bytes | bytearray) else data)
    try:
        head = list(islice(lines, 40))  # where a CSV's header row is looked for
        if not any(line.strip() for line in head) and not any(line.strip() for line in lines):
            raise _fail("the file is empty")
        rest = chain(head, lines)
        if head[0].lstrip().upper().startswith("LOCATION,"):
            raw = _read_epw(rest)
        elif len(head) > 1 and "Date (MM/DD/YYYY)" in head[1] and "Dry-bulb (C)" in head[1]:
            raw = _read_tmy3(rest)
        else:
            raw = _read_csv(head, lines, temperature_column, temperature_unit, default_unit)
    finally:
        lines.close()
    if raw.kind in ("epw", "tmy3") and (temperature_column or temperature_unit not in (None, "C")):
        raw.notes.append(
            f"temperature_column and temperature_unit apply to plain CSV files; the {raw.kind} "
            "file's dry-bulb field (°C) was used"
        )
    return _finish(raw)
