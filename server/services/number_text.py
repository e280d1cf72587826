"""The one reader of numbers typed as text: forms, and strings where the API takes a number.

Every page and the API's string inputs read numbers here, with the same rules:

* Digits are ASCII only. ``"²".isdigit()`` and ``"٣".isdigit()`` are true in Python and
  ``int("٣")`` is 3, so nothing here uses ``isdigit`` or hands raw text to ``int``/``float``.
* A comma is a grouping comma only in the ``1,234,567`` pattern (groups of exactly three
  digits after the first group of one to three), optionally followed by ``.decimals``.
* A single comma not followed by exactly three digits (``1,5``, ``0,75``) is a decimal comma.
  It is read as one only where the user's unit system is metric (``decimal_comma=True``: the
  house or the request is in SI); elsewhere it is refused with a question
  (``1,5: did you mean 1.5 or 15?``).
* ``1,000`` (one comma, then exactly three digits, no dot) is grouping in US units. In metric
  it is ambiguous (a decimal-comma writer means 1.000), so it is refused with the same kind of
  question: write ``1000`` or ``1.000``. Two or more commas (``1,234,567``) or a comma before a
  dot (``1,234.5``) are grouping in both systems.
* A dot and a comma with the comma last (``1.234,5``) is refused: write ``1234.5``.
* NaN, infinity and numbers too large for a float (``1e309``) are refused.

Each reader raises :class:`NumberTextError` (a ``ValueError``) whose text is a plain message
to show beside the field. Lengths as the trade says them (``3-1/2``, ``5 1/2"``, ``89 mm``,
``5' 6"``) are read by :func:`read_length`.
"""

from __future__ import annotations

import math
import re
from fractions import Fraction

from server.physics.units import FOOT_M, INCH_M


class NumberTextError(ValueError):
    """Text that is not the number asked for; ``str(error)`` is the message for the user."""


#: longer text than this is not a number anyone types (and keeps int() far from its limit)
MAX_TEXT = 40
_SIGN = r"[+-]?"
_EXPONENT = r"(?:[eE][+-]?[0-9]+)?"
_PLAIN = re.compile(rf"^{_SIGN}(?:[0-9]+(?:\.[0-9]*)?|\.[0-9]+){_EXPONENT}$")
_GROUPED = re.compile(rf"^{_SIGN}[0-9]{{1,3}}(?:,[0-9]{{3}})+(?:\.[0-9]*)?{_EXPONENT}$")
_DECIMAL_COMMA = re.compile(rf"^{_SIGN}(?:[0-9]+,[0-9]*|,[0-9]+){_EXPONENT}$")
_INTEGER = re.compile(r"^[+-]?[0-9]+$")
_NOT_FINITE = re.compile(r"^[+-]?(?:nan|inf|infinity)$", re.IGNORECASE)
#: typographic minus signs and spaces people paste from documents
_MINUS = str.maketrans({"\u2212": "-", "\u2012": "-", "\u2013": "-", "\u00a0": " "})


def _clean(text: object) -> str:
    raw = "" if text is None else str(text)
    return raw.translate(_MINUS).strip()


def _decimal_comma_question(raw: str) -> str:
    sign, body = (raw[0], raw[1:]) if raw[:1] in "+-" else ("", raw)
    whole, _, rest = body.partition(",")
    as_decimal = f"{sign}{whole or '0'}.{rest}"
    as_grouped = f"{sign}{whole}{rest}"
    return f"{raw}: did you mean {as_decimal} or {as_grouped}? Write it without a comma"


def _to_float(text: str, raw: str) -> float:
    value = float(text)
    if not math.isfinite(value):
        raise NumberTextError(f"'{raw}' is too large a number")
    return value


