"""Small helpers for reading form fields into numbers with plain messages."""

from __future__ import annotations

import math


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
