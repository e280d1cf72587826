"""Bills as the auditor has them: pasted spreadsheet rows, a CSV upload, a Green Button file.

Every reader returns a :class:`BillsRead`: **every** row that came in, each with its parsed
values or the message that says what is wrong with it (a page shows the row as typed with
its message beside it), and the good rows as meter-read periods for the bills document
(``start`` inclusive, ``end`` exclusive: the next read, as ``calc/bills`` takes them). A
wrong row never stops the others; only a file that cannot be read at all (not text, too
large, no rows, not Green Button XML) raises :class:`server.errors.InputError` (HTTP 422).

Pasted rows and CSV (:func:`read_bill_text`, :func:`read_bill_csv`)
--------------------------------------------------------------------
* Cells are tab separated (as a spreadsheet copies them) when the first row has a tab, else
  comma separated (``;`` when the first row has more of those), split by the CSV quoting
  rules: in comma-separated text a number with a grouping comma is one cell only when it is
  quoted (``"1,234"``); an unquoted one splits the row, which then has more cells than the
  others and says so.
* A header row is optional. Its names say which column is which (``start``/``from``/
  ``previous read``; ``end``/``to``/``read date``; ``days``; ``use``/``usage``/``therms``/
  ``kWh``; ``cost``/``amount``/``charges``; ``estimated``/``read type``; ``hdd``/``degree
  days``). Without one, the columns are told from their contents: the first two date columns
  are start and end, the first number column the use, a column of ``$`` amounts (else the
  second number column) the cost, a column of markers (``E``, ``A``, ``est``, ``actual``) the
  estimated flag.
* With a single date column the dates are the meter reads: each row's period runs from the
  read before it (the first row needs a ``days`` column, or only starts the series). With a
  ``days`` column and both dates, a count one more than the dates' difference means the end
  date is the last day of service (inclusive): the period then ends the day after.
* Dates in the usual US and ISO forms: ``1/6/2025``, ``01/06/2025``, ``1/6/25``,
  ``1-6-2025``, ``Jan 6 2025``, ``Jan 6, 2025``, ``January 6th 2025``, ``6-Jan-2025``,
  ``2025-01-06``, ``2025/01/06`` (a trailing time of day, as spreadsheets add, is dropped).
  Slashed dates are month/day/year; one whose first number is over 12 is refused, never
  guessed.
* Numbers through :mod:`server.services.number_text` (the one number reader: grouping and
  decimal commas by its rules); a cost may carry a ``$``. An estimated read is a flag column
  or a marker on the use: ``182 E``, ``182E``, ``182 (est)``, ``182*``.
* Rows of single days (a portal's daily usage export) are summed into calendar months.

Green Button (:func:`read_green_button`)
-----------------------------------------
The open format utilities offer customers for their usage data, NAESB REQ.21 (ESPI) [1]: an
Atom feed whose entries hold ``ReadingType`` (``uom``, ``powerOfTenMultiplier``,
``flowDirection``), ``IntervalBlock`` / ``IntervalReading`` (``timePeriod`` start in UTC
epoch seconds and duration in seconds, ``value``, optional ``cost`` and ``ReadingQuality``),
``UsageSummary`` (``billingPeriod``) and ``LocalTimeParameters`` (``tzOffset``). The value is
``value × 10^powerOfTenMultiplier`` in ``uom``: Wh (72) → kWh ÷ 1000, therm (169) as is,
Btu (132) → therm ÷ 100 000; ``cost`` is in hundred-thousandths of the currency [1]. Readings
of a month or so are billing periods already; shorter ones (hourly, daily) are summed by the
local date of their middle into the ``UsageSummary`` billing periods when the file has them,
else into calendar months. Quality codes 8, 9 (estimated) and 12 (projected) mark an
estimated read [1]. The XML is parsed with defusedxml (no DTD, no entities) and bounded in
size and readings.

References
----------
[1] NAESB REQ.21, Energy Services Provider Interface (ESPI), the Green Button data model:
    the ReadingType uom codes of its UnitSymbolKind enumeration (72 Wh, 132 Btu, 169 therm,
    119 ft³), IntervalReading cost in 1/100 000 of the currency, the QualityOfReading codes
    (8 and 9 estimated, 12 projected), flowDirection 19 reverse (from memory of the schema's
    enumerations, to be checked against the standard's text).
"""

from __future__ import annotations

import bisect
import csv
import io
import math
import re
from collections.abc import Iterable, Iterator
from dataclasses import dataclass, field, replace
from datetime import UTC, date, datetime, timedelta
from typing import Any, BinaryIO, Literal

from defusedxml import DefusedXmlException
from defusedxml import ElementTree as SafeTree

from server.errors import InputError
from server.services.number_text import NumberTextError, read_decimal

Source = Literal["pasted", "csv", "green_button"]
Status = Literal["ok", "warning", "error"]

#: Most non-blank rows read from a paste or a CSV [rows]: years of monthly bills are a few
#: dozen; a portal's daily export for three years is about 1,100 (common practice).
MAX_ROWS = 3000
#: Longest row [characters]; a bill row is well under a hundred.
MAX_LINE_CHARS = 1000
#: Largest paste [characters] and CSV upload [bytes].
MAX_TEXT_CHARS = MAX_ROWS * 200
MAX_CSV_BYTES = 2 * 1024 * 1024
#: Largest Green Button file [bytes] and most interval readings in it: three years of hourly
#: readings (26,304) or one year of 15-minute ones (35,136) with room to spare.
MAX_XML_BYTES = 32 * 1024 * 1024
MAX_READINGS = 120_000
#: Longest meter-read period accepted from a row [days] (a year and a month).
MAX_PERIOD_DAYS = 400
#: Readings this long or longer are billing periods themselves [s] (20 days).
BILLING_READING_S = 20 * 86_400

