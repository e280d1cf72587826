"""Houses list and House page."""

from __future__ import annotations

from fastapi import APIRouter, Form, Request
from fastapi.responses import HTMLResponse, RedirectResponse, Response

from server.errors import InputError
from server.services import house_units
from server.services import houses as svc
from server.services import idempotency as idem
from server.web.deps import CurrentUser, OrgDep, SessionDep, render
from server.web.forms import form_version, parse_float
from server.web.pages.house import house_context, houses_context
from server.web.render import page_or_fragment
from server.web.saving import save_or_rerender

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

    def rerender(errors: dict[str, str], status: int) -> Response:
        context = house_context(session=session, organization_id=org.id, house_id=house_id)
        context["form"] = {"name": name, "kind": kind, "area": area, "typical": typical}
        context["errors"] = errors
        return render(request, "pages/house.html", context, status_code=status)

    if errors:
        return rerender(errors, 422)

    def work() -> str:
        surface = svc.add_surface(
            session=session, house=house, name=name, kind=kind, area=area_value or 0.0,
            typical=typical or None, expected_version=form_version({"version": version}),
        )  # fmt: skip
        return f"/houses/{house.id}/surfaces/{surface.id}"

    def add() -> str:  # the same form posted again answers with the surface it added first
        location, _ = idem.once(session=session, organization_id=org.id, user_id=user.id,
                                key=idem.read_key(idempotency_key), purpose="surface", work=work)  # fmt: skip
        return location

    return save_or_rerender(call=add, saved=_see_other, rerender=rerender)


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

    def rerender(errors: dict[str, str], status: int) -> Response:
        context = house_context(session=session, organization_id=org.id, house_id=house_id)
        context["errors"] = errors
        return render(request, "pages/house.html", context, status_code=status)

    def switch() -> str:  # a stale tab is a conflict even when it asks for the units shown now
        if units in ("ip", "si"):
            house_units.switch_units(
                session=session,
                house=house,
                units=units,  # type: ignore[arg-type]
                expected_version=version,
            )
        return f"/houses/{house.id}"

    return save_or_rerender(call=switch, saved=_see_other, rerender=rerender, conflict_key="units",
                            not_done="the units were not switched", then="Here it is as saved now.")  # fmt: skip


def _see_other(location: str) -> RedirectResponse:
    return RedirectResponse(location, status_code=303)
