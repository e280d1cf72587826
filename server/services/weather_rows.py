"""Rows of fixed comma-separated fields (EPW, TMY3): one compiled regular expression per line.

The EPW and TMY3 readers match one pattern per line that captures only the needed fields (the
day, the clock and the dry-bulb), and map each distinct day and clock text once: an
8,760-hour file takes about 15 ms of CPU.
"""

from __future__ import annotations

import re
from array import array
from collections.abc import Callable, Iterable, Sequence
from operator import add

from server.services.weather_lines import MAX_KEY_CHARS, input_error, number
from server.services.weather_series import RawSeries


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


def match_rows(
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
        values.append(number(temperature))
    return days, clocks, values, filled


def assemble(
    kind: str,
    lines: int,
    day_keys: Sequence[object],
    clock_keys: Sequence[object],
    values: Sequence[float],
    day_of: Callable[[object], int | None],
    minute_of: Callable[[object], int | None],
    marker: float,
) -> RawSeries:
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
        raise input_error(f"the {kind.upper()} file has no data rows that can be read")
    sub_hourly = any(minute % 60 for minute in clocks.values() if minute is not None)
    return RawSeries(
        kind,
        stamps,
        values,
        True,
        skipped=max(0, lines - len(stamps)),
        markers=values.count(marker),
        sub_hourly=sub_hourly,
    )


def hour_ending(hour_text: str, minute_text: str = "0") -> int | None:
    """Minute of the day an hour-ending stamp's hour starts: hour 1..24 -> 0..1380."""
    try:
        hour, minute = int(hour_text), int(float(minute_text or 0)) % 60
    except ValueError:
        return None
    return (hour - 1) * 60 + minute if 1 <= hour <= 24 else None
