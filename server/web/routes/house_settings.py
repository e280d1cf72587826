"""House page sections: climate (typed or from a weather file), systems, air leakage, money."""

from __future__ import annotations

import re
from typing import Any

from fastapi import APIRouter, Request, UploadFile
from fastapi.responses import RedirectResponse, Response
from sqlalchemy.orm import Session

from server.documents.climate import DegreeDaysResult
from server.errors import InputError
from server.models import House, Organization
from server.services import houses as svc
from server.services.house_sections import (
    keep_unshown,
    save_house_section,
    set_climate_from_weather_file,
)
from server.services.library import catalog_for
from server.services.number_text import NumberTextError, read_decimal
from server.web.deps import OrgDep, PostedFields, PostedForm, SessionDep
from server.web.forms import form_version
from server.web.pages.house import house_context
from server.web.pages.settings import settings_context
from server.web.pages.systems import systems_context
from server.web.render import is_htmx, page_or_fragment
from server.web.saving import save_or_rerender
from server.web.settings_forms import COLUMNS, SECTIONS, parse_section

router = APIRouter()
MAX_WEATHER_BYTES = 20 * 1024 * 1024


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

    def rerender(errors: dict[str, str], status: int) -> Response:
        ctx = settings_context(house=house, section=section, typed=data, errors=errors,
                               message="Not saved: check the marked fields.")  # fmt: skip
        return _respond(request, session, org, house, ctx, status)

    def saved(_: None) -> Response:
        ctx = settings_context(
            house=house, section=section, message=f"{SECTIONS[section][0]} saved."
        )
        return _respond(request, session, org, house, ctx, 200)

    if doc is None:  # as before, a message at the form's head (a check of the whole section) is 409
        return rerender(errors, 409 if "form" in errors and version_ok else 422)
    shown = {f.key.split(".")[0] for f in SECTIONS[section][2]}
    doc = keep_unshown(section, stored, doc, shown)  # what the form does not show stays
    if section == "climate" and zone:
        doc["climate_zone"] = zone
    # written now: Conflict for a stale form or when another save came first
    return save_or_rerender(
        call=lambda: save_house_section(house=house, section=section, document=doc,
                                        expected_version=version),
        saved=saved, rerender=rerender,
    )  # fmt: skip


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

    def read() -> DegreeDaysResult:
        version = form_version({"version": str(form.get("version", ""))})
        if (file.size or 0) > MAX_WEATHER_BYTES:  # the reader bounds the rows read, too
            raise InputError(
                "file", "the file is larger than 20 MB; a year of hourly data is about 2 MB"
            )
        return set_climate_from_weather_file(house=house, file=file.file, file_name=file.filename or "",
                                             expected_version=version)  # fmt: skip

    def rerender(errors: dict[str, str], status: int) -> Response:
        message = "The weather file was not used." if status == 422 else ""
        ctx = settings_context(house=house, section="climate", errors=errors, message=message)
        return _respond(request, session, org, house, ctx, status)

    def saved(result: DegreeDaysResult) -> Response:
        name = result.station or file.filename or "the file"
        ctx = settings_context(house=house, section="climate", message=f"Climate read from {name}: "
                               f"HDD {result.hdd:,.0f}, CDD {result.cdd:,.0f}, zone {result.climate_zone}.")  # fmt: skip
        return _respond(request, session, org, house, ctx, 200)

    return save_or_rerender(call=read, saved=saved, rerender=rerender, field_key=lambda _: "file",
                            not_done="the weather file was not used",
                            then="Reload to see their change, then load the file again.")  # fmt: skip
