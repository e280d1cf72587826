"""Code targets page: the prescriptive table by climate zone, editable by the firm."""

from __future__ import annotations

from fastapi import APIRouter, Request
from fastapi.responses import HTMLResponse, RedirectResponse, Response

from server.errors import InputError
from server.services.number_text import NumberTextError, read_integer
from server.services.organization_code_targets import reset_row, save_row
from server.web.deps import OrgDep, PostedFields, SessionDep, render
from server.web.forms import parse_float
from server.web.pages.code_targets import code_targets_context

router = APIRouter()


@router.get("/code-targets", name="code_targets")
def code_targets_page(request: Request, session: SessionDep, org: OrgDep) -> HTMLResponse:
    context = code_targets_context(session=session, organization_id=org.id)
    return render(request, "pages/code_targets.html", context)


@router.post("/code-targets")
def save_code_target(
    request: Request, session: SessionDep, org: OrgDep, data: PostedFields
) -> Response:
    errors: dict[str, str] = {}
    try:
        zone = read_integer(data.get("climate_zone", ""))
    except NumberTextError:
        zone = -1
    kind = data.get("surface_kind", "")
    if not 0 <= zone <= 8:
        errors["climate_zone"] = "choose a zone from 0 to 8"
    if data.get("action") == "reset" and not errors:
        reset_row(session=session, organization_id=org.id, climate_zone=zone, surface_kind=kind)
        return RedirectResponse("/code-targets#t-" + f"{zone}-{kind}", status_code=303)
    r_min = (
        parse_float(data["r_min_ip"], "r_min_ip", errors)
        if data.get("r_min_ip", "").strip()
        else None
    )
    u_max = (
        parse_float(data["u_max_ip"], "u_max_ip", errors)
        if data.get("u_max_ip", "").strip()
        else None
    )
    if not errors:
        try:
            save_row(session=session, organization_id=org.id, climate_zone=zone, surface_kind=kind, r_min_ip=r_min,
                     u_max_ip=u_max, note=data.get("note", ""), edition=data.get("edition", ""))  # fmt: skip
            return RedirectResponse("/code-targets#t-" + f"{zone}-{kind}", status_code=303)
        except InputError as exc:
            errors[exc.field] = exc.message
    context = code_targets_context(
        session=session, organization_id=org.id, form=data, errors=errors
    )
    return render(request, "pages/code_targets.html", context, status_code=422)
