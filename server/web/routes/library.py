"""Library page: built-in materials with their sources, and the firm's own."""

from __future__ import annotations

from fastapi import APIRouter, Form, Request
from fastapi.responses import HTMLResponse, RedirectResponse, Response

from server.errors import InputError
from server.physics.units import k_ip_to_si, r_ip_to_si
from server.services.library import add_material
from server.web.deps import OrgDep, SessionDep, render
from server.web.forms import parse_float
from server.web.pages.library import library_context

router = APIRouter()


@router.get("/library", name="library")
def library_page(request: Request, session: SessionDep, org: OrgDep) -> HTMLResponse:
    return render(
        request, "pages/library.html", library_context(session=session, organization_id=org.id)
    )


@router.post("/library")
def add_library_material(
    request: Request,
    session: SessionDep,
    org: OrgDep,
    name: str = Form(""),
    category: str = Form("other"),
    value_kind: str = Form("conductivity"),
    value: str = Form(""),
    units: str = Form("ip"),
    source: str = Form(""),
) -> Response:
    errors: dict[str, str] = {}
    number = parse_float(value, "value", errors, units=units)
    if not errors:
        si = units == "si"
        k = r = None
        if value_kind == "conductivity":
            k = number if si else k_ip_to_si(number or 0)
        else:
            r = number if si else r_ip_to_si(number or 0)
        try:
            add_material(session=session, organization_id=org.id, name=name, category=category,
                         conductivity_w_mk=k, r_si=r, source=source)  # fmt: skip
            return RedirectResponse("/library", status_code=303)
        except InputError as exc:
            errors["value" if exc.field in ("conductivity", "r") else exc.field] = exc.message
    form = {
        "name": name,
        "category": category,
        "value_kind": value_kind,
        "value": value,
        "units": units,
        "source": source,
    }
    context = library_context(session=session, organization_id=org.id, form=form, errors=errors)
    return render(request, "pages/library.html", context, status_code=422)
