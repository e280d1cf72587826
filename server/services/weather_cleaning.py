"""A weather file's raw values cleaned into a :class:`WeatherSeries`, each change said in words.

Implausible values (outside :data:`PLAUSIBLE_RANGE_C`), blanks and missing-value markers are
left out and counted; duplicate stamps keep their first value; values more often than hourly
are averaged into hours; a typical-year file (months from different years) is told apart from a
chronological one, which is put in order; gaps and a count of hours or days other than a full
year are noted. Problems that still allow a result become plain-words warnings; a file with no
usable temperature raises :class:`server.errors.InputError` with ``field="file"``.
"""

from __future__ import annotations

import math
import statistics
from collections.abc import Sequence
from datetime import date
from itertools import repeat
from operator import floordiv, mod

from server.services.weather_lines import input_error
from server.services.weather_series import RawSeries, WeatherSeries

#: Plausible outdoor dry-bulb range [°C] (common practice: wider than the record of any
#: inhabited place); values outside it are left out and counted.
PLAUSIBLE_RANGE_C = (-70.0, 60.0)


def _keep_plausible(raw: RawSeries, notes: list[str]) -> tuple[list[int], Sequence[float]]:
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
        raise input_error("the file has no usable temperatures: " + "; ".join(notes))
    return stamps, values


def _dedupe(
    raw: RawSeries, stamps: list[int], values: Sequence[float], notes: list[str]
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


def clean_series(raw: RawSeries) -> WeatherSeries:
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
