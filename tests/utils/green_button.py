"""Green Button (NAESB REQ.21 ESPI) files of our own, for an invented house.

The feed is built as the format lays it out: an Atom ``feed`` whose entries carry a
``UsagePoint``, ``LocalTimeParameters`` (``tzOffset`` in seconds), a ``MeterReading`` linked
to its ``ReadingType`` (``uom``, ``powerOfTenMultiplier``, ``flowDirection``), and
``IntervalBlock`` entries ("up" link: the MeterReading's IntervalBlock collection) holding
``IntervalReading`` elements (``timePeriod`` start in UTC epoch seconds and duration, ``value``,
optional ``cost`` in hundred-thousandths of the currency and ``ReadingQuality``), plus optional
``UsageSummary`` billing periods. Nothing here comes from a real utility or customer.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, field
from datetime import UTC, datetime, timedelta
from xml.sax.saxutils import escape

BASE = "https://example.invalid/espi/1_1/resource/RetailCustomer/7/UsagePoint"


@dataclass
class Reading:
    start: datetime  # aware
    seconds: int
    value: int
    cost: int | None = None  # hundred-thousandths of a dollar
    quality: int | None = None


@dataclass
class Meter:
    """One usage point's meter: its reading type and its readings."""

    point: str
    uom: int
    power: int = 0
    flow: int = 1
    kind: int = 0  # ServiceCategory: 0 electricity, 1 gas
    readings: list[Reading] = field(default_factory=list)


def epoch(moment: datetime) -> int:
    return int(moment.astimezone(UTC).timestamp())


def _entry(self_href: str, up: str, related: Sequence[str], content: str) -> str:
    links = [
        f'<link rel="self" href="{escape(self_href)}"/>',
        f'<link rel="up" href="{escape(up)}"/>',
    ]
    links += [f'<link rel="related" href="{escape(r)}"/>' for r in related]
    return (
        "<entry><id>urn:uuid:0</id>"
        + "".join(links)
        + f"<title>invented</title><content>{content}</content></entry>"
    )


def feed(
    meters: Sequence[Meter],
    *,
    tz_offset: int = -5 * 3600,
    summaries: Sequence[tuple[datetime, datetime]] = (),
    block_days: int = 31,
) -> bytes:
    """The XML of a feed of ``meters`` (local time offset ``tz_offset`` seconds)."""
    espi = 'xmlns="http://naesb.org/espi"'
    parts = [
        '<?xml version="1.0" encoding="UTF-8"?>',
        '<feed xmlns="http://www.w3.org/2005/Atom"><id>urn:uuid:1</id><title>invented house</title>',
        _entry(
            "https://example.invalid/espi/1_1/resource/LocalTimeParameters/1",
            "https://example.invalid/espi/1_1/resource/LocalTimeParameters",
            [],
            f"<LocalTimeParameters {espi}><dstOffset>3600</dstOffset>"
            f"<tzOffset>{tz_offset}</tzOffset></LocalTimeParameters>",
        ),
    ]
    for meter in meters:
        point = f"{BASE}/{meter.point}"
        reading_type = f"https://example.invalid/espi/1_1/resource/ReadingType/{meter.point}"
        meter_reading = f"{point}/MeterReading/1"
        parts.append(
            _entry(
                point,
                BASE,
                [f"{point}/MeterReading"],
                f"<UsagePoint {espi}><ServiceCategory><kind>{meter.kind}</kind>"
                "</ServiceCategory></UsagePoint>",
            )
        )
        parts.append(
            _entry(
                meter_reading,
                f"{point}/MeterReading",
                [reading_type, f"{meter_reading}/IntervalBlock"],
                f"<MeterReading {espi}/>",
            )
        )
        parts.append(
            _entry(
                reading_type,
                "https://example.invalid/espi/1_1/resource/ReadingType",
                [],
                f"<ReadingType {espi}><accumulationBehaviour>4</accumulationBehaviour>"
                f"<commodity>{1 if meter.kind == 0 else 7}</commodity>"
                f"<flowDirection>{meter.flow}</flowDirection><kind>12</kind>"
                f"<powerOfTenMultiplier>{meter.power}</powerOfTenMultiplier>"
                f"<uom>{meter.uom}</uom></ReadingType>",
            )
        )
        readings = sorted(meter.readings, key=lambda r: r.start)
        blocks: list[list[Reading]] = []
        for reading in readings:
            if not blocks or reading.start - blocks[-1][0].start >= timedelta(days=block_days):
                blocks.append([])
            blocks[-1].append(reading)
        for number, block in enumerate(blocks, start=1):
            first, last = block[0], block[-1]
            span = epoch(last.start) + last.seconds - epoch(first.start)
            items = []
            for r in block:
                cost = "" if r.cost is None else f"<cost>{r.cost}</cost>"
                quality = (
                    ""
                    if r.quality is None
                    else f"<ReadingQuality><quality>{r.quality}</quality></ReadingQuality>"
                )
                items.append(
                    f"<IntervalReading>{cost}{quality}<timePeriod><duration>{r.seconds}</duration>"
                    f"<start>{epoch(r.start)}</start></timePeriod><value>{r.value}</value>"
                    "</IntervalReading>"
                )
            parts.append(
                _entry(
                    f"{meter_reading}/IntervalBlock/{number}",
                    f"{meter_reading}/IntervalBlock",
                    [],
                    f"<IntervalBlock {espi}><interval><duration>{span}</duration>"
                    f"<start>{epoch(first.start)}</start></interval>{''.join(items)}</IntervalBlock>",
                )
            )
        for number, (start, end) in enumerate(summaries, start=1):
            parts.append(
                _entry(
                    f"{point}/UsageSummary/{number}",
                    f"{point}/UsageSummary",
                    [],
                    f"<UsageSummary {espi}><billingPeriod><duration>{epoch(end) - epoch(start)}"
                    f"</duration><start>{epoch(start)}</start></billingPeriod></UsageSummary>",
                )
            )
    parts.append("</feed>")
    return "".join(parts).encode()


def local(year: int, month: int, day: int, hour: int = 0, offset_h: int = -5) -> datetime:
    """A local clock time at a fixed UTC offset (standard time)."""
    from datetime import timezone

    return datetime(year, month, day, hour, tzinfo=timezone(timedelta(hours=offset_h)))


def hourly(start: datetime, hours: int, value_of) -> list[Reading]:  # type: ignore[no-untyped-def]
    """Hourly readings from ``start``; ``value_of(moment)`` gives each hour's value."""
    return [
        Reading(start + timedelta(hours=h), 3600, int(value_of(start + timedelta(hours=h))))
        for h in range(hours)
    ]