def read_decimal(
    text: object,
    *,
    decimal_comma: bool = False,
    low: float | None = None,
    high: float | None = None,
    low_open: bool = False,
) -> float:
    """Read a finite decimal number from typed text.

    Parameters
    ----------
    text : the text as typed (surrounding spaces are ignored).
    decimal_comma : True where the user's unit system is metric: ``1,5`` then reads as 1.5.
    low, high : optional bounds (inclusive; ``low_open`` makes ``low`` exclusive).

    Raises
    ------
    NumberTextError
        With a plain message: not a number, an ambiguous comma, not finite, out of bounds.

    Examples
    --------
    >>> read_decimal("1,234,567.5")
    1234567.5
    >>> read_decimal("0,75", decimal_comma=True)
    0.75
    """
    raw = _clean(text)
    if not raw:
        raise NumberTextError("enter a number")
    if len(raw) > MAX_TEXT:
        raise NumberTextError("that is too long to be a number")
    if _NOT_FINITE.match(raw):
        raise NumberTextError("must be a finite number (not NaN or infinity)")
    if _PLAIN.match(raw):
        value = _to_float(raw, raw)
    elif _GROUPED.match(raw):
        single = raw.count(",") == 1 and "." not in raw and "e" not in raw.lower()
        if decimal_comma and single:
            raise NumberTextError(_decimal_comma_question(raw))
        value = _to_float(raw.replace(",", ""), raw)
    elif _DECIMAL_COMMA.match(raw):
        if not decimal_comma:
            raise NumberTextError(_decimal_comma_question(raw))
        value = _to_float(raw.replace(",", "."), raw)
    elif "," in raw and "." in raw and raw.rfind(",") > raw.rfind("."):
        raise NumberTextError(
            f"'{raw}' mixes a dot and a comma: write the decimals after a dot and no "
            "grouping, like 1234.5"
        )
    elif "," in raw:
        raise NumberTextError(
            f"'{raw}': put commas only between groups of three digits (1,234,567), or leave "
            "them out"
        )
    else:
        raise NumberTextError(f"'{raw}' is not a number")
    return _bounded(value, low=low, high=high, low_open=low_open)


def _bounded(value: float, *, low: float | None, high: float | None, low_open: bool) -> float:
    if low is not None:
        if low_open and value <= low:
            raise NumberTextError(
                "must be greater than zero" if low == 0 else f"must be greater than {low:g}"
            )
        if not low_open and value < low:
            raise NumberTextError(
                "must be zero or more" if low == 0 else f"must be at least {low:g}"
            )
    if high is not None and value > high:
        raise NumberTextError(f"must be at most {high:g}")
    return value


def read_integer(text: object, *, low: int | None = None, high: int | None = None) -> int:
    """Read a whole number typed with ASCII digits (an optional sign; ``20.0`` is 20).

    Raises
    ------
    NumberTextError
        Not a number, not whole, not finite, or outside ``low``..``high`` (inclusive).

    Examples
    --------
    >>> read_integer(" 30 ")
    30
    """
    raw = _clean(text)
    if _INTEGER.match(raw) and len(raw) <= MAX_TEXT:
        value = int(raw)
    else:
        number = read_decimal(raw)
        if number != math.floor(number):
            raise NumberTextError("must be a whole number")
        value = int(number)
    if low is not None and value < low:
        raise NumberTextError(f"must be at least {low}")
    if high is not None and value > high:
        raise NumberTextError(f"must be at most {high}")
    return value


# --- lengths as the trade says them ------------------------------------------------------------
_UNIT_M = {
    "mm": 1e-3,
    "cm": 1e-2,
    "m": 1.0,
    "in": INCH_M,
    '"': INCH_M,
    "inch": INCH_M,
    "inches": INCH_M,
    "ft": FOOT_M,
    "'": FOOT_M,
    "foot": FOOT_M,
    "feet": FOOT_M,
}
_NUMBER = r"(?:[0-9]+(?:\.[0-9]*)?|\.[0-9]+)"
_UNIT = r"(?P<unit>mm|cm|m|inches|inch|in|\"|feet|foot|ft|')?"
_AMOUNT = re.compile(
    rf"""^\s*(?:
      (?P<whole>{_NUMBER})(?:\s*-\s*|\s+)(?P<num>[0-9]+)\s*/\s*(?P<den>[0-9]+)   # 3-1/2, 5 1/2
    | (?P<fnum>[0-9]+)\s*/\s*(?P<fden>[0-9]+)                                   # 1/2, 11/16
    | (?P<plain>{_NUMBER})                                                      # 3, 3.5
    )\s*{_UNIT}\s*$""",
    re.VERBOSE | re.IGNORECASE,
)
_ZERO = re.compile(r"^\s*0+(?:\.0*)?\s*(?:\"|in|inch|inches)?\s*$", re.IGNORECASE)
_FEET_INCHES = re.compile(rf"^\s*(?P<ft>{_NUMBER})\s*(?:'|ft)\s*(?P<rest>.+?)\s*$", re.IGNORECASE)
_LENGTH_EXAMPLE = '3-1/2, 5 1/2" or 89 mm'
_DECIMAL_COMMA_LENGTH = re.compile(r"^\s*[0-9]*,[0-9]+")


