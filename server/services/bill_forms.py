"""The Bills form of the House page: its rows as typed text <-> the bills document's periods.

A form row is the text of one meter-read period as the page shows it (start, end, use,
optional cost, the estimated flag, typed degree-days, where the row came from). Rows come
from the table as typed, from the stored bills, and from the readers of
:mod:`server.services.bill_table`, :mod:`server.services.bill_csv` and
:mod:`server.services.green_button` (a paste, a CSV, a Green Button file): every one lands in
the same table, so the page edits them all alike.

Rule decided here (issue 15, "nothing typed is lost"): a submission with any wrong row is
**not saved at all**; the page shows every row again as typed, each wrong one with its
message beside the cell, and the pasted or uploaded lines that could not be read back in the
paste box with theirs. Saving only the good rows would store bills the auditor has not seen
complete and fit them without the missing months, which changes the base temperature and the
normalised use without a word.

Dates are read by :func:`server.services.bill_dates.read_date` (US ``1/6/2025``, ISO
``2025-01-06`` and the other usual forms); numbers by :mod:`server.services.number_text`
(a decimal comma only in a metric house).
"""

from __future__ import annotations

import re
from collections.abc import Iterable, Mapping
from dataclasses import dataclass, field
from datetime import date
from typing import Any

from server.services.bill_dates import DateTextError, read_date
from server.services.bill_rows import BillRow, BillsRead
from server.services.number_text import NumberTextError, read_decimal

#: most rows the table takes in one submission (three years of monthly bills are 36; a
#: portal's daily export is summed into months by the readers first)
MAX_FORM_ROWS = 400
#: the names of a row's fields in the form: ``p<index>.<name>``
ROW_FIELD = re.compile(r"^p(\d{1,3})\.(start|end|use|cost|estimated|hdd|source|delete)$")
SOURCES = frozenset({"typed", "pasted", "csv", "green_button"})


@dataclass(slots=True)
class FormRow:
    """One period's text in the table, with its messages (field -> message)."""

    start: str = ""
    end: str = ""
    use: str = ""
    cost: str = ""
    estimated: bool = False
    hdd: str = ""
    source: str = "typed"
    errors: dict[str, str] = field(default_factory=dict)

    @property
    def blank(self) -> bool:
        return not any(v.strip() for v in (self.start, self.end, self.use, self.cost, self.hdd))

    @property
    def message(self) -> str:
        """All of the row's messages in one line (for the row's own message cell)."""
        return "; ".join(f"{name}: {text}" if name != "row" else text
                         for name, text in self.errors.items())  # fmt: skip


def _number_text(value: float | None) -> str:
    if value is None:
        return ""
    return f"{value:.6f}".rstrip("0").rstrip(".")


def rows_from_form(form: Mapping[str, Any]) -> list[FormRow]:
    """The table's rows as posted, in index order; blank and deleted rows left out."""
    by_index: dict[int, dict[str, str]] = {}
    for name, value in form.items():
        match = ROW_FIELD.match(str(name))
        if match is None:
            continue
        by_index.setdefault(int(match[1]), {})[match[2]] = str(value)
    rows = []
    for index in sorted(by_index):
        cells = by_index[index]
        if cells.get("delete"):
            continue
        source = cells.get("source", "typed")
        row = FormRow(
            start=cells.get("start", "").strip(),
            end=cells.get("end", "").strip(),
            use=cells.get("use", "").strip(),
            cost=cells.get("cost", "").strip(),
            estimated=bool(cells.get("estimated")),
            hdd=cells.get("hdd", "").strip(),
            source=source if source in SOURCES else "typed",
        )
        if not row.blank:
            rows.append(row)
    return rows[: MAX_FORM_ROWS + 1]


def rows_from_stored(bills: Mapping[str, Any] | None) -> list[FormRow]:
    """The stored bills' periods as table rows (ISO dates, numbers as stored)."""
    out = []
    for period in (bills or {}).get("periods", []):
        out.append(
            FormRow(
                start=str(period.get("start", "")),
                end=str(period.get("end", "")),
                use=_number_text(period.get("use")),
                cost=_number_text(period.get("cost")),
                estimated=bool(period.get("estimated")),
                hdd=_number_text(period.get("hdd")),
                source=str(period.get("source") or "typed"),
            )
        )
    return out


