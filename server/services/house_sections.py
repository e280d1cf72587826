"""Saving the House page's settings sections: a section's document, or a weather file's climate.

Both check the version the form was loaded with and write at once (:func:`touch`), so a stale
form or a save that lost a race raises :class:`~server.errors.Conflict` and stores nothing.
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any, BinaryIO

from server.documents.climate import DegreeDaysResult
from server.errors import InputError
from server.models import House
from server.services.bill_weather import climate_normals, normal_daily_means
from server.services.climate import compute_degree_days
from server.services.houses import check_version, touch

#: the House columns the settings sections are stored in, by section
SECTION_COLUMNS = {"climate": "climate", "heating": "heating", "cooling": "cooling",
                   "air_leakage": "air_leakage", "economics": "economics"}  # fmt: skip
#: weather-file warnings kept on the house (the rest only repeat the kind of problem)
MAX_WARNINGS = 10


#: keys a section's form owns although no field of it carries the name (built from others)
FORM_BUILT_KEYS = {"climate": {"variable_base"}}


def keep_unshown(
    section: str, stored: dict[str, Any] | None, document: dict[str, Any], shown: set[str]
) -> dict[str, Any]:
    """``document`` with the stored keys its form does not show kept as they were.

    A section's form edits only some of its document (the House page's climate form has no
    field for the weather file's table, the gains or the elevation; the heating form none for
    ducts, a heat pump's ratings or the output capacity of an imported house): saving it must
    not drop the rest. A key the form shows (``shown``: the top-level keys of its fields) and
    left empty is cleared, as typed.
    """
    owned = shown | FORM_BUILT_KEYS.get(section, set())
    kept = {k: v for k, v in (stored or {}).items() if k not in owned}
    return {**kept, **document}


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


#: climate keys a weather file sets; the rest of a stored climate (gains, elevation, a typed
#: design temperature) is kept when a new file is read
WEATHER_KEYS = {"hdd", "cdd", "heating_base", "cooling_base", "weather", "variable_base"}


def climate_from_weather(
    result: DegreeDaysResult,
    *,
    file_name: str,
    normal_daily_means_c: Sequence[float] | None = None,
) -> dict[str, Any]:
    """The climate document a weather file's degree-days give (the file's name cut to 200).

    With the file's temperature bins (heat pumps by the hour), its sun table (windows' gains)
    and its 365 normal daily means (the bills' normal year) when the file gives them.
    """
    extra: dict[str, Any] = {}
    if result.temperature_bins:
        extra["temperature_bins"] = [row.model_dump() for row in result.temperature_bins]
    if result.solar is not None:
        extra["solar"] = result.solar.model_dump()
    if normal_daily_means_c is not None:
        extra.update(climate_normals(normal_daily_means_c))
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
            **extra,
        },
    }


def set_climate_from_weather(
    *,
    house: House,
    result: DegreeDaysResult,
    file_name: str,
    expected_version: int | None,
    normal_daily_means_c: Sequence[float] | None = None,
) -> None:
    """Replace the house's climate with what the weather file gave (a typed set-point and
    internal gains go with it: the balance point needs the file's table again).

    Raises
    ------
    Conflict
        The form was loaded from an older version, or another save came first.
    """
    check_version(house, expected_version)
    kept = {k: v for k, v in (house.climate or {}).items() if k not in WEATHER_KEYS}
    climate = climate_from_weather(
        result, file_name=file_name, normal_daily_means_c=normal_daily_means_c
    )
    house.climate = {**kept, **climate}
    touch(house)


def set_climate_from_weather_file(
    *, house: House, file: BinaryIO, file_name: str, expected_version: int | None
) -> DegreeDaysResult:
    """Read a weather file (EPW, TMY3 or CSV, a seekable binary file read one bounded line at a
    time) into the house's climate, with its normal year for the bills when the file gives
    every calendar day; returns what the file gave.

    Raises
    ------
    Conflict
        The form was loaded from an older version (before the file is read), or another save
        came first.
    InputError
        The file cannot be read as weather data.
    """
    check_version(house, expected_version)
    result = compute_degree_days(file, units=house.units, heating_base=None, cooling_base=None)
    file.seek(0)
    try:  # the 365 normal daily means [°C]; without them the degree-days are still used
        normals: tuple[float, ...] | None = normal_daily_means(
            file, default_unit="F" if house.units == "ip" else "C"
        )
    except InputError:
        normals = None
    set_climate_from_weather(house=house, result=result, file_name=file_name,
                             expected_version=expected_version, normal_daily_means_c=normals)  # fmt: skip
    return result
