"""Small helpers for reading form fields into numbers with plain messages.

Every reading goes through :mod:`server.services.number_text` (one set of rules for every form
and the API); these helpers only put its message in the form's ``errors`` under the field.
A decimal comma (``1,5``) is read as one only when ``units`` is ``"si"``.
"""

from __future__ import annotations

from collections.abc import Mapping

from server.errors import InputError
from server.physics.units import INCH_M
from server.services.number_text import NumberTextError, read_decimal, read_integer, read_length

VERSION_MESSAGE = (
    "this page's version mark is not a whole number, so nothing was saved: reload the page "
    "and enter your changes again"
)


def form_version(data: Mapping[str, str]) -> int | None:
    """The house version a form was loaded with (its ``version`` field), or None if absent.

    Raises
    ------
    InputError
        ``version`` when the field is there but is not a whole number (``²``, ``NaN``).
    """
    text = str(data.get("version", "") or "").strip()
    if not text:
        return None
    try:
        return read_integer(text, low=0)
    except NumberTextError:
        raise InputError("version", VERSION_MESSAGE) from None


def parse_length_field(
    text: str, units: str, field: str, errors: dict[str, str], *, required: bool = True
) -> float | None:
    """A length typed as the trade says it (``3-1/2``, ``7/8"``, ``22 mm``) -> inches (ip) or
    mm (si), the API's thickness unit; on failure a message goes in ``errors[field]``."""
    if not (text or "").strip():
        if required:
            errors[field] = "required"
        return None
    try:
        metres = read_length(
            text, default_unit="in" if units == "ip" else "mm", decimal_comma=units == "si"
        )
    except NumberTextError as exc:
        errors[field] = str(exc)
        return None
    return metres / INCH_M if units == "ip" else metres * 1e3


def parse_float(
    text: str, field: str, errors: dict[str, str], *, positive: bool = True, units: str = "ip"
) -> float | None:
    """Parse ``text`` as a number; on failure put a message in ``errors[field]``."""
    if not (text or "").strip():
        errors[field] = "required"
        return None
    try:
        return read_decimal(
            text, decimal_comma=units == "si", low=0.0 if positive else None, low_open=positive
        )
    except NumberTextError as exc:
        errors[field] = str(exc)
        return None