def read_length(text: object, *, default_unit: str = "in", decimal_comma: bool = False) -> float:
    """Read a length as the trade types it and return metres [m].

    Accepts whole numbers and decimals (``3.5``), fractions (``1/2``), mixed numbers with a
    dash or a space (``3-1/2``, ``5 1/2``), a unit (``in``, ``"``, ``ft``, ``'``, ``mm``,
    ``cm``, ``m``) and feet-and-inches (``5' 6"``). Without a unit ``default_unit`` applies
    (``"in"`` for US entry, ``"mm"`` for metric entry). With ``decimal_comma`` (metric
    users) ``12,5 mm`` reads as 12.5 mm; otherwise such a comma is refused with a question.

    Raises
    ------
    NumberTextError
        With a plain-words message when the text is not a length or is not positive.

    Examples
    --------
    >>> round(read_length("3-1/2") / INCH_M, 6)
    3.5
    >>> round(read_length('5 1/2"') / INCH_M, 6)
    5.5
    >>> round(read_length("89 mm"), 6)
    0.089
    >>> round(read_length("5' 6\\"") / INCH_M, 6)
    66.0
    """
    raw = _clean(text).replace("\u2033", '"').replace("\u2032", "'")
    if not raw:
        raise NumberTextError(f"enter a length, for example {_LENGTH_EXAMPLE}")
    if len(raw) > MAX_TEXT:
        raise NumberTextError(f"that is too long to be a length; write it like {_LENGTH_EXAMPLE}")
    if "," in raw:
        match = _DECIMAL_COMMA_LENGTH.match(raw)
        number = match.group(0).strip() if match else ""
        if not match or raw.count(",") != 1 or "." in raw:
            raise NumberTextError(f"'{raw}' is not a length; write it like {_LENGTH_EXAMPLE}")
        if not decimal_comma:
            raise NumberTextError(_decimal_comma_question(number))
        raw = raw.replace(",", ".")
    feet = _FEET_INCHES.match(raw)
    if feet and feet.group("rest"):
        rest = feet.group("rest")
        inches = 0.0 if _ZERO.match(rest) else read_length(rest, default_unit="in")
        metres = float(feet.group("ft")) * FOOT_M + inches
        if not math.isfinite(metres) or metres <= 0:
            raise NumberTextError(f"'{raw}' must be a length greater than zero")
        return metres
    match = _AMOUNT.match(raw)
    if not match:
        raise NumberTextError(f"'{raw}' is not a length; write it like {_LENGTH_EXAMPLE}")
    if match.group("plain"):
        amount = Fraction(match.group("plain"))
    else:
        whole = Fraction(match.group("whole") or 0)
        num = int(match.group("num") or match.group("fnum"))
        den = int(match.group("den") or match.group("fden"))
        if den == 0:
            raise NumberTextError(f"'{raw}' divides by zero")
        amount = whole + Fraction(num, den)
    unit = (match.group("unit") or default_unit).lower()
    if unit not in _UNIT_M:
        raise NumberTextError(f"unknown unit '{unit}'")
    metres = float(amount) * _UNIT_M[unit]
    if not math.isfinite(metres) or metres <= 0:
        raise NumberTextError(f"'{raw}' must be a length greater than zero")
    return metres
