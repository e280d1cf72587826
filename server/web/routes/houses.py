"""Houses list and House page."""

from __future__ import annotations

from fastapi import APIRouter, Form, Request
from fastapi.responses import HTMLResponse, RedirectResponse, Response

from server.errors import InputError
from server.services import house_units
from server.services import houses as svc
from server.services import idempotency as idem
from server.web.conflicts import rejected_status, stale_form
from server.web.deps import CurrentUser, OrgDep, SessionDep, render
from server.web.forms import form_version, parse_float
from server.web.pages.house import house_context, houses_context
from server.web.render import page_or_fragment

router = APIRouter()


@router.get("/")
def home() -> RedirectResponse:
    return RedirectResponse("/houses", status_code=303)


@router.get("/houses", name="houses")
def houses_page(request: Request, session: SessionDep, org: OrgDep, q: str = "") -> Response:
    context = houses_context(session=session, organization_id=org.id, query=q)
    return page_or_fragment(
        request, page="pages/houses.html", fragment="partials/house_list.html", context=context
    )


@router.post("/houses")
def create_house(
    request: Request,
    session: SessionDep,
    org: OrgDep,
    user: CurrentUser,
    label: str = Form(""),
    address: str = Form(""),
    units: str = Form("ip"),
    idempotency_key: str = Form(""),
) -> Response:
    def work() -> str:
        house = svc.create_house(
            session=session,
            organization_id=org.id,
            label=label,
            address=address,
            units=units,  # type: ignore[arg-type]
        )
        return f"/houses/{house.id}"

    try:  # the same form posted again answers with the house it made the first time
        location, _ = idem.once(session=session, organization_id=org.id, user_id=user.id,
                                key=idem.read_key(idempotency_key), purpose="house", work=work)  # fmt: skip
    except InputError as exc:
        form = {"label": label, "address": address, "units": units}
        context = houses_context(session=session, organization_id=org.id, form=form,
                                 errors={exc.field: exc.message})  # fmt: skip
        return render(request, "pages/houses.html", context, status_code=422)
    return RedirectResponse(location, status_code=303)


@router.get("/houses/{house_id}", name="house")
def house_page(request: Request, session: SessionDep, org: OrgDep, house_id: int) -> HTMLResponse:
    context = house_context(session=session, organization_id=org.id, house_id=house_id)
    return render(request, "pages/house.html", context)


@router.post("/houses/{house_id}/surfaces")
def add_surface(
    request: Request,
    session: SessionDep,
    org: OrgDep,
    user: CurrentUser,
    house_id: int,
    name: str = Form(""),
    kind: str = Form(""),
    area: str = Form(""),
    typical: str = Form(""),
    version: str = Form(""),
    idempotency_key: str = Form(""),
) -> Response:
    house = svc.get_house(session=session, organization_id=org.id, house_id=house_id)
    errors: dict[str, str] = {}
    area_value = parse_float(area, "area", errors, units=house.units)
    if not errors:

        def work() -> str:
            surface = svc.add_surface(
                session=session, house=house, name=name, kind=kind, area=area_value or 0.0,
                typical=typical or None, expected_version=form_version({"version": version}),
            )  # fmt: skip
            return f"/houses/{house.id}/surfaces/{surface.id}"

        try:  # the same form posted again answers with the surface it added the first time
            location, _ = idem.once(session=session, organization_id=org.id, user_id=user.id,
                                    key=idem.read_key(idempotency_key), purpose="surface", work=work)  # fmt: skip
            return RedirectResponse(location, status_code=303)
        except InputError as exc:
            errors[exc.field] = exc.message
        except svc.Conflict:
            errors["form"] = stale_form()
    context = house_context(session=session, organization_id=org.id, house_id=house_id)
    context["form"] = {"name": name, "kind": kind, "area": area, "typical": typical}
    context["errors"] = errors
    return render(request, "pages/house.html", context, status_code=rejected_status(errors))


@router.post("/houses/{house_id}/units")
def switch_units(
    request: Request,
    session: SessionDep,
    org: OrgDep,
    house_id: int,
    units: str = Form(...),
    version: int | None = Form(None),
) -> Response:
    house = svc.get_house(session=session, organization_id=org.id, house_id=house_id)
    if units in ("ip", "si"):
        try:  # a stale tab is a conflict even when it asks for the units shown now
            house_units.switch_units(
                session=session,
                house=house,
                units=units,  # type: ignore[arg-type]
                expected_version=version,
            )
        except svc.Conflict:
            context = house_context(session=session, organization_id=org.id, house_id=house_id)
            context["errors"] = {"units": stale_form("the units were not switched",
                                                     then="Here it is as saved now.")}  # fmt: skip
            return render(request, "pages/house.html", context, status_code=409)
    return RedirectResponse(f"/houses/{house.id}", status_code=303)
