"""A bills document's inputs for the fit: daily and normal temperatures in °C, the periods in
read order, the days they cover, and the warnings about the data (see
:mod:`server.services.bills`).
"""

from __future__ import annotations

from datetime import date, timedelta

from server.documents.bills import (
    BillPeriodIn,
    BillsIn,
)
from server.errors import InputError
from server.physics import bill_model
from server.physics.units import UnitSystem, temp_from_c, temp_to_c

PLAUSIBLE_C = (-90.0, 60.0)
#: PRISM-style guidance on the data (common practice): periods, longest period [days]
MIN_PERIODS = 9
MAX_PERIOD_DAYS = 40
YEAR_DAYS = 330


def temperature_words(units: UnitSystem, value_c: float) -> str:
    return f"{temp_from_c(value_c, units):.1f} {'°F' if units == 'ip' else '°C'}"


def daily_temperatures_c(bills: BillsIn, units: UnitSystem, prefix: str) -> list[float | None]:
    assert bills.daily_temperatures is not None
    low, high = PLAUSIBLE_C
    out: list[float | None] = []
    for index, value in enumerate(bills.daily_temperatures.values):
        if value is None:
            out.append(None)
            continue
        celsius = temp_to_c(value, units)
        if not low <= celsius <= high:
            raise InputError(
                f"{prefix}daily_temperatures.values[{index}]",
                f"{value:g} is not a plausible daily mean (give {temperature_words(units, low)} to "
                f"{temperature_words(units, high)})",
            )
        out.append(celsius)
    return out


def normal_temperatures_c(bills: BillsIn, units: UnitSystem, prefix: str) -> list[float] | None:
    if bills.normal_temperatures is None:
        return None
    low, high = PLAUSIBLE_C
    out = []
    for index, value in enumerate(bills.normal_temperatures.values):
        celsius = temp_to_c(value, units)
        if not low <= celsius <= high:
            raise InputError(
                f"{prefix}normal_temperatures.values[{index}]",
                f"{value:g} is not a plausible daily mean",
            )
        out.append(celsius)
    return out


def ordered_periods(bills: BillsIn, prefix: str) -> list[tuple[int, BillPeriodIn]]:
    """Periods in date order with their document index; refuses empty and overlapping ones."""
    for index, period in enumerate(bills.periods):
        if period.end <= period.start:
            raise InputError(
                f"{prefix}periods[{index}].end",
                f"must be after start ({period.start.isoformat()}): a period runs from one "
                "meter read to the next",
            )
    ordered = sorted(enumerate(bills.periods), key=lambda item: item[1].start)
    for (i_prev, prev), (i_next, nxt) in zip(ordered, ordered[1:], strict=False):
        if nxt.start < prev.end:
            raise InputError(
                f"{prefix}periods[{i_next}].start",
                f"overlaps periods[{i_prev}] ({prev.start.isoformat()} to "
                f"{prev.end.isoformat()}); each day belongs to one period",
            )
    return ordered


def covered_periods(
    ordered: list[tuple[int, BillPeriodIn]],
    first: date,
    daily: list[float | None],
    prefix: str,
) -> list[bill_model.Period]:
    """The periods as indices into the daily series; 422 at the first day without a value."""
    out = []
    last = first + timedelta(days=len(daily) - 1)
    for index, period in ordered:
        start = (period.start - first).days
        days = (period.end - period.start).days
        for offset in range(days):
            day = start + offset
            if day < 0 or day >= len(daily) or daily[day] is None:
                missing = period.start + timedelta(days=offset)
                raise InputError(
                    f"{prefix}daily_temperatures",
                    f"has no value for {missing.isoformat()} (in periods[{index}], "
                    f"{period.start.isoformat()} to {period.end.isoformat()}); the daily "
                    f"temperatures run from {first.isoformat()} to {last.isoformat()} and must "
                    "cover every day of every period",
                )
        out.append(bill_model.Period(start, days, period.use))
    return out


def _listed(items: list[str], most: int = 5) -> str:
    """``a, b and c``; past ``most`` items, ``a, b, c, d, e and 7 more``."""
    if len(items) > most:
        return ", ".join(items[:most]) + f" and {len(items) - most} more"
    return items[0] if len(items) == 1 else ", ".join(items[:-1]) + " and " + items[-1]


def data_warnings(ordered: list[tuple[int, BillPeriodIn]]) -> list[str]:
    notes = []
    count = len(ordered)
    total = sum((p.end - p.start).days for _i, p in ordered)
    if count == 1:
        notes.append(
            "a single period: no regression is possible, so its average daily use is reported "
            "as the baseload, with no heating slope"
        )
    elif count < MIN_PERIODS:
        notes.append(
            f"only {count} periods: a reliable fit needs at least {MIN_PERIODS}, covering a "
            "heating season and some mild months"
        )
    if count > 1 and total < YEAR_DAYS:
        notes.append(
            f"the periods cover {total} days, less than a year: the fit may not see the whole "
            "range of the weather"
        )
    gaps = []
    for (i_prev, prev), (i_next, nxt) in zip(ordered, ordered[1:], strict=False):
        gap = (nxt.start - prev.end).days
        if gap > 0:
            gaps.append(
                f"{gap} day{'s' if gap != 1 else ''} between periods[{i_prev}] (read "
                f"{prev.end.isoformat()}) and periods[{i_next}] (read {nxt.start.isoformat()})"
            )
    if gaps:
        notes.append(
            f"{'a gap' if len(gaps) == 1 else f'{len(gaps)} gaps'} between periods: "
            f"{_listed(gaps)}; the use of those days is not in the bills, so it is not in the fit"
        )
    long = [
        f"periods[{index}] ({period.start.isoformat()} to {period.end.isoformat()}, "
        f"{(period.end - period.start).days} days)"
        for index, period in ordered
        if (period.end - period.start).days > MAX_PERIOD_DAYS
    ]
    if long:
        notes.append(
            f"{_listed(long)} {'runs' if len(long) == 1 else 'run'} more than "
            f"{MAX_PERIOD_DAYS} days: a long period blurs the weather it saw (often two bills "
            "merged, or a missed read)"
        )
    estimated = [
        f"periods[{index}] ({period.start.isoformat()} to {period.end.isoformat()})"
        for index, period in ordered
        if period.estimated
    ]
    if estimated:
        notes.append(
            f"{_listed(estimated)} {'is an estimated read' if len(estimated) == 1 else 'are estimated reads'}"
            ": the utility guessed the use, and the next actual read corrects it"
        )
    return notes
