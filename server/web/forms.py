"""Small helpers for reading form fields into numbers with plain messages."""

from __future__ import annotations

import math
from collections.abc import Mapping

from server.physics.units import INCH_M, parse_length


def form_version(data: Mapping[str, str]) -> int | None:
    """The house version a form was loaded with (its ``version`` field), or None if absent."""
    text = str(data.get("version", "")).strip()
    return int(text) if text.isdigit() else None


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
        metres = parse_length(text, default_unit="in" if units == "ip" else "mm")
    except ValueError as exc:
        errors[field] = str(exc)
        return None
    return metres / INCH_M if units == "ip" else metres * 1e3


def parse_float(
    text: str, field: str, errors: dict[str, str], *, positive: bool = True
) -> float | None:
    """Parse ``text`` as a number; on failure put a message in ``errors[field]``."""
    cleaned = (text or "").replace(",", "").strip()
    if not cleaned:
        errors[field] = "required"
        return None
    try:
        value = float(cleaned)
    except ValueError:
        errors[field] = f"'{text}' is not a number"
        return None
    if not math.isfinite(value):
        errors[field] = "must be a finite number"
        return None
    if positive and value <= 0:
        errors[field] = "must be greater than zero"
        return None
    return value
