"""House page sections: climate (typed or from a weather file), systems, air leakage, money."""

from __future__ import annotations

import re
from typing import Any, BinaryIO

from fastapi import APIRouter, Request, UploadFile
from fastapi.responses import RedirectResponse, Response
from sqlalchemy.orm import Session

from server.errors import InputError
from server.models import House, Organization
from server.services import houses as svc
from server.services.bill_weather import normal_daily_means
from server.services.climate import compute_degree_days
from server.services.house_sections import (
    keep_unshown,
    save_house_section,
    set_climate_from_weather,
)
from server.services.library import catalog_for
from server.services.number_text import NumberTextError, read_decimal
from server.web.conflicts import stale_form
from server.web.deps import OrgDep, PostedFields, PostedForm, SessionDep
from server.web.forms import form_version
from server.web.pages.house import house_context
from server.web.pages.settings import settings_context
from server.web.pages.systems import systems_context
from server.web.render import is_htmx, page_or_fragment
from server.web.settings_forms import COLUMNS, SECTIONS, parse_section

router = APIRouter()
MAX_WEATHER_BYTES = 20 * 1024 * 1024
WEATHER_STALE = stale_form("the weather file was not used",
                           then="Reload to see their change, then load the file again.")  # fmt: skip


def _respond(request: Request, session: Session, org: Organization, house: House,
             ctx: dict[str, Any], status: int) -> Response:  # fmt: skip
    """htmx: the section alone; a saved form: back to the House page; a rejected one: the whole
    House page with the section's messages and what was typed."""
    air = ctx.get("settings_section") == "air_leakage"  # its own block, with the N-factor card
    if status == 200 and not is_htmx(request):
        return RedirectResponse(f"/houses/{house.id}#{'air' if air else 'settings'}", 303)
    if air and is_htmx(request):
        catalog = catalog_for(session=session, organization_id=org.id)
        ctx = {**systems_context(house=house, catalog=catalog), **ctx}
    return page_or_fragment(
        request, page="pages/house.html", context=ctx,
        fragment="partials/house_air.html" if air else "partials/house_settings.html",
        page_context=lambda: house_context(session=session, organization_id=org.id, house_id=house.id),
        status_code=status,
    )  # fmt: skip


@router.post("/houses/{house_id}/settings/{section}")
def save_section(
    request: Request,
    session: SessionDep,
    org: OrgDep,
    data: PostedFields,
    house_id: int,
    section: str,
) -> Response:
    house = svc.get_house(session=session, organization_id=org.id, house_id=house_id)
    if section not in SECTIONS:
        raise svc.NotFound
    stored = getattr(house, COLUMNS[section]) or {}
    doc, errors = parse_section(section, data, units=house.units)
    try:
        version, version_ok = form_version(data), True
    except InputError as exc:
        doc, errors, version, version_ok = None, {**errors, "form": exc.message}, None, False
    zone = data.get("climate_zone", "").strip().upper()
    if section == "climate" and zone and not re.fullmatch(r"[0-8][ABC]?", zone):
        errors = {**errors, "climate_zone": "write the zone like 5 or 5A (0 to 8, then A, B or C)"}
        doc = None
    if doc is not None and section == "climate":
        doc, errors = _with_balance_point(house, doc, data, errors)
    if doc is not None:
        shown = {f.key.split(".")[0] for f in SECTIONS[section][2]}
        doc = keep_unshown(section, stored, doc, shown)  # what the form does not show stays
        if section == "climate":
            if zone:
                doc["climate_zone"] = zone
        try:  # written now: Conflict for a stale form or when another save came first
            save_house_section(house=house, section=section, document=doc, expected_version=version)
        except svc.Conflict:
            errors = {"form": stale_form()}
            doc = None
    if doc is None:
        ctx = settings_context(house=house, section=section, typed=data, errors=errors,
                               message="Not saved: check the marked fields.")  # fmt: skip
        return _respond(
            request, session, org, house, ctx, 409 if "form" in errors and version_ok else 422
        )
    ctx = settings_context(house=house, section=section, message=f"{SECTIONS[section][0]} saved.")
    return _respond(request, session, org, house, ctx, 200)


