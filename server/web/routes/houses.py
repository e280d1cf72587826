"""Houses list and House page."""

from __future__ import annotations

from fastapi import APIRouter, Form, Request
from fastapi.responses import RedirectResponse

from server.errors import InputError
from server.services import houses as svc
from server.services import idempotency as idem
from server.services.library import catalog_for
from server.services.typical import typical_assemblies
from server.web.deps import CurrentUser, OrgDep, SessionDep, render
from server.web.forms import form_version, parse_float

router = APIRouter()


@router.get("/")
def home() -> RedirectResponse:
    return RedirectResponse("/houses", status_code=303)


@router.get("/houses", name="houses")
def houses_page(request: Request, session: SessionDep, org: OrgDep, q: str = ""):  # type: ignore[no-untyped-def]
    rows = svc.list_houses(session=session, organization_id=org.id, query=q)
    template = (
        "partials/house_list.html" if request.headers.get("HX-Request") else "pages/houses.html"
    )
    return render(request, template, {"rows": rows, "q": q, "form": {}, "errors": {}})


@router.post("/houses")
def create_house(  # type: ignore[no-untyped-def]
    request: Request,
    session: SessionDep,
    org: OrgDep,
    user: CurrentUser,
    label: str = Form(""),
    address: str = Form(""),
    units: str = Form("ip"),
    idempotency_key: str = Form(""),
):
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
        rows = svc.list_houses(session=session, organization_id=org.id)
        form = {"label": label, "address": address, "units": units}
        return render(
            request, "pages/houses.html",
            {"rows": rows, "q": "", "form": form, "errors": {exc.field: exc.message}}, status_code=422,
        )  # fmt: skip
    return RedirectResponse(location, status_code=303)


def _house_context(session, org, house_id: int) -> dict:  # type: ignore[no-untyped-def]
    house = svc.get_house(session=session, organization_id=org.id, house_id=house_id)
    catalog = catalog_for(session=session, organization_id=org.id)
    from server.services.firm_code_targets import rows_for

    rows, total_ua = svc.surface_rows(
        house, catalog, rows_for(session=session, organization_id=org.id)
    )
    from server.web.routes.house_settings import settings_context
    from server.web.routes.sharing import share_context

    return {
        **settings_context(house),
        **share_context(session=session, organization_id=org.id, house=house),
        "house": house,
        "rows": rows,
        "total_ua": total_ua,
        "pipes": svc.pipe_rows(house),
        "kinds": svc.SURFACE_KINDS,
        "typicals": typical_assemblies(),
        "form": {},
        "errors": {},
    }


@router.get("/houses/{house_id}", name="house")
def house_page(request: Request, session: SessionDep, org: OrgDep, house_id: int):  # type: ignore[no-untyped-def]
    return render(request, "pages/house.html", _house_context(session, org, house_id))


@router.post("/houses/{house_id}/surfaces")
def add_surface(  # type: ignore[no-untyped-def]
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
):
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
            errors["form"] = (
                "Someone else changed this house since you opened it. Your entry is kept below; "
                "check the list and add it again."
            )
    context = _house_context(session, org, house_id)
    context["form"] = {"name": name, "kind": kind, "area": area, "typical": typical}
    context["errors"] = errors
    return render(
        request, "pages/house.html", context, status_code=422 if "form" not in errors else 409
    )


@router.post("/houses/{house_id}/units")
def switch_units(  # type: ignore[no-untyped-def]
    request: Request,
    session: SessionDep,
    org: OrgDep,
    house_id: int,
    units: str = Form(...),
    version: int | None = Form(None),
):
    house = svc.get_house(session=session, organization_id=org.id, house_id=house_id)
    if units in ("ip", "si"):
        try:  # a stale tab is a conflict even when it asks for the units shown now
            svc.switch_units(session=session, house=house, units=units, expected_version=version)  # type: ignore[arg-type]
        except svc.Conflict:
            context = _house_context(session, org, house_id)
            context["errors"] = {"units": "Someone else changed this house since you opened it, "
                                 "so the units were not switched. Here it is as saved now."}  # fmt: skip
            return render(request, "pages/house.html", context, status_code=409)
    return RedirectResponse(f"/houses/{house.id}", status_code=303)