ATOM = "{http://www.w3.org/2005/Atom}"
ESPI = "{http://naesb.org/espi}"
#: ESPI UnitSymbolKind [1]: code -> (our unit, how many of the file's units make one of ours)
UOM = {72: ("kWh", 1000), 169: ("therm", 1), 132: ("therm", 100_000)}  # (unit, divisor)
UOM_WORDS = {119: "cubic feet", 42: "cubic metres", 128: "US gallons", 38: "W", 61: "VA"}
#: ESPI QualityOfReading codes that mean the figure was not read [1]
ESTIMATED_QUALITY = frozenset({8, 9, 12})
REVERSE_FLOW = 19
COST_DIVISOR = 100_000  # ESPI cost: hundred-thousandths of the currency [1]
FUEL_OF_UNIT = {"kWh": "electricity", "therm": "natural_gas"}


@dataclass(frozen=True, slots=True)
class BillRow:
    """One row as it came in, with its values or its message.

    ``status`` is ``ok``; ``warning`` (kept, with a note in ``message``); or ``error`` (not
    kept: ``message`` says why and ``field`` which cell: start, end, days, use, cost,
    estimated, hdd or row). ``text`` is the row as typed, so nothing is lost.
    """

    number: int
    text: str
    status: Status
    message: str = ""
    field: str | None = None
    start: date | None = None
    end: date | None = None
    use: float | None = None
    cost: float | None = None
    estimated: bool = False
    hdd: float | None = None

    @property
    def kept(self) -> bool:
        return self.status != "error"

    @property
    def days(self) -> int | None:
        return None if self.start is None or self.end is None else (self.end - self.start).days


@dataclass(frozen=True, slots=True)
class BillsRead:
    """What a reader made of a paste, a CSV or a Green Button file.

    ``columns`` names how each column was read (``start``, ``end``, ``days``, ``use``,
    ``cost``, ``estimated``, ``hdd`` or ``""`` for one not used); ``unit`` is the unit the
    use is in when the source says (a Green Button ``uom``, a header such as ``kWh``);
    ``fuel`` the bills fuel that unit suggests. :meth:`periods` gives the kept rows as the
    bills document's periods.
    """

    source: Source
    rows: tuple[BillRow, ...]
    columns: tuple[str, ...] = ()
    header: bool = False
    unit: str | None = None
    fuel: str | None = None
    warnings: tuple[str, ...] = ()

    @property
    def kept(self) -> tuple[BillRow, ...]:
        return tuple(row for row in self.rows if row.kept)

    @property
    def errors(self) -> tuple[BillRow, ...]:
        return tuple(row for row in self.rows if not row.kept)

    @property
    def message(self) -> str:
        """One line for the page: how many rows were read and how many need a look."""
        kept, bad = len(self.kept), len(self.errors)
        text = f"{kept} period{'s' if kept != 1 else ''} read"
        return text + (
            f"; {bad} row{'s' if bad != 1 else ''} not used (see the messages)" if bad else ""
        )

    def periods(self) -> list[dict[str, Any]]:
        """The kept rows as ``BillPeriodIn`` dicts (ISO dates), in date order."""
        out = []
        source = "pasted" if self.source == "pasted" else self.source
        for row in sorted(self.kept, key=lambda r: (r.start or date.min, r.number)):
            period: dict[str, Any] = {
                "start": row.start.isoformat() if row.start else None,
                "end": row.end.isoformat() if row.end else None,
                "use": row.use,
                "estimated": row.estimated,
                "source": source,
            }
            if row.cost is not None:
                period["cost"] = row.cost
            if row.hdd is not None:
                period["hdd"] = row.hdd
            out.append(period)
        return out


# --- dates ---------------------------------------------------------------------------------------

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


def _is_date(text: str) -> bool:
    try:
        read_date(text)
    except DateTextError:
        return False
    return True


# --- cells ---------------------------------------------------------------------------------------

_USE_MARK = re.compile(
    r"^(?P<number>.*?)\s*(?:\(\s*(?:e|est|estimated)\s*\)|(?<=[0-9.\s])(?:e|est|estimated)\.?|\*)$",
    re.IGNORECASE,
)
_TRUE = {"e", "est", "est.", "estimated", "estimate", "y", "yes", "true", "1", "x", "*"}
_FALSE = {"", "a", "act", "actual", "r", "read", "c", "customer", "n", "no", "false", "0", "-"}
_MONEY = re.compile(r"^\s*\$\s*")


def _flag(text: str) -> bool:
    word = text.strip().lower()
    if word in _TRUE:
        return True
    if word in _FALSE:
        return False
    raise NumberTextError(f"'{text.strip()}': mark an estimated read E (or est), an actual one A")


def _use(text: str, decimal_comma: bool) -> tuple[float, bool]:
    """The use and whether the cell marks it estimated (``182 E``, ``182*``)."""
    try:
        return read_decimal(text, decimal_comma=decimal_comma, low=0, high=1e9), False
    except NumberTextError as first:
        match = _USE_MARK.match(text.strip())
        if not match or not match["number"].strip():
            raise first from None
        return read_decimal(match["number"], decimal_comma=decimal_comma, low=0, high=1e9), True


