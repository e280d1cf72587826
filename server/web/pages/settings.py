"""The House page's settings sections (templates/partials/house_settings.html)."""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

from server.models import House
from server.web.settings_forms import COLUMNS, SECTIONS, form_values


def settings_context(
    *,
    house: House,
    section: str = "",
    typed: Mapping[str, str] | None = None,
    errors: Mapping[str, str] | None = None,
    message: str = "",
) -> dict[str, Any]:
    """Each section's fields and values: the stored values, or for ``section`` what was typed
    (``typed``) with its ``errors``; ``message`` says what the last save did."""
    sections = []
    for key, (title, _model, fields) in SECTIONS.items():
        stored = getattr(house, COLUMNS[key]) or {}
        values = (typed if (key == section and typed is not None)
                  else form_values(key, stored, house.units))  # fmt: skip
        sections.append({"key": key, "title": title, "fields": fields, "values": values,
                         "errors": (errors or {}) if key == section else {}})  # fmt: skip
    weather = (house.climate or {}).get("weather")
    vb = (house.climate or {}).get("variable_base") or {}
    return {"house": house, "sections": sections, "weather": weather, "settings_message": message,
            "settings_section": section, "balance": vb}  # fmt: skip