def _row_of_reader(row: BillRow, source: str) -> FormRow:
    out = FormRow(
        start=row.start.isoformat() if row.start else "",
        end=row.end.isoformat() if row.end else "",
        use=_number_text(row.use),
        cost=_number_text(row.cost),
        estimated=row.estimated,
        hdd=_number_text(row.hdd),
        source=source,
    )
    if not row.kept:
        out.errors[row.field or "row"] = row.message
    return out


def rows_from_read(read: BillsRead) -> tuple[list[FormRow], list[BillRow]]:
    """A reader's rows for the table, and the rows it could not read.

    Pasted and CSV rows that could not be read go back to the paste box as their text (with
    their messages); a Green Button file's go into the table with what was read of them.
    """
    source = read.source
    kept = [_row_of_reader(r, source) for r in sorted(read.kept, key=_row_order)]
    if source == "green_button":
        return kept + [_row_of_reader(r, source) for r in read.errors], []
    return kept, list(read.errors)


def _row_order(row: BillRow) -> tuple[date, int]:
    return (row.start or date.min, row.number)


def leftover_text(header: str | None, rows: Iterable[BillRow]) -> str:
    """The lines a reader could not use, under the header line they were read with."""
    lines = [row.text for row in rows]
    if not lines:
        return ""
    return "\n".join(([header] if header else []) + lines)


def header_line(text: str) -> str:
    """The first non-blank line of a paste or a CSV (its header row, when it has one)."""
    for line in text.splitlines():
        if line.strip():
            return line
    return ""


def read_row(row: FormRow, *, decimal_comma: bool, degree_days: bool) -> dict[str, Any] | None:
    """The row as a bills-document period, or None with its messages put on ``row.errors``."""
    period: dict[str, Any] = {"estimated": row.estimated, "source": row.source}
    for name in ("start", "end"):
        text = getattr(row, name)
        if not text:
            row.errors[name] = "enter the meter-read date, like 1/6/2025 or 2025-01-06"
            continue
        try:
            period[name] = read_date(text).isoformat()
        except DateTextError as exc:
            row.errors[name] = str(exc)
    numbers = (("use", True), ("cost", False), ("hdd", degree_days))
    for name, required in numbers:
        text = getattr(row, name)
        if not text:
            if required:
                row.errors[name] = (
                    "type this period's heating degree-days (the weather below is typed "
                    "degree-days)"
                    if name == "hdd"
                    else "enter the use the bill shows for this period"
                )
            continue
        if name == "hdd" and not degree_days:
            continue  # typed degree-days are used only when the weather is typed degree-days
        try:
            period[name] = read_decimal(text, decimal_comma=decimal_comma, low=0.0)
        except NumberTextError as exc:
            row.errors[name] = str(exc)
    if "start" in period and "end" in period and period["end"] <= period["start"]:
        row.errors["end"] = "must be after the start: a period runs from one meter read to the next"
    return None if row.errors else period


def read_rows(
    rows: list[FormRow], *, decimal_comma: bool, degree_days: bool
) -> tuple[list[dict[str, Any]], bool]:
    """Every row read (messages on the wrong ones); the periods and whether all were good."""
    periods = []
    for row in rows:
        period = read_row(row, decimal_comma=decimal_comma, degree_days=degree_days)
        if period is not None:
            periods.append(period)
    overlapping = _mark_overlaps(rows, periods) if len(periods) == len(rows) else False
    return periods, len(periods) == len(rows) and not overlapping


def _mark_overlaps(rows: list[FormRow], periods: list[dict[str, Any]]) -> bool:
    """Mark each row that overlaps an earlier one (each day belongs to one period)."""
    order = sorted(range(len(periods)), key=lambda k: periods[k]["start"])
    found = False
    for before, after in zip(order, order[1:], strict=False):
        if periods[after]["start"] < periods[before]["end"]:
            rows[after].errors["start"] = (
                f"overlaps row {before + 1} ({periods[before]['start']} to "
                f"{periods[before]['end']}); each day belongs to one period"
            )
            found = True
    return found
