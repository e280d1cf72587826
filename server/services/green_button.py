"""Green Button (:func:`read_green_button`): a utility's usage file as meter-read periods.

The open format utilities offer customers for their usage data, NAESB REQ.21 (ESPI); its XML
is read by :mod:`server.services.green_button_feed`. Readings of a month or so are billing
periods already; shorter ones (hourly, daily) are summed by the local date of their middle into
the ``UsageSummary`` billing periods when the file has them, else into calendar months. The XML
is parsed with defusedxml (no DTD, no entities) and bounded in size and readings.
"""

from __future__ import annotations

from datetime import UTC, date, datetime
from typing import BinaryIO

from defusedxml import DefusedXmlException
from defusedxml import ElementTree as SafeTree

from server.errors import InputError
from server.services.bill_rows import (
    FUEL_OF_UNIT,
    BillRow,
    BillsRead,
    DayTotal,
    check_dates,
    group_days,
    mark_overlaps,
)
from server.services.green_button_feed import UOM, Feed, read_feed, readings_of, scaled

#: Largest Green Button file [bytes].
MAX_XML_BYTES = 32 * 1024 * 1024
#: Readings this long or longer are billing periods themselves [s] (20 days).
BILLING_READING_S = 20 * 86_400


def _local_date(epoch: float, offset: int) -> date:
    return datetime.fromtimestamp(epoch + offset, tz=UTC).date()


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
    feed = read_feed(root)
    if not feed.blocks and not feed.summaries:
        raise InputError(
            "file",
            "this is not a Green Button usage file: it has no IntervalBlock readings and no "
            "UsageSummary billing periods",
        )
    chosen, readings, notes = readings_of(feed, unit)
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
        rows = mark_overlaps([check_dates(r) for r in rows])
    else:
        if long:
            raise InputError(
                "file",
                "the Green Button file mixes billing-period readings with hourly or daily "
                "ones; download one kind",
            )
        days: dict[date, DayTotal] = {}
        for r in readings:
            day = _local_date(r.start + r.duration / 2, offset)
            total = days.get(day)
            if total is None:
                days[day] = DayTotal(r.value, r.cost, r.estimated, float(r.duration), 1)
            else:
                total.use += r.value
                total.cost = total.cost if r.cost is None else (total.cost or 0.0) + r.cost
                total.estimated = total.estimated or r.estimated
                total.seconds += r.duration
                total.readings += 1
        rows = group_days(days, bounds)
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


def _summaries_only(feed: Feed, chosen: str, unit: str | None, notes: list[str]) -> BillsRead:
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
                use=scaled(value, power, divisor),
                cost=bill,
            )
        )
    if unit is not None and units_seen and unit not in units_seen:
        raise InputError("unit", f"the file has no readings in {unit}")
    chosen = chosen or next(iter(units_seen), "")
    rows = mark_overlaps([check_dates(r) for r in rows])
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
