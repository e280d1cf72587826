"""Bill rows as the readers give them back, and the checks every reader makes of them.

Every bill reader (pasted rows and CSV: :mod:`server.services.bill_table` and
:mod:`server.services.bill_csv`; Green Button: :mod:`server.services.green_button`) returns a
:class:`BillsRead`: **every** row that came in, each with its parsed values or the message that
says what is wrong with it (a page shows the row as typed with its message beside it), and the
good rows as meter-read periods for the bills document (``start`` inclusive, ``end`` exclusive:
the next read, as ``calc/bills`` takes them). A wrong row never stops the others; only a file
that cannot be read at all (not text, too large, no rows, not Green Button XML) raises
:class:`server.errors.InputError` (HTTP 422).

The checks shared by the readers: a period's dates in order and no longer than
:data:`MAX_PERIOD_DAYS` (:func:`check_dates`), no day in two kept periods
(:func:`mark_overlaps`), and daily totals summed into billing periods or calendar months
(:func:`group_days`).
"""

from __future__ import annotations

import bisect
import math
from dataclasses import dataclass, replace
from datetime import date, timedelta
from typing import Any, Literal

Source = Literal["pasted", "csv", "green_button"]
Status = Literal["ok", "warning", "error"]

#: Longest meter-read period accepted from a row [days] (a year and a month).
MAX_PERIOD_DAYS = 400
#: The bills fuel a unit of use suggests.
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


@dataclass(slots=True)
class DayTotal:
    use: float
    cost: float | None
    estimated: bool
    seconds: float
    readings: int


def group_days(days: dict[date, DayTotal], bounds: list[tuple[date, date]] | None) -> list[BillRow]:
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


def check_dates(row: BillRow) -> BillRow:
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


def mark_overlaps(rows: list[BillRow]) -> list[BillRow]:
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
