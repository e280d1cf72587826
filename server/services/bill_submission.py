"""One submission of the House page's Bills form: table rows, a paste, a CSV, a Green Button
file and the weather of the bills' dates, read together and saved as the house's ``bills``.

Everything the form carried comes back in :class:`Submission` whether it was saved or not:
the rows (those read from a paste or a file land in the table), each wrong one with its
message; the lines of a paste or a CSV that could not be read, back in the paste box with
theirs; the weather kept as the daily temperatures already read (a hidden field), so a
rejected form never asks for the weather file again. Nothing is saved while any row is wrong
(:mod:`server.services.bill_forms` says why). A good submission goes through
:func:`server.services.house_bills.save_bills` (the version check, the same fit as
``calc/bills``); its refusals are put back on the row or the part they name.
"""

from __future__ import annotations

import json
import re
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from datetime import date, timedelta
from typing import Any, BinaryIO

from pydantic import ValidationError
from sqlalchemy.orm import Session

from server.documents.bills import BillsResult, DailyTemperaturesIn
from server.errors import Conflict, InputError
from server.models import House
from server.physics.units import UnitSystem
from server.services.bill_csv import read_bill_csv
from server.services.bill_forms import (
    MAX_FORM_ROWS,
    FormRow,
    header_line,
    leftover_text,
    read_rows,
    rows_from_form,
    rows_from_read,
)
from server.services.bill_rows import BillRow, BillsRead
from server.services.bill_table import read_bill_text
from server.services.bill_weather import degree_days_weather, weather_from_files
from server.services.bills import ELECTRIC_FUELS
from server.services.green_button import read_green_button
from server.services.house_bills import DEFAULT_FUEL, save_bills

Upload = tuple[str, BinaryIO]
_PERIOD_FIELD = re.compile(r"^bills\.periods\[(\d+)\](?:\.(\w+))?$")


@dataclass(slots=True)
class Submission:
    """What the form carried, read; ``fit`` when saved, else the messages (``errors``)."""

    rows: list[FormRow]
    errors: dict[str, str] = field(default_factory=dict)
    paste: str = ""
    paste_rows: list[BillRow] = field(default_factory=list)
    weather_mode: str = "file"
    degree_day_base: str = ""
    weather_kept: str = ""
    notes: list[str] = field(default_factory=list)
    fit: BillsResult | None = None
    conflict: bool = False

    @property
    def saved(self) -> bool:
        return self.fit is not None

    @property
    def rejected(self) -> bool:
        return bool(self.errors or self.paste_rows or any(r.errors for r in self.rows))


def _fuel(house: House) -> str:
    return str((house.heating or {}).get("fuel") or DEFAULT_FUEL)


def _fuel_mismatch(read: BillsRead, fuel: str) -> str:
    """A message when the source says its use is another fuel's than the house's heating."""
    if read.fuel is None:
        return ""
    same = read.fuel == fuel or (read.fuel == "electricity" and fuel in ELECTRIC_FUELS)
    if same:
        return ""
    return (
        f"these bills are in {read.unit} ({read.fuel.replace('_', ' ')}); the house heats with "
        f"{fuel.replace('_', ' ')}, and its bills must be for that fuel"
    )


def _take(sub: Submission, read: BillsRead, key: str, fuel: str, header: str) -> None:
    """Put a reader's rows in the table and its unread lines in the paste box."""
    mismatch = _fuel_mismatch(read, fuel)
    if mismatch:
        sub.errors[key] = mismatch
        return
    rows, unread = rows_from_read(read)
    sub.rows.extend(rows)
    sub.notes.extend(read.warnings)
    if unread:
        text = leftover_text(header if read.header else None, unread)
        sub.paste = f"{sub.paste}\n{text}" if sub.paste else text
        sub.paste_rows.extend(unread)


def _daily_from_kept(text: str) -> dict[str, Any] | None:
    if not text.strip():
        return None
    try:
        doc = DailyTemperaturesIn.model_validate(json.loads(text))
    except (ValueError, ValidationError):
        return None
    return doc.model_dump(mode="json", exclude_none=True)


def _uncovered(daily: Mapping[str, Any], period: Mapping[str, Any]) -> str:
    """A message when the daily temperatures miss days of the period, else ''."""
    first = date.fromisoformat(str(daily["start"]))
    values = daily["values"]
    start, end = date.fromisoformat(period["start"]), date.fromisoformat(period["end"])
    missing = []
    for k in range((end - start).days):
        at = (start + timedelta(days=k) - first).days
        if not 0 <= at < len(values) or values[at] is None:
            missing.append(start + timedelta(days=k))
    if not missing:
        return ""
    return (
        f"the weather has no temperature for {len(missing)} of its {(end - start).days} days "
        f"(the first {missing[0].isoformat()}): add weather covering these dates"
    )