def _cost(text: str, decimal_comma: bool) -> float:
    raw = text.strip()
    if raw.startswith("(") and raw.endswith(")") or raw.startswith("-"):
        raise NumberTextError(f"'{raw}' is a credit; give the cost as zero or more")
    return read_decimal(_MONEY.sub("", raw), decimal_comma=decimal_comma, low=0, high=1e9)


def _is_number(text: str, decimal_comma: bool) -> bool:
    try:
        _use(_MONEY.sub("", text), decimal_comma)
    except NumberTextError:
        return False
    return True


# --- columns -------------------------------------------------------------------------------------

_ROLE_WORDS: tuple[tuple[str, frozenset[str]], ...] = (
    ("hdd", frozenset({"hdd", "degree", "degreedays", "dd", "hdd65", "hdd60", "hdd18"})),
    ("estimated", frozenset({"estimated", "est", "estimate", "type", "flag", "actual", "quality"})),
    ("start", frozenset({"start", "from", "begin", "beginning", "previous", "prior", "first"})),
    ("end", frozenset({"end", "to", "through", "thru", "current", "ending", "read", "date"})),
    ("days", frozenset({"days", "day"})),
    (
        "use",
        frozenset(
            {"use", "usage", "used", "therm", "therms", "kwh", "gallons", "gal", "gallon"}
            | {"consumption", "quantity", "units", "ccf", "mcf", "cords", "cord", "amount_used"}
        ),
    ),
    ("cost", frozenset({"cost", "amount", "charge", "charges", "total", "bill", "dollars", "$"})),
)
_UNIT_WORDS = {"therm": "therm", "therms": "therm", "kwh": "kWh", "gallons": "gallon"}
_UNIT_WORDS |= {"gal": "gallon", "gallon": "gallon", "ccf": "ccf", "mcf": "mcf", "cords": "cord"}


def _role(name: str) -> str:
    tokens = set(re.findall(r"[a-z0-9$]+", name.lower()))
    if not tokens:
        return ""
    for role, words in _ROLE_WORDS:
        if role == "estimated" and "date" in tokens:
            continue
        if role == "days" and tokens & {"date", "degree"}:
            continue
        if tokens & words:
            return role
    return ""


def _header_roles(cells: list[str]) -> list[str]:
    roles: list[str] = []
    for cell in cells:
        role = _role(cell)
        roles.append("" if role in roles else role)
    return roles


def _content_roles(rows: list[list[str]], decimal_comma: bool) -> list[str]:
    """Column roles told from the cells: dates, $ amounts, markers, numbers (in that order)."""
    width = max((len(r) for r in rows), default=0)
    kinds = []
    for column in range(width):
        cells = [r[column].strip() for r in rows if column < len(r) and r[column].strip()]
        if not cells:
            kinds.append("")
            continue
        half = len(cells) / 2
        if sum(_is_date(c) for c in cells) > half:
            kinds.append("date")
        elif all(c.lower() in _TRUE | _FALSE for c in cells) and any(
            not _is_number(c, decimal_comma) for c in cells
        ):
            kinds.append("flag")
        elif (
            any(_MONEY.match(c) for c in cells)
            and sum(_is_number(c, decimal_comma) for c in cells) > half
        ):
            kinds.append("money")
        elif sum(_is_number(c, decimal_comma) for c in cells) > half:
            kinds.append("number")
        else:
            kinds.append("")
    roles = [""] * width
    dates = [i for i, k in enumerate(kinds) if k == "date"]
    for i, role in zip(dates, ("start", "end") if len(dates) > 1 else ("end",), strict=False):
        roles[i] = role
    numbers = [i for i, k in enumerate(kinds) if k == "number"]
    money = [i for i, k in enumerate(kinds) if k == "money"]
    if numbers:
        roles[numbers[0]] = "use"
    if money:
        roles[money[0]] = "cost"
    elif len(numbers) > 1:
        roles[numbers[1]] = "cost"
    flags = [i for i, k in enumerate(kinds) if k == "flag"]
    if flags:
        roles[flags[0]] = "estimated"
    return roles


def _split(line: str, delimiter: str) -> list[str]:
    """The cells of a line by the CSV quoting rules, trailing empty cells dropped."""
    try:
        cells = next(csv.reader([line], delimiter=delimiter, strict=True), [])
    except csv.Error:
        cells = line.split(delimiter)
    while cells and not cells[-1].strip():
        cells.pop()
    return cells


def _delimiter(line: str) -> str:
    if "\t" in line:
        return "\t"
    return ";" if line.count(";") > line.count(",") else ","


# --- rows ----------------------------------------------------------------------------------------


