"""A saved house's bills: stored on the house, saved with its version check, in its document.

The house keeps its heating fuel's bills in one JSON column (``houses.bills``): the house
document's ``bills`` (:class:`server.documents.bills.BillsIn`) as it is, in the house's units
(temperatures °F or °C, degree-days °F·day or K·day), so export and import carry it unchanged
and :func:`convert_bills` switches it with the rest of the house. Each period keeps its
``estimated`` flag and its ``source`` (typed, pasted, csv, green_button); the daily
temperatures keep theirs in words.

Rules decided here:

* Only bills that compute are stored: :func:`save_bills` fits them with the house's units and
  heating fuel (the one code path of ``calc/bills``) and refuses them otherwise, naming the
  ``bills.`` field (HTTP 422). The page keeps what was typed on a refusal; the readers of
  :mod:`server.services.bill_rows` have already marked each wrong row.
* ``fuel`` is stored explicitly (the house's heating fuel when not given), so a later change
  of heating system gives a clear ``bills.fuel`` message instead of reading therms as kWh.
* ``normal_temperatures`` (the typical year the bills are normalised to) are stored with the
  bills; when not given they come from the house's weather file
  (:func:`server.services.bill_weather.house_normal_daily_means`).
* Saving goes through :func:`server.services.houses.check_version` and ``touch``: a form
  loaded from an older version of the house gets :class:`server.errors.Conflict`, nothing
  stored.
"""

from __future__ import annotations

from typing import Any

from pydantic import ValidationError
from sqlalchemy.orm import Session

from server.documents.bills import BillsIn, BillsResult
from server.documents.common import Units
from server.errors import InputError, field_path
from server.models import House
from server.physics.units import DELTA_F_K, temp_from_c, temp_to_c
from server.services.bill_weather import house_normal_daily_means, normal_temperatures
from server.services.bills import ELECTRIC_FUELS, fit_bills_document
from server.services.houses import check_version, touch

#: the heating fuel of a house whose systems are not entered yet (as the house document's)
DEFAULT_FUEL = "natural_gas"


def _validate(bills: BillsIn | dict[str, Any], units: Units) -> BillsIn:
    if isinstance(bills, BillsIn):
        return bills
    try:
        return BillsIn.model_validate(bills, context={"units": units})
    except ValidationError as exc:
        first = exc.errors()[0]
        where = field_path(first["loc"])
        message = str(first["msg"]).removeprefix("Value error, ")
        raise InputError(f"bills.{where}" if where else "bills", message) from None


def _heating(house: House) -> tuple[str, float | None]:
    heating = house.heating or {}
    return str(heating.get("fuel") or DEFAULT_FUEL), heating.get("efficiency")


def _same_fuel(fuel: str, heating: str) -> bool:
    return fuel == heating or (fuel == "electricity" and heating in ELECTRIC_FUELS)


def save_bills(
    *,
    session: Session,
    house: House,
    bills: BillsIn | dict[str, Any] | None,
    expected_version: int | None,
) -> BillsResult | None:
    """Store the house's bills (``None`` removes them) and return their fit.

    Parameters
    ----------
    session : Session
        The house's session.
    house : House
        The saved house (its organisation already checked by the caller).
    bills : BillsIn or dict or None
        The bills in the house's units, as the house document's ``bills``.
    expected_version : int or None
        The house version the form was loaded from.

    Raises
    ------
    Conflict
        Another save of the house came first (stale version, or the same instant).
    InputError
        Bills that cannot be computed, naming the ``bills.`` field.
    """
    check_version(house, expected_version)
    if bills is None:
        house.bills = None
        touch(house)
        return None
    units: Units = "si" if house.units == "si" else "ip"
    doc = _validate(bills, units)
    heating_fuel, heating_efficiency = _heating(house)
    fuel = doc.fuel or heating_fuel
    if not _same_fuel(fuel, heating_fuel):
        raise InputError(
            "bills.fuel",
            f"the house's bills must be for its heating fuel ({heating_fuel}), not {fuel}",
        )
    if doc.normal_temperatures is None:
        normals = house_normal_daily_means(house.climate)
        if normals is None:
            raise InputError(
                "bills.normal_temperatures",
                "load the house's weather file first: its typical year is what the bills are "
                "normalised to, the same weather the model uses",
            )
        body = doc.model_dump(mode="json", exclude_none=True)
        body["normal_temperatures"] = normal_temperatures(normals, units)
        doc = _validate(body, units)
    doc = doc.model_copy(update={"fuel": fuel})
    efficiency = doc.efficiency if doc.efficiency is not None else heating_efficiency
    fit = fit_bills_document(doc, units=units, fuel=fuel, efficiency=efficiency, prefix="bills.")
    house.bills = doc.model_dump(mode="json", exclude_none=True)
    touch(house)  # written now: Conflict when another save of the house came first
    return fit


def bills_document(house: House) -> dict[str, Any] | None:
    """The house document's ``bills`` from the stored column (None without bills)."""
    return dict(house.bills) if house.bills else None


def _temp(value: Any, src: Units, dst: Units) -> Any:
    return None if value is None else temp_from_c(temp_to_c(float(value), src), dst)


def _degree_days(value: Any, src: Units, dst: Units) -> Any:
    if value is None:
        return None
    # °F·day = K·day / (5/9): a degree-day of one system is 5/9 or 9/5 of the other's
    return float(value) * DELTA_F_K if (src, dst) == ("ip", "si") else float(value) / DELTA_F_K


def convert_bills(stored: dict[str, Any], src: Units, dst: Units) -> dict[str, Any]:
    """Stored bills in ``dst`` units: daily and normal temperatures, the degree-day base and
    typed degree-days (use, cost and efficiency do not depend on the unit system)."""
    if src == dst:
        return dict(stored)
    out = dict(stored)
    daily = out.get("daily_temperatures")
    if isinstance(daily, dict):
        out["daily_temperatures"] = {
            **daily,
            "values": [_temp(v, src, dst) for v in daily.get("values", [])],
        }
    normal = out.get("normal_temperatures")
    if isinstance(normal, dict):
        out["normal_temperatures"] = {
            **normal,
            "values": [_temp(v, src, dst) for v in normal.get("values", [])],
        }
    if out.get("degree_day_base") is not None:
        out["degree_day_base"] = _temp(out["degree_day_base"], src, dst)
    out["periods"] = [
        {**p, "hdd": _degree_days(p["hdd"], src, dst)} if p.get("hdd") is not None else dict(p)
        for p in out.get("periods", [])
    ]
    return out