def _with_balance_point(
    house: House, doc: dict[str, Any], data: dict[str, str], errors: dict[str, str]
) -> tuple[dict[str, Any] | None, dict[str, str]]:
    """Add variable_base when set-point and gains are typed and a weather table exists."""
    setpoint, gains = data.get("setpoint", "").strip(), data.get("internal_gains", "").strip()
    if not setpoint and not gains:
        return doc, errors
    table = ((house.climate or {}).get("weather") or {}).get("degree_days_by_base")
    if not table:
        return None, {
            "setpoint": "load a weather file first: the balance-point method needs its table"
        }
    decimal_comma = house.units == "si"
    try:
        numbers = [read_decimal(text, decimal_comma=decimal_comma) for text in (setpoint, gains)]
    except NumberTextError as exc:
        return None, {"setpoint": f"give the set-point and the internal gains as numbers ({exc})"}
    doc["variable_base"] = {"setpoint": numbers[0], "internal_gains": numbers[1],
                            "table": [{"base": r["base"], "hdd": r["hdd"]} for r in table]}  # fmt: skip
    from server.documents.house import ClimateIn

    try:
        return ClimateIn.model_validate(doc).model_dump(exclude_none=True), errors
    except Exception as exc:  # pydantic ValidationError: plain message beside the field
        return None, {"setpoint": str(exc).splitlines()[-1][:200]}


@router.post("/houses/{house_id}/weather")
def upload_weather(
    request: Request,
    session: SessionDep,
    org: OrgDep,
    form: PostedForm,
    house_id: int,
    file: UploadFile,
) -> Response:
    """Read a weather file (EPW, TMY3 or CSV) into the house's climate (a sync route: the
    upload is already spooled by the time it runs, so ``file.file`` is read directly)."""
    house = svc.get_house(session=session, organization_id=org.id, house_id=house_id)
    try:
        version = form_version({"version": str(form.get("version", ""))})
        if (file.size or 0) > MAX_WEATHER_BYTES:  # the reader bounds the rows read, too
            raise InputError(
                "file", "the file is larger than 20 MB; a year of hourly data is about 2 MB"
            )
        svc.check_version(house, version)
        result = compute_degree_days(  # read line by line from the spooled file, bounded
            file.file, units=house.units, heating_base=None, cooling_base=None
        )
        normals = _normal_year(file.file, default_unit="F" if house.units == "ip" else "C")
    except InputError as exc:
        ctx = settings_context(house=house, section="climate", errors={"file": exc.message},
                               message="The weather file was not used.")  # fmt: skip
        return _respond(request, session, org, house, ctx, 422)
    except svc.Conflict:
        ctx = settings_context(house=house, section="climate", errors={"form": WEATHER_STALE})
        return _respond(request, session, org, house, ctx, 409)
    try:  # written now: Conflict when another save of the house came first
        set_climate_from_weather(house=house, result=result, file_name=file.filename or "",
                                 expected_version=version, normal_daily_means_c=normals)  # fmt: skip
    except svc.Conflict:
        ctx = settings_context(house=house, section="climate", errors={"form": WEATHER_STALE})
        return _respond(request, session, org, house, ctx, 409)
    name = result.station or file.filename or "the file"
    ctx = settings_context(house=house, section="climate", message=f"Climate read from {name}: "
                           f"HDD {result.hdd:,.0f}, CDD {result.cdd:,.0f}, zone {result.climate_zone}.")  # fmt: skip
    return _respond(request, session, org, house, ctx, 200)


def _normal_year(data: BinaryIO, *, default_unit: str) -> tuple[float, ...] | None:
    """The file's 365 normal daily means [°C] for the bills' normal year, or None when the file
    does not give every calendar day (the degree-days are still used)."""
    data.seek(0)
    try:
        return normal_daily_means(data, default_unit=default_unit)
    except InputError:
        return None