def _parse_row(
    number: int, text: str, cells: list[str], roles: list[str], width: int, decimal_comma: bool
) -> BillRow:
    row = BillRow(number=number, text=text, status="ok")
    if len(cells) > width:
        return replace(
            row,
            status="error",
            field="row",
            message=f"has {len(cells)} cells where {width} were expected; in comma-separated "
            'text put a number with a grouping comma in quotes ("1,234") or write it 1234',
        )
    values: dict[str, str] = {}
    for cell, role in zip(cells, roles, strict=False):
        if role:
            values[role] = cell.strip()
    problems: list[tuple[str, str]] = []
    parsed: dict[str, Any] = {}
    for role in ("start", "end"):
        if values.get(role):
            try:
                parsed[role] = read_date(values[role])
            except DateTextError as exc:
                problems.append((role, str(exc)))
    row = replace(row, start=parsed.get("start"), end=parsed.get("end"))
    if not values.get("use"):
        problems.append(("use", "enter the use for this period"))
    else:
        try:
            parsed["use"], parsed["estimated"] = _use(values["use"], decimal_comma)
        except NumberTextError as exc:
            problems.append(("use", f"use: {exc}"))
    for role, reader in (
        ("cost", lambda t: _cost(t, decimal_comma)),
        ("hdd", lambda t: read_decimal(t, decimal_comma=decimal_comma, low=0, high=1e5)),
        ("days", lambda t: float(read_decimal(t, low=1, high=MAX_PERIOD_DAYS))),
    ):
        if values.get(role):
            try:
                parsed[role] = reader(values[role])
            except NumberTextError as exc:
                problems.append((role, f"{role}: {exc}"))
    if values.get("estimated") is not None:
        try:
            parsed["estimated"] = parsed.get("estimated", False) or _flag(values["estimated"])
        except NumberTextError as exc:
            problems.append(("estimated", str(exc)))
    if problems:
        return replace(
            row, status="error", field=problems[0][0], message="; ".join(m for _f, m in problems)
        )
    start, end, note = parsed.get("start"), parsed.get("end"), ""
    days = parsed.get("days")
    if days is not None and days != int(days):
        return replace(row, status="error", field="days", message="days: must be a whole number")
    if start is not None and end is not None and days is not None:
        span = (end - start).days
        if int(days) == span + 1:
            end += timedelta(days=1)
            note = (
                f"{int(days)} days from {start.isoformat()} means {end - timedelta(days=1)} was "
                "the last day of service: the period ends the day after"
            )
        elif int(days) != span:
            return replace(
                row,
                status="error",
                field="days",
                message=f"the dates are {span} days apart but days says {int(days)}",
            )
    elif start is None and end is not None and days is not None:
        start = end - timedelta(days=int(days))
    row = replace(
        row,
        start=start,
        end=end,
        use=parsed.get("use"),
        cost=parsed.get("cost"),
        hdd=parsed.get("hdd"),
        estimated=bool(parsed.get("estimated", False)),
    )
    if note:
        row = replace(row, status="warning", message=note)
    return row


def _check_dates(row: BillRow) -> BillRow:
    if not row.kept or row.start is None or row.end is None:
        return row
    if row.end <= row.start:
        return replace(
            row,
            status="error",
            field="end",
            message=f"the end ({row.end.isoformat()}) must come after the start "
            f"({row.start.isoformat()}): a period runs from one meter read to the next",
        )
    if (row.end - row.start).days > MAX_PERIOD_DAYS:
        return replace(
            row,
            status="error",
            field="end",
            message=f"{(row.end - row.start).days} days is longer than a bill period "
            f"({MAX_PERIOD_DAYS} days at most): check the dates",
        )
    return row


def _chain(rows: list[BillRow]) -> list[BillRow]:
    """Single read dates: each period starts at the read before it (rows in read order)."""
    out: list[BillRow] = []
    previous: date | None = None
    for index, row in enumerate(rows):
        end = row.end
        if row.kept and row.start is None and end is not None:
            if previous is not None:
                row = replace(row, start=previous)
            else:
                row = replace(
                    row,
                    status="error",
                    field="start",
                    message=f"the first read ({end.isoformat()}) only starts the series: "
                    "its use is for days before it; give a days column or its start date"
                    if index == 0
                    else "the read date of the row before could not be read, so this "
                    "period's start is not known",
                )
        previous = row.end
        out.append(row)
    return out


