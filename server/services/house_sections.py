"""Saving the House page's settings sections: a section's document, or a weather file's climate.

Both check the version the form was loaded with and write at once (:func:`touch`), so a stale
form or a save that lost a race raises :class:`~server.errors.Conflict` and stores nothing.
"""

from __future__ import annotations

from typing import Any

from server.documents.climate import DegreeDaysResult
from server.models import House
from server.services.houses import check_version, touch

#: the House columns the settings sections are stored in, by section
SECTION_COLUMNS = {"climate": "climate", "heating": "heating", "cooling": "cooling",
                   "air_leakage": "air_leakage", "economics": "economics"}  # fmt: skip
#: weather-file warnings kept on the house (the rest only repeat the kind of problem)
MAX_WARNINGS = 10


def save_house_section(
    *, house: House, section: str, document: dict[str, Any], expected_version: int | None
) -> None:
    """Store ``document`` (already validated) as the house's ``section``.

    Raises
    ------
    KeyError
        ``section`` is not one of :data:`SECTION_COLUMNS` (routes 404 it first).
    Conflict
        The form was loaded from an older version, or another save came first.
    """
    column = SECTION_COLUMNS[section]
    check_version(house, expected_version)
    setattr(house, column, document)
    touch(house)


def climate_from_weather(result: DegreeDaysResult, *, file_name: str) -> dict[str, Any]:
    """The climate document a weather file's degree-days give (the file's name cut to 200)."""
    return {
        "hdd": round(result.hdd, 1),
        "cdd": round(result.cdd, 1),
        "heating_base": result.heating_base,
        "cooling_base": result.cooling_base,
        "weather": {
            "file": file_name[:200],
            "kind": result.kind,
            "station": result.station,
            "days": result.days,
            "heating_design_temperature": result.heating_design_temperature,
            "cooling_design_temperature": result.cooling_design_temperature,
            "climate_zone": result.climate_zone,
            "climate_zone_name": result.climate_zone_name,
            "warnings": result.warnings[:MAX_WARNINGS],
            "degree_days_by_base": [row.model_dump() for row in result.degree_days_by_base],
        },
    }


def set_climate_from_weather(
    *, house: House, result: DegreeDaysResult, file_name: str, expected_version: int | None
) -> None:
    """Replace the house's climate with what the weather file gave (a typed set-point and
    internal gains go with it: the balance point needs the file's table again).

    Raises
    ------
    Conflict
        The form was loaded from an older version, or another save came first.
    """
    check_version(house, expected_version)
    house.climate = climate_from_weather(result, file_name=file_name)
    touch(house)
