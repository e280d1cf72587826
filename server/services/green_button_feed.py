"""A Green Button file's XML read into its readings (the ESPI data model, NAESB REQ.21 [1]).

An Atom feed whose entries hold ``ReadingType`` (``uom``, ``powerOfTenMultiplier``,
``flowDirection``), ``IntervalBlock`` / ``IntervalReading`` (``timePeriod`` start in UTC epoch
seconds and duration in seconds, ``value``, optional ``cost`` and ``ReadingQuality``),
``UsageSummary`` (``billingPeriod``) and ``LocalTimeParameters`` (``tzOffset``). The value is
``value × 10^powerOfTenMultiplier`` in ``uom``: Wh (72) → kWh ÷ 1000, therm (169) as is, Btu
(132) → therm ÷ 100 000; ``cost`` is in hundred-thousandths of the currency [1]. Quality codes
8, 9 (estimated) and 12 (projected) mark an estimated read [1]. Bounded in readings
(:data:`MAX_READINGS`); how they become bill periods: :mod:`server.services.green_button`.

References
----------
[1] NAESB REQ.21, Energy Services Provider Interface (ESPI), the Green Button data model:
    the ReadingType uom codes of its UnitSymbolKind enumeration (72 Wh, 132 Btu, 169 therm,
    119 ft³), IntervalReading cost in 1/100 000 of the currency, the QualityOfReading codes
    (8 and 9 estimated, 12 projected), flowDirection 19 reverse (from memory of the schema's
    enumerations, to be checked against the standard's text).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

from server.errors import InputError

#: Most interval readings in a file: three years of hourly readings (26,304) or one year of
#: 15-minute ones (35,136) with room to spare.
MAX_READINGS = 120_000

ATOM = "{http://www.w3.org/2005/Atom}"
ESPI = "{http://naesb.org/espi}"
#: ESPI UnitSymbolKind [1]: code -> (our unit, how many of the file's units make one of ours)
UOM = {72: ("kWh", 1000), 169: ("therm", 1), 132: ("therm", 100_000)}  # (unit, divisor)
UOM_WORDS = {119: "cubic feet", 42: "cubic metres", 128: "US gallons", 38: "W", 61: "VA"}
#: ESPI QualityOfReading codes that mean the figure was not read [1]
ESTIMATED_QUALITY = frozenset({8, 9, 12})
REVERSE_FLOW = 19
COST_DIVISOR = 100_000  # ESPI cost: hundred-thousandths of the currency [1]


@dataclass(frozen=True, slots=True)
class Reading:
    start: int  # UTC epoch seconds
    duration: int  # seconds
    value: float  # in our unit
    cost: float | None
    estimated: bool


@dataclass(slots=True)
class Feed:
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


def read_feed(root: Any) -> Feed:
    feed = Feed()
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


def _reading_type(feed: Feed, up: str | None) -> dict[str, int]:
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


def scaled(value: float, power: int, divisor: int) -> float:
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


def readings_of(feed: Feed, unit: str | None) -> tuple[str, list[Reading], list[str]]:
    by_unit: dict[str, list[Reading]] = {}
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
                Reading(
                    start,
                    duration,
                    scaled(value, power, divisor),
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