def _daily(rows: list[BillRow]) -> bool:
    """A single date column a day apart row after row: days of use, not meter reads."""
    dates = sorted({r.end for r in rows if r.end is not None})
    if len(dates) < 28:
        return False
    gaps = sorted((b - a).days for a, b in zip(dates, dates[1:], strict=False))
    return gaps[len(gaps) // 2] == 1


def _days_of_use(rows: list[BillRow]) -> list[BillRow]:
    """Each row's date is its day of use: the period runs that day (to the next midnight)."""
    return [
        replace(r, start=r.end, end=r.end + timedelta(days=1))
        if r.kept and r.start is None and r.end is not None
        else r
        for r in rows
    ]


def _overlaps(rows: list[BillRow]) -> list[BillRow]:
    """A row whose dates overlap a kept row listed before it is marked, not kept."""
    by_number = {row.number: row for row in rows}
    kept = sorted((r for r in rows if r.kept and r.start and r.end), key=lambda r: r.number)
    starts: list[date] = []  # the kept periods, which never overlap, sorted by start
    taken: list[BillRow] = []
    for row in kept:
        assert row.start is not None and row.end is not None
        at = bisect.bisect_left(starts, row.start)
        clash = None
        if at > 0 and row.start < taken[at - 1].end:  # type: ignore[operator]
            clash = taken[at - 1]
        elif at < len(taken) and starts[at] < row.end:
            clash = taken[at]
        if clash is None:
            starts.insert(at, row.start)
            taken.insert(at, row)
            continue
        same = clash.start == row.start and clash.end == row.end
        by_number[row.number] = replace(
            row,
            status="error",
            field="start",
            message=(
                f"the same period as row {clash.number}"
                if same
                else f"overlaps row {clash.number} ({clash.start} to {clash.end}); each day "
                "belongs to one period"
            ),
        )
    return [by_number[row.number] for row in rows]


def _monthly_rows(rows: list[BillRow], source: Source) -> tuple[list[BillRow], list[str]]:
    """Rows of single days summed into calendar months (a daily usage export)."""
    days = [r for r in rows if r.kept and r.days == 1]
    if len(days) < 2 or len(days) != sum(1 for r in rows if r.kept):
        return rows, []
    totals: dict[date, _Day] = {}
    for row in days:
        assert row.start is not None and row.use is not None
        totals[row.start] = _Day(row.use, row.cost, row.estimated, 86_400.0, 1)
    grouped = _group_days(totals, None)
    notes = [
        f"{len(days)} rows of single days were summed into {len(grouped)} calendar months "
        "(a daily usage export); the fit works on meter-read periods"
    ]
    last = max(r.number for r in rows)
    merged = [r for r in rows if not r.kept] + [
        replace(g, number=last + i + 1) for i, g in enumerate(grouped)
    ]
    return merged, notes


def _read_rows(lines: Iterable[tuple[int, str]], source: Source, decimal_comma: bool) -> BillsRead:
    raw: list[tuple[int, str, list[str]]] = []
    delimiter = None
    for number, line in lines:
        if not line.strip():
            continue
        delimiter = delimiter or _delimiter(line)
        raw.append((number, line, _split(line, delimiter)))
    if not raw:
        raise InputError("file" if source == "csv" else "text", "there are no rows to read")
    first = [c.strip() for c in raw[0][2]]
    header = not any(_is_date(c) for c in first) and any(re.search(r"[A-Za-z]", c) for c in first)
    warnings: list[str] = []
    unit = None
    if header:
        roles = _header_roles(first)
        body = raw[1:]
        for cell, role in zip(first, roles, strict=True):
            if role == "use":
                unit = next(
                    (
                        _UNIT_WORDS[t]
                        for t in re.findall(r"[a-z]+", cell.lower())
                        if t in _UNIT_WORDS
                    ),
                    None,
                )
        if "use" not in roles or not ({"start", "end"} & set(roles)):
            named = _content_roles([cells for _n, _l, cells in body], decimal_comma)
            warnings.append(
                "the header row does not name the date and use columns (start, end or read "
                "date; use, therms or kWh), so the columns were told from their contents"
            )
            roles = named
    else:
        body = raw
        roles = _content_roles([cells for _n, _l, cells in body], decimal_comma)
    if not body:
        raise InputError(
            "file" if source == "csv" else "text", "there is a header row but no bills below it"
        )
    typical = sorted(len(c) for _n, _l, c in body)[len(body) // 2]  # the median row's cells
    width = max(len(first), typical) if header else typical
    if "use" not in roles:
        message = "no column of use figures was found: give a header row (start, end, use)"
        rows = [BillRow(n, line, "error", message, "use") for n, line, _c in body]
        return BillsRead(source, tuple(rows), tuple(roles), header, unit, None, tuple(warnings))
    if unit == "ccf":
        warnings.append(
            "the use is in CCF (hundreds of cubic feet of gas), not therms: the fit takes the "
            "figures as they are; multiply by the gas's heat content (about 1.04 therm per CCF, "
            "printed on the bill) for therms"
        )
    rows = [_parse_row(n, line, cells, roles, width, decimal_comma) for n, line, cells in body]
    if "start" not in roles and "days" not in roles:
        rows = _days_of_use(rows) if _daily(rows) else _chain(rows)
    rows = [_check_dates(r) for r in rows]
    rows = [
        replace(r, status="error", field="end", message="enter the dates of this period")
        if r.kept and (r.start is None or r.end is None)
        else r
        for r in rows
    ]
    rows = _overlaps(rows)
    rows, notes = _monthly_rows(rows, source)
    warnings.extend(notes)
    return BillsRead(
        source,
        tuple(rows),
        tuple(roles),
        header,
        unit,
        FUEL_OF_UNIT.get(unit or ""),
        tuple(warnings),
    )


def read_bill_text(text: str, *, decimal_comma: bool = False) -> BillsRead:
    """Pasted spreadsheet rows (tab or comma separated, with or without a header row).

    ``decimal_comma`` where the house is metric (:func:`server.services.number_text.read_decimal`).

    Raises
    ------
    InputError
        ``field="text"``: nothing to read, more than :data:`MAX_ROWS` rows or a row longer
        than :data:`MAX_LINE_CHARS`.
    """
    if len(text) > MAX_TEXT_CHARS:
        raise InputError("text", f"the pasted text is longer than {MAX_TEXT_CHARS:,} characters")
    lines = []
    for number, line in enumerate(text.splitlines(), start=1):
        if len(line) > MAX_LINE_CHARS:
            raise InputError(
                "text", f"row {number} is longer than {MAX_LINE_CHARS:,} characters: not a bill row"
            )
        if line.strip():
            lines.append((number, line))
            if len(lines) > MAX_ROWS:
                raise InputError("text", f"more than {MAX_ROWS:,} rows: paste the bills only")
    return _read_rows(lines, "pasted", decimal_comma)


def _csv_lines(stream: BinaryIO) -> Iterator[tuple[int, str]]:
    """Numbered text lines of an uploaded CSV, bounded in size, line length and count."""
    start = stream.tell()
    head = stream.read(4096)
    stream.seek(start)
    if not head:
        raise InputError("file", "the file is empty")
    if head[:2] in (b"PK", b"\x1f\x8b") or b"\x00" in head:
        raise InputError("file", "the file is not a text CSV (a spreadsheet file or an archive?)")
    text = io.TextIOWrapper(stream, encoding="utf-8-sig", errors="replace", newline=None)  # type: ignore[arg-type]
    try:
        read = filled = 0
        number = 0
        while True:
            line = text.readline(MAX_LINE_CHARS + 1)
            if not line:
                return
            number += 1
            read += len(line)
            if read > MAX_CSV_BYTES:
                raise InputError(
                    "file", f"the file is larger than {MAX_CSV_BYTES // 1024 // 1024} MB"
                )
            if not line.endswith("\n") and len(line) > MAX_LINE_CHARS:
                raise InputError(
                    "file",
                    f"line {number:,} is longer than {MAX_LINE_CHARS:,} characters: not a bill row",
                )
            line = line.rstrip("\n")
            if line.strip():
                filled += 1
                if filled > MAX_ROWS:
                    raise InputError(
                        "file",
                        f"the file has more than {MAX_ROWS:,} rows; bills for a few years are a "
                        "few dozen rows (a daily export about a thousand)",
                    )
                yield number, line
    finally:
        text.detach()


def read_bill_csv(data: bytes | BinaryIO, *, decimal_comma: bool = False) -> BillsRead:
    """A CSV upload of bills: the same reader as :func:`read_bill_text`, bounded.

    ``data`` is the file's bytes or a seekable binary file (an upload's spooled file), read
    one bounded line at a time; refused (422, ``field="file"``) past :data:`MAX_ROWS` rows,
    :data:`MAX_CSV_BYTES` or a line longer than :data:`MAX_LINE_CHARS`.
    """
    stream = io.BytesIO(data) if isinstance(data, bytes | bytearray) else data
    return _read_rows(list(_csv_lines(stream)), "csv", decimal_comma)


# --- Green Button --------------------------------------------------------------------------------


@dataclass(slots=True)
class _Day:
    use: float
    cost: float | None
    estimated: bool
    seconds: float
    readings: int


@dataclass(frozen=True, slots=True)
class _Reading:
    start: int  # UTC epoch seconds
    duration: int  # seconds
    value: float  # in our unit
    cost: float | None
    estimated: bool


@dataclass(slots=True)
class _Feed:
    reading_types: dict[str, dict[str, int]] = field(default_factory=dict)  # self href -> fields
    meter_types: dict[str, list[str]] = field(default_factory=dict)  # MeterReading -> related
    blocks: list[tuple[str | None, Any]] = field(default_factory=list)  # (up href, element)
    summaries: list[tuple[int, int, float | None, float | None, int | None, int]] = field(
        default_factory=list
    )  # start, duration, consumption, bill, uom, power
    tz_offset: int = 0


def _text_int(element: Any, path: str) -> int | None:
    found = element.find(path)
    if found is None or found.text is None:
        return None
    try:
        return int(found.text.strip())
    except ValueError:
        raise InputError(
            "file",
            f"the Green Button file has '{found.text.strip()[:40]}' where a whole number belongs",
        ) from None


def _links(entry: Any) -> dict[str, list[str]]:
    out: dict[str, list[str]] = {}
    for link in entry.findall(f"{ATOM}link"):
        out.setdefault(link.get("rel", ""), []).append(str(link.get("href", "")).rstrip("/"))
    return out


def _feed(root: Any) -> _Feed:
    feed = _Feed()
    entries = [root] if root.tag == f"{ATOM}entry" else list(root.iter(f"{ATOM}entry"))
    for entry in entries:
        links = _links(entry)
        self_href = (links.get("self") or [""])[0]
        content = entry.find(f"{ATOM}content")
        if content is None:
            continue
        for item in content:
            tag = str(item.tag)
            if tag == f"{ESPI}ReadingType":
                feed.reading_types[self_href] = {
                    name: code
                    for name in ("uom", "powerOfTenMultiplier", "flowDirection", "commodity")
                    if (code := _text_int(item, f"{ESPI}{name}")) is not None
                }
            elif tag == f"{ESPI}MeterReading":
                feed.meter_types[self_href] = links.get("related", [])
            elif tag == f"{ESPI}IntervalBlock":
                feed.blocks.append(((links.get("up") or [""])[0] or None, item))
            elif tag == f"{ESPI}UsageSummary":
                period = item.find(f"{ESPI}billingPeriod")
                if period is None:
                    continue
                start = _text_int(period, f"{ESPI}start")
                duration = _text_int(period, f"{ESPI}duration")
                if start is None or not duration:
                    continue
                overall = item.find(f"{ESPI}overallConsumptionLastPeriod")
                value: float | None = None
                uom: int | None = None
                power = 0
                if overall is not None:
                    raw = _text_int(overall, f"{ESPI}value")
                    uom = _text_int(overall, f"{ESPI}uom")
                    power = _text_int(overall, f"{ESPI}powerOfTenMultiplier") or 0
                    value = None if raw is None else float(raw)
                bill = _text_int(item, f"{ESPI}billLastPeriod")
                feed.summaries.append(
                    (
                        start,
                        duration,
                        value,
                        None if bill is None else bill / COST_DIVISOR,
                        uom,
                        power,
                    )
                )
            elif tag == f"{ESPI}LocalTimeParameters":
                feed.tz_offset = _text_int(item, f"{ESPI}tzOffset") or 0
    return feed


def _reading_type(feed: _Feed, up: str | None) -> dict[str, int]:
    """The ReadingType of an IntervalBlock: up link -> MeterReading -> related ReadingType."""
    if up and up.endswith("/IntervalBlock"):
        meter = up[: -len("/IntervalBlock")]
        # a MeterReading may list several related links: the one that is a ReadingType
        for href in feed.meter_types.get(meter, []):
            if href in feed.reading_types:
                return feed.reading_types[href]
    if len(feed.reading_types) == 1:
        return next(iter(feed.reading_types.values()))
    raise InputError(
        "file",
        "the Green Button file has several reading types and an interval block that does not "
        "say which it uses",
    )


def _scaled(value: float, power: int, divisor: int) -> float:
    """``value × 10^power / divisor``, dividing where it can (182000 × 10^-3 is exactly 182)."""
    if power >= 0:
        return value * 10**power / divisor
    return value / (10 ** (-power) * divisor)


def _unit_of(reading_type: dict[str, int]) -> tuple[str, int, int]:
    """Our unit, the power of ten and the divisor of a ReadingType's values."""
    uom = reading_type.get("uom")
    if uom in UOM:
        unit, divisor = UOM[uom]
        return unit, reading_type.get("powerOfTenMultiplier", 0), divisor
    words = UOM_WORDS.get(uom or -1, f"unit code {uom}")
    raise InputError(
        "file",
        f"the Green Button readings are in {words}; Warmstead reads energy in Wh or kWh "
        "(electricity) and therms or Btu (gas)",
    )


def _readings(feed: _Feed, unit: str | None) -> tuple[str, list[_Reading], list[str]]:
    by_unit: dict[str, list[_Reading]] = {}
    notes: list[str] = []
    reverse = 0
    count = 0
    for up, block in feed.blocks:
        reading_type = _reading_type(feed, up)
        if reading_type.get("flowDirection") == REVERSE_FLOW:
            reverse += len(block.findall(f"{ESPI}IntervalReading"))
            continue
        ours, power, divisor = _unit_of(reading_type)
        for item in block.findall(f"{ESPI}IntervalReading"):
            count += 1
            if count > MAX_READINGS:
                raise InputError(
                    "file",
                    f"the Green Button file has more than {MAX_READINGS:,} interval readings; "
                    "download three years of hourly data at most",
                )
            period = item.find(f"{ESPI}timePeriod")
            value = _text_int(item, f"{ESPI}value")
            if period is None or value is None:
                continue
            start = _text_int(period, f"{ESPI}start")
            duration = _text_int(period, f"{ESPI}duration")
            if start is None or not duration or duration <= 0:
                continue
            cost = _text_int(item, f"{ESPI}cost")
            qualities = {
                q
                for quality in item.findall(f"{ESPI}ReadingQuality")
                if (q := _text_int(quality, f"{ESPI}quality")) is not None
            }
            by_unit.setdefault(ours, []).append(
                _Reading(
                    start,
                    duration,
                    _scaled(value, power, divisor),
                    None if cost is None else cost / COST_DIVISOR,
                    bool(qualities & ESTIMATED_QUALITY),
                )
            )
    if reverse:
        notes.append(
            f"{reverse:,} readings of energy sent back to the grid (reverse flow) were left out"
        )
    if unit is not None and unit not in by_unit and by_unit:
        raise InputError("unit", f"the file has no readings in {unit}; it has {', '.join(by_unit)}")
    if unit is None and len(by_unit) > 1:
        raise InputError(
            "unit",
            f"the file holds readings in {' and '.join(sorted(by_unit))}: choose which to read",
        )
    chosen = unit or next(iter(by_unit), "")
    return chosen, by_unit.get(chosen, []), notes


def _local_date(epoch: float, offset: int) -> date:
    return datetime.fromtimestamp(epoch + offset, tz=UTC).date()


def _group_days(days: dict[date, _Day], bounds: list[tuple[date, date]] | None) -> list[BillRow]:
    """Daily totals summed into the given periods (start, end exclusive) or calendar months."""
    if bounds is None:
        months = sorted({(d.year, d.month) for d in days})
        bounds = []
        for year, month in months:
            inside = [d for d in days if (d.year, d.month) == (year, month)]
            bounds.append((min(inside), max(inside) + timedelta(days=1)))
    rows = []
    for number, (start, end) in enumerate(sorted(bounds), start=1):
        inside = [d for d in days if start <= d < end]
        span = (end - start).days
        text = f"{start.isoformat()} to {end.isoformat()}"
        if not inside:
            rows.append(
                BillRow(
                    number,
                    text,
                    "error",
                    "no readings fall in this billing period",
                    "row",
                    start,
                    end,
                )
            )
            continue
        use = math.fsum(days[d].use for d in inside)
        costs = [c for d in inside if (c := days[d].cost) is not None]
        seconds = math.fsum(days[d].seconds for d in inside)
        readings = sum(days[d].readings for d in inside)
        row = BillRow(
            number,
            f"{text}: {readings:,} reading{'s' if readings != 1 else ''}",
            "ok",
            start=start,
            end=end,
            use=use,
            cost=math.fsum(costs) if costs else None,
            estimated=any(days[d].estimated for d in inside),
        )
        missing_days = span - len(inside)
        missing_hours = (span * 86_400 - seconds) / 3600
        if missing_days > 0 or missing_hours >= 1:
            row = replace(
                row,
                status="warning",
                message=f"{missing_hours:,.0f} hours of the {span} days have no readings: the "
                "use is what was read, so this period's use is low",
            )
        rows.append(row)
    return rows


def read_green_button(data: bytes | BinaryIO, *, unit: str | None = None) -> BillsRead:
    """A Green Button (NAESB REQ.21 ESPI) XML file: its readings as meter-read periods.

    Parameters
    ----------
    data : bytes or binary file
        The file's content (at most :data:`MAX_XML_BYTES`).
    unit : {"kWh", "therm"}, optional
        Which readings to take when the file holds both electricity and gas.

    Raises
    ------
    InputError
        ``field="file"`` for a file too large, malformed, with a DTD or entities, without
        readings, or in a unit that is not energy; ``field="unit"`` when it holds two kinds
        of readings and ``unit`` does not choose.
    """
    if unit not in (None, "kWh", "therm"):
        raise InputError("unit", "must be kWh or therm")
    if isinstance(data, bytes | bytearray):
        content = bytes(data)
    else:
        content = data.read(MAX_XML_BYTES + 1)
    if len(content) > MAX_XML_BYTES:
        raise InputError(
            "file",
            f"the file is larger than {MAX_XML_BYTES // 1024 // 1024} MB; download a shorter span",
        )
    if not content.strip():
        raise InputError("file", "the file is empty")
    try:
        root = SafeTree.fromstring(content, forbid_dtd=True)
    except DefusedXmlException:
        raise InputError(
            "file",
            "the file declares a DTD or entities, which Green Button files never need; it was "
            "not read",
        ) from None
    except SafeTree.ParseError as exc:
        raise InputError(
            "file", f"this is not a Green Button file: the XML is malformed ({exc})"
        ) from None
    feed = _feed(root)
    if not feed.blocks and not feed.summaries:
        raise InputError(
            "file",
            "this is not a Green Button usage file: it has no IntervalBlock readings and no "
            "UsageSummary billing periods",
        )
    chosen, readings, notes = _readings(feed, unit)
    offset = feed.tz_offset
    bounds = None
    if feed.summaries:
        bounds = sorted(
            {
                (_local_date(s + 43_200, offset), _local_date(s + d + 43_200, offset))
                for s, d, *_rest in feed.summaries
            }
        )
    if not readings:
        return _summaries_only(feed, chosen, unit, notes)
    long = [r for r in readings if r.duration >= BILLING_READING_S]
    if long and len(long) == len(readings):
        rows = [
            BillRow(
                i,
                f"reading of {r.duration / 86_400:.0f} days from {_local_date(r.start, offset)}",
                "ok",
                start=_local_date(r.start + 43_200, offset),  # the nearest local midnight
                end=_local_date(r.start + r.duration + 43_200, offset),
                use=r.value,
                cost=r.cost,
                estimated=r.estimated,
            )
            for i, r in enumerate(sorted(readings, key=lambda r: r.start), start=1)
        ]
        rows = _overlaps([_check_dates(r) for r in rows])
    else:
        if long:
            raise InputError(
                "file",
                "the Green Button file mixes billing-period readings with hourly or daily "
                "ones; download one kind",
            )
        days: dict[date, _Day] = {}
        for r in readings:
            day = _local_date(r.start + r.duration / 2, offset)
            total = days.get(day)
            if total is None:
                days[day] = _Day(r.value, r.cost, r.estimated, float(r.duration), 1)
            else:
                total.use += r.value
                total.cost = total.cost if r.cost is None else (total.cost or 0.0) + r.cost
                total.estimated = total.estimated or r.estimated
                total.seconds += r.duration
                total.readings += 1
        rows = _group_days(days, bounds)
        inside = sum(1 for d in days if bounds is None or any(s <= d < e for s, e in bounds))
        if inside < len(days):
            notes.append(
                f"{len(days) - inside:,} days of readings fall outside the file's billing "
                "periods and were left out"
            )
        notes.append(
            f"{len(readings):,} interval readings summed into "
            + ("the file's billing periods" if bounds else "calendar months")
            + " by local date (the file's time-zone offset; daylight time not applied)"
        )
    return BillsRead(
        "green_button",
        tuple(rows),
        ("start", "end", "use", "cost", "estimated"),
        False,
        chosen,
        FUEL_OF_UNIT.get(chosen),
        tuple(notes),
    )


def _summaries_only(feed: _Feed, chosen: str, unit: str | None, notes: list[str]) -> BillsRead:
    """A file with billing summaries but no interval readings: the summaries are the bills."""
    rows = []
    units_seen = set()
    for number, (start, duration, value, bill, uom, power) in enumerate(
        sorted(feed.summaries), start=1
    ):
        first = _local_date(start + 43_200, feed.tz_offset)
        last = _local_date(start + duration + 43_200, feed.tz_offset)
        text = f"billing period {first.isoformat()} to {last.isoformat()}"
        if value is None or uom not in UOM:
            rows.append(
                BillRow(
                    number,
                    text,
                    "error",
                    "the billing summary gives no energy use",
                    "use",
                    first,
                    last,
                )
            )
            continue
        ours, divisor = UOM[uom]
        units_seen.add(ours)
        rows.append(
            BillRow(
                number,
                text,
                "ok",
                start=first,
                end=last,
                use=_scaled(value, power, divisor),
                cost=bill,
            )
        )
    if unit is not None and units_seen and unit not in units_seen:
        raise InputError("unit", f"the file has no readings in {unit}")
    chosen = chosen or next(iter(units_seen), "")
    rows = _overlaps([_check_dates(r) for r in rows])
    notes.append(
        "the file has billing summaries but no interval readings: each summary is a period"
    )
    return BillsRead(
        "green_button",
        tuple(rows),
        ("start", "end", "use", "cost"),
        False,
        chosen or None,
        FUEL_OF_UNIT.get(chosen),
        tuple(notes),
    )
