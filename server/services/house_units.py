"""Switching a saved house between US and SI units: every stored number is converted, none is
lost (surfaces and pipe runs, ground inputs, upgrades, climate, bills, systems, buffer spaces).

Kept apart from services/houses.py (storage) because it reaches into the modules that own each
section's fields, which themselves use houses.py's version check."""

from __future__ import annotations

from sqlalchemy.orm import Session

from server.documents.common import Units
from server.models import House
from server.services import convert as cv
from server.services import convert_envelope as ce
from server.services import convert_systems as cs
from server.services.house_bills import convert_bills
from server.services.houses import check_version, touch
from server.services.spaces import convert_spaces


def switch_units(
    *, session: Session, house: House, units: Units, expected_version: int | None
) -> None:
    """Convert every stored number of the house to the other unit system."""
    check_version(house, expected_version)
    src: Units = house.units  # type: ignore[assignment]
    if src == units:
        return
    for surface in house.surfaces:
        if surface.kind == "pipe_run":
            surface.length = cv.convert_value(surface.length or 0.0, "length", src, units)
            details = dict(surface.details)
            details["pipe"] = cv.convert_pipe(details.get("pipe") or {}, src, units)
            surface.details = details
        else:
            surface.assembly = cv.convert_assembly(surface.assembly, src, units)
            surface.area = cv.convert_value(surface.area or 0.0, "area", src, units)
            if surface.details:  # a ground surface's ISO 13370 inputs
                surface.details = ce.surface_details_fields(surface.details, src, units)
    for upgrade in house.upgrades:
        upgrade.document = cv.convert_upgrade(upgrade.document, src, units)
    if house.climate:
        house.climate = cv.convert_climate(house.climate, src, units)
    if house.bills:  # the heating fuel's bills: temperatures and degree-days
        house.bills = convert_bills(house.bills, src, units)
    if house.air_leakage and house.air_leakage.get("volume"):
        house.air_leakage = {**house.air_leakage,
                             "volume": cv.convert_value(house.air_leakage["volume"], "volume", src, units)}  # fmt: skip
    if house.heating:
        house.heating = cs.heating_fields(house.heating, src, units)
    if house.air_leakage and isinstance(house.air_leakage.get("mechanical_ventilation"), dict):
        vent = cs.ventilation_fields(house.air_leakage["mechanical_ventilation"], src, units)
        house.air_leakage = {**house.air_leakage, "mechanical_ventilation": vent}
    if house.spaces:  # buffer spaces: volume, exposed areas and U-factors
        house.spaces = convert_spaces(house.spaces, src, units)
    if house.floor_area:
        house.floor_area = cv.convert_value(house.floor_area, "area", src, units)
    if house.volume:
        house.volume = cv.convert_value(house.volume, "volume", src, units)
    house.units = units
    touch(house)
    session.flush()
