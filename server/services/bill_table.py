"""Bills as spreadsheet rows: pasted text (:func:`read_bill_text`), and the rows of a CSV.

How cells split and columns are named: :mod:`server.services.bill_cells`; dates:
:mod:`server.services.bill_dates`; a CSV upload's bounded lines: :mod:`server.services.bill_csv`.

* A header row is optional (without one the columns are told from their contents).
* With a single date column the dates are the meter reads: each row's period runs from the
  read before it (the first row needs a ``days`` column, or only starts the series). With a
  ``days`` column and both dates, a count one more than the dates' difference means the end
  date is the last day of service (inclusive): the period then ends the day after.
* Rows of single days (a portal's daily usage export) are summed into calendar months.
"""

from __future__ import annotations

import re
from collections.abc import Iterable
from dataclasses import replace
from datetime import date, timedelta
from typing import Any

from server.errors import InputError
from server.services.bill_cells import (
    UNIT_WORDS,
    content_roles,
    delimiter_of,
    header_roles,
    read_cost,
    read_flag,
    read_use,
    split_cells,
)
from server.services.bill_dates import DateTextError, is_date, read_date
from server.services.bill_rows import (
    FUEL_OF_UNIT,
    MAX_PERIOD_DAYS,
    BillRow,
    BillsRead,
    DayTotal,
    Source,
    check_dates,
    group_days,
    mark_overlaps,
)
from server.services.number_text import NumberTextError, read_decimal

#: Most non-blank rows read from a paste or a CSV [rows]: years of monthly bills are a few
#: dozen; a portal's daily export for three years is about 1,100 (common practice).
MAX_ROWS = 3000
#: Longest row [characters]; a bill row is well under a hundred.
MAX_LINE_CHARS = 1000
#: Largest paste [characters].
MAX_TEXT_CHARS = MAX_ROWS * 200


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
            parsed["use"], parsed["estimated"] = read_use(values["use"], decimal_comma)
        except NumberTextError as exc:
            problems.append(("use", f"use: {exc}"))
    for role, reader in (
        ("cost", lambda t: read_cost(t, decimal_comma)),
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
            parsed["estimated"] = parsed.get("estimated", False) or read_flag(values["estimated"])
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


def _monthly_rows(rows: list[BillRow], source: Source) -> tuple[list[BillRow], list[str]]:
    """Rows of single days summed into calendar months (a daily usage export)."""
    days = [r for r in rows if r.kept and r.days == 1]
    if len(days) < 2 or len(days) != sum(1 for r in rows if r.kept):
        return rows, []
    totals: dict[date, DayTotal] = {}
    for row in days:
        assert row.start is not None and row.use is not None
        totals[row.start] = DayTotal(row.use, row.cost, row.estimated, 86_400.0, 1)
    grouped = group_days(totals, None)
    notes = [
        f"{len(days)} rows of single days were summed into {len(grouped)} calendar months "
        "(a daily usage export); the fit works on meter-read periods"
    ]
    last = max(r.number for r in rows)
    merged = [r for r in rows if not r.kept] + [
        replace(g, number=last + i + 1) for i, g in enumerate(grouped)
    ]
    return merged, notes


def read_bill_lines(
    lines: Iterable[tuple[int, str]], source: Source, decimal_comma: bool
) -> BillsRead:
    raw: list[tuple[int, str, list[str]]] = []
    delimiter = None
    for number, line in lines:
        if not line.strip():
            continue
        delimiter = delimiter or delimiter_of(line)
        raw.append((number, line, split_cells(line, delimiter)))
    if not raw:
        raise InputError("file" if source == "csv" else "text", "there are no rows to read")
    first = [c.strip() for c in raw[0][2]]
    header = not any(is_date(c) for c in first) and any(re.search(r"[A-Za-z]", c) for c in first)
    warnings: list[str] = []
    unit = None
    if header:
        roles = header_roles(first)
        body = raw[1:]
        for cell, role in zip(first, roles, strict=True):
            if role == "use":
                unit = next(
                    (UNIT_WORDS[t] for t in re.findall(r"[a-z]+", cell.lower()) if t in UNIT_WORDS),
                    None,
                )
        if "use" not in roles or not ({"start", "end"} & set(roles)):
            named = content_roles([cells for _n, _l, cells in body], decimal_comma)
            warnings.append(
                "the header row does not name the date and use columns (start, end or read "
                "date; use, therms or kWh), so the columns were told from their contents"
            )
            roles = named
    else:
        body = raw
        roles = content_roles([cells for _n, _l, cells in body], decimal_comma)
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
    rows = [check_dates(r) for r in rows]
    rows = [
        replace(r, status="error", field="end", message="enter the dates of this period")
        if r.kept and (r.start is None or r.end is None)
        else r
        for r in rows
    ]
    rows = mark_overlaps(rows)
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
    return read_bill_lines(lines, "pasted", decimal_comma)