def _weather(
    sub: Submission, house: House, fields: Mapping[str, str], files: Sequence[Upload]
) -> tuple[dict[str, Any] | None, float | None]:
    """The daily temperatures (house units) or the degree-day base, from the form."""
    units: UnitSystem = "si" if house.units == "si" else "ip"
    if sub.weather_mode == "degree_days":
        try:
            return None, degree_days_weather(sub.degree_day_base, units=units).degree_day_base
        except InputError as exc:
            sub.errors["degree_day_base"] = exc.message
            return None, None
    if files:
        try:
            weather = weather_from_files(files, units=units)
        except InputError as exc:
            sub.errors["weather"] = exc.message
            return None, None
        sub.notes.extend(weather.warnings)
        daily = weather.daily_temperatures(units)
        sub.weather_kept = json.dumps(daily, separators=(",", ":"))
        return daily, None
    kept = _daily_from_kept(sub.weather_kept)
    if kept is not None:
        return kept, None
    stored = (house.bills or {}).get("daily_temperatures")
    if isinstance(stored, dict) and stored.get("values"):
        return dict(stored), None
    sub.errors["weather"] = (
        "upload the weather of the bills' dates (a daily or hourly CSV, or an EPW of the "
        "actual year), or choose typed degree-days"
    )
    return None, None


def _put_back(sub: Submission, exc: InputError) -> None:
    """A refusal of :func:`save_bills` on the row or the part of the form it names."""
    match = _PERIOD_FIELD.match(exc.field)
    if match and int(match[1]) < len(sub.rows):
        sub.rows[int(match[1])].errors[match[2] or "row"] = exc.message
    elif exc.field.startswith("bills.daily_temperatures"):
        sub.errors["weather"] = exc.message
    elif exc.field == "bills.degree_day_base":
        sub.errors["degree_day_base"] = exc.message
    else:
        sub.errors["form"] = exc.message


def submit_bills(
    *,
    session: Session,
    house: House,
    fields: Mapping[str, str],
    csv_file: Upload | None,
    green_button_file: Upload | None,
    weather_files: Sequence[Upload],
    expected_version: int | None,
) -> Submission:
    """Read the Bills form and save the house's bills when every part of it is right.

    ``fields`` are the form's text fields (rows ``p<i>.start`` …, ``paste``,
    ``weather_mode``, ``degree_day_base``, ``weather_kept``); the files are (name, data).
    Returns the :class:`Submission`: ``fit`` set when saved; ``conflict`` when another save
    of the house came first (nothing stored).
    """
    units: UnitSystem = "si" if house.units == "si" else "ip"
    comma = units == "si"
    fuel = _fuel(house)
    mode = "degree_days" if fields.get("weather_mode") == "degree_days" else "file"
    sub = Submission(
        rows=rows_from_form(fields),
        weather_mode=mode,
        degree_day_base=fields.get("degree_day_base", "").strip(),
        weather_kept=fields.get("weather_kept", ""),
    )
    if len(sub.rows) > MAX_FORM_ROWS:
        sub.rows = sub.rows[:MAX_FORM_ROWS]
        sub.errors["form"] = f"the table takes at most {MAX_FORM_ROWS} periods"
    paste = fields.get("paste", "")
    if paste.strip():
        try:
            _take(
                sub, read_bill_text(paste, decimal_comma=comma), "paste", fuel, header_line(paste)
            )
        except InputError as exc:
            sub.errors["paste"] = exc.message
        if "paste" in sub.errors:
            sub.paste = paste  # kept as typed
    if csv_file is not None:
        name, data = csv_file
        try:
            read = read_bill_csv(data, decimal_comma=comma)
            data.seek(0)
            head = header_line(data.read(4096).decode("utf-8-sig", errors="replace"))
            _take(sub, read, "csv", fuel, head)
        except InputError as exc:
            sub.errors["csv"] = f"{name}: {exc.message}"
    if green_button_file is not None:
        name, data = green_button_file
        unit = "therm" if fuel == "natural_gas" else "kWh" if fuel in ELECTRIC_FUELS else None
        try:
            _take(sub, read_green_button(data, unit=unit), "green_button", fuel, "")
        except InputError as exc:
            sub.errors["green_button"] = f"{name}: {exc.message}"
    daily, base = _weather(sub, house, fields, weather_files)
    periods, all_good = read_rows(sub.rows, decimal_comma=comma, degree_days=mode == "degree_days")
    if not sub.rows and not ({"paste", "csv", "green_button"} & set(sub.errors)):
        sub.errors["form"] = "enter at least one meter-read period (start, end, use)"
    if daily is not None and all_good:
        for row, period in zip(sub.rows, periods, strict=True):
            message = _uncovered(daily, period)
            if message:
                row.errors["row"] = message
    if sub.rejected:
        return sub
    stored = house.bills or {}
    doc: dict[str, Any] = {"fuel": fuel, "periods": periods}
    for kept in ("efficiency", "cooling_term"):  # what the form does not show stays
        if stored.get(kept) is not None:
            doc[kept] = stored[kept]
    if daily is not None:
        doc["daily_temperatures"] = daily
    else:
        doc["degree_day_base"] = base
    try:  # written now: Conflict for a stale form or when another save came first
        sub.fit = save_bills(session=session, house=house, bills=doc,
                             expected_version=expected_version)  # fmt: skip
    except Conflict:
        sub.conflict = True
    except InputError as exc:
        _put_back(sub, exc)
    return sub


def remove_bills(*, session: Session, house: House, expected_version: int | None) -> None:
    """Remove the house's bills (Conflict for a stale form)."""
    save_bills(session=session, house=house, bills=None, expected_version=expected_version)
