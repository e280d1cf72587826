"""The cells of pasted or CSV bill rows: how they split, which column is which, and their values.

* Cells are tab separated (as a spreadsheet copies them) when the first row has a tab, else
  comma separated (``;`` when the first row has more of those), split by the CSV quoting
  rules: in comma-separated text a number with a grouping comma is one cell only when it is
  quoted (``"1,234"``); an unquoted one splits the row, which then has more cells than the
  others and says so.
* A header row's names say which column is which (``start``/``from``/``previous read``;
  ``end``/``to``/``read date``; ``days``; ``use``/``usage``/``therms``/``kWh``;
  ``cost``/``amount``/``charges``; ``estimated``/``read type``; ``hdd``/``degree days``).
  Without one, the columns are told from their contents: the first two date columns are start
  and end, the first number column the use, a column of ``$`` amounts (else the second number
  column) the cost, a column of markers (``E``, ``A``, ``est``, ``actual``) the estimated flag.
* Numbers through :mod:`server.services.number_text` (the one number reader: grouping and
  decimal commas by its rules); a cost may carry a ``$``. An estimated read is a flag column
  or a marker on the use: ``182 E``, ``182E``, ``182 (est)``, ``182*``.
"""

from __future__ import annotations

import csv
import re

from server.services.bill_dates import is_date
from server.services.number_text import NumberTextError, read_decimal

_USE_MARK = re.compile(
    r"^(?P<number>.*?)\s*(?:\(\s*(?:e|est|estimated)\s*\)|(?<=[0-9.\s])(?:e|est|estimated)\.?|\*)$",
    re.IGNORECASE,
)
_TRUE = {"e", "est", "est.", "estimated", "estimate", "y", "yes", "true", "1", "x", "*"}
_FALSE = {"", "a", "act", "actual", "r", "read", "c", "customer", "n", "no", "false", "0", "-"}
_MONEY = re.compile(r"^\s*\$\s*")


def read_flag(text: str) -> bool:
    word = text.strip().lower()
    if word in _TRUE:
        return True
    if word in _FALSE:
        return False
    raise NumberTextError(f"'{text.strip()}': mark an estimated read E (or est), an actual one A")


def read_use(text: str, decimal_comma: bool) -> tuple[float, bool]:
    """The use and whether the cell marks it estimated (``182 E``, ``182*``)."""
    try:
        return read_decimal(text, decimal_comma=decimal_comma, low=0, high=1e9), False
    except NumberTextError as first:
        match = _USE_MARK.match(text.strip())
        if not match or not match["number"].strip():
            raise first from None
        return read_decimal(match["number"], decimal_comma=decimal_comma, low=0, high=1e9), True


def read_cost(text: str, decimal_comma: bool) -> float:
    raw = text.strip()
    if raw.startswith("(") and raw.endswith(")") or raw.startswith("-"):
        raise NumberTextError(f"'{raw}' is a credit; give the cost as zero or more")
    return read_decimal(_MONEY.sub("", raw), decimal_comma=decimal_comma, low=0, high=1e9)


def _is_number(text: str, decimal_comma: bool) -> bool:
    try:
        read_use(_MONEY.sub("", text), decimal_comma)
    except NumberTextError:
        return False
    return True


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
UNIT_WORDS = {"therm": "therm", "therms": "therm", "kwh": "kWh", "gallons": "gallon"}
UNIT_WORDS |= {"gal": "gallon", "gallon": "gallon", "ccf": "ccf", "mcf": "mcf", "cords": "cord"}


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


def header_roles(cells: list[str]) -> list[str]:
    roles: list[str] = []
    for cell in cells:
        role = _role(cell)
        roles.append("" if role in roles else role)
    return roles


def content_roles(rows: list[list[str]], decimal_comma: bool) -> list[str]:
    """Column roles told from the cells: dates, $ amounts, markers, numbers (in that order)."""
    width = max((len(r) for r in rows), default=0)
    kinds = []
    for column in range(width):
        cells = [r[column].strip() for r in rows if column < len(r) and r[column].strip()]
        if not cells:
            kinds.append("")
            continue
        half = len(cells) / 2
        if sum(is_date(c) for c in cells) > half:
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


def split_cells(line: str, delimiter: str) -> list[str]:
    """The cells of a line by the CSV quoting rules, trailing empty cells dropped."""
    try:
        cells = next(csv.reader([line], delimiter=delimiter, strict=True), [])
    except csv.Error:
        cells = line.split(delimiter)
    while cells and not cells[-1].strip():
        cells.pop()
    return cells


def delimiter_of(line: str) -> str:
    if "\t" in line:
        return "\t"
    return ";" if line.count(";") > line.count(",") else ","
