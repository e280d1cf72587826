"""Dates as US bills and spreadsheets write them, or ISO.

``1/6/2025``, ``01/06/2025``, ``1/6/25``, ``1-6-2025``, ``Jan 6 2025``, ``Jan 6, 2025``,
``January 6th 2025``, ``6-Jan-2025``, ``2025-01-06``, ``2025/01/06`` (a trailing time of day,
as spreadsheets add, is dropped). Slashed dates are month/day/year; one whose first number is
over 12 is refused, never guessed.
"""

from __future__ import annotations

import re
from datetime import date

_MONTHS = {
    name: number
    for number, names in enumerate(
        (
            ("jan", "january"),
            ("feb", "february"),
            ("mar", "march"),
            ("apr", "april"),
            ("may",),
            ("jun", "june"),
            ("jul", "july"),
            ("aug", "august"),
            ("sep", "sept", "september"),
            ("oct", "october"),
            ("nov", "november"),
            ("dec", "december"),
        ),
        start=1,
    )
    for name in names
}
_TIME_OF_DAY = re.compile(r"\s+\d{1,2}:\d{2}(?::\d{2})?(?:\s*[AaPp][Mm])?$")
_ISO = re.compile(r"^(\d{4})[-/](\d{1,2})[-/](\d{1,2})$")
_US = re.compile(r"^(\d{1,2})([/-])(\d{1,2})\2(\d{4}|\d{2})$")
_MONTH_FIRST = re.compile(r"^([A-Za-z]{3,9})\.?\s+(\d{1,2})(?:st|nd|rd|th)?,?\s+(\d{4})$")
_DAY_FIRST = re.compile(r"^(\d{1,2})[\s-]([A-Za-z]{3,9})\.?[\s,-]+(\d{4}|\d{2})$")
#: Years a bill can date from.
YEARS = (1950, 2100)


class DateTextError(ValueError):
    """Text that is not a date; ``str(error)`` is the message for the user."""


def _year(text: str) -> int:
    year = int(text)
    return year + (2000 if year < 70 else 1900) if len(text) == 2 else year


def _make_date(year: int, month: int, day: int, raw: str) -> date:
    if not YEARS[0] <= year <= YEARS[1]:
        raise DateTextError(f"'{raw}': the year {year} is not a billing year")
    try:
        return date(year, month, day)
    except ValueError:
        raise DateTextError(f"'{raw}' is not a calendar date") from None


def read_date(text: str) -> date:
    """A date as US bills and spreadsheets write it, or ISO (see the module docstring).

    Raises
    ------
    DateTextError
        With a plain message: not a date, a day/month order that is not US, not a calendar
        date.

    Examples
    --------
    >>> read_date("1/6/2025"), read_date("Jan 6, 2025"), read_date("2025-01-06")
    (datetime.date(2025, 1, 6), datetime.date(2025, 1, 6), datetime.date(2025, 1, 6))
    """
    raw = " ".join(str(text).split())
    if not raw:
        raise DateTextError("enter a date, like 1/6/2025 or 2025-01-06")
    if len(raw) > 40:
        raise DateTextError("that is too long to be a date")
    bare = _TIME_OF_DAY.sub("", raw)
    if match := _ISO.match(bare):
        return _make_date(int(match[1]), int(match[2]), int(match[3]), raw)
    if match := _US.match(bare):
        month, day, year = int(match[1]), int(match[3]), _year(match[4])
        if month > 12:
            raise DateTextError(
                f"'{raw}': dates are read month/day/year, and {month} is no month; write "
                f"{year}-{day:02d}-{month:02d} if you mean {month} {_month_name(day)}"
                if day <= 12
                else f"'{raw}': dates are read month/day/year, and {month} is no month"
            )
        return _make_date(year, month, day, raw)
    for pattern, order in ((_MONTH_FIRST, "mdy"), (_DAY_FIRST, "dmy")):
        if match := pattern.match(bare):
            name, day_text = (match[1], match[2]) if order == "mdy" else (match[2], match[1])
            named = _MONTHS.get(name.lower())
            if named is None:
                raise DateTextError(f"'{raw}': '{name}' is not a month")
            return _make_date(_year(match[3]), named, int(day_text), raw)
    raise DateTextError(f"'{raw}' is not a date; write it like 1/6/2025, Jan 6 2025 or 2025-01-06")


def _month_name(month: int) -> str:
    return date(2001, month, 1).strftime("%B")


def is_date(text: str) -> bool:
    try:
        read_date(text)
    except DateTextError:
        return False
    return True
