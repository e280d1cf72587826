"""Pipe runs of a saved house: add one, see its loss, propose insulation."""

from __future__ import annotations

from fastapi import APIRouter, Request
from fastapi.responses import RedirectResponse, Response

from server.errors import InputError
from server.services import houses as svc
from server.services import idempotency as idem
from server.services import system_sections as sys_svc
from server.services import upgrades as upg
from server.web.deps import CurrentUser, OrgDep, PostedFields, SessionDep, render
from server.web.forms import form_version, parse_float, parse_length_field
from server.web.pages.house import house_context
from server.web.pages.pipe_run import pipe_run_context
from server.web.saving import save_or_rerender
from server.web.systems_forms import parse_pipe_service

router = APIRouter()


def parse_pipe_form(data: dict[str, str], units: str) -> tuple[dict, dict[str, str]]:
    errors: dict[str, str] = {}
    values = {
        "length": parse_float(data.get("length", ""), "length", errors, units=units),
        "hours_per_year": parse_float(data.get("hours_per_year", ""), "hours_per_year", errors, units=units),
        "pipe_outer_diameter": parse_length_field(data.get("pipe_outer_diameter", ""), units, "pipe_outer_diameter", errors),
        "fluid_temperature": parse_float(data.get("fluid_temperature", ""), "fluid_temperature", errors, positive=False, units=units),
        "ambient_temperature": parse_float(data.get("ambient_temperature", ""), "ambient_temperature", errors, positive=False, units=units),
        "thickness": parse_length_field(data.get("thickness", ""), units, "thickness", errors, required=False),
        "conductivity": parse_float(data["conductivity"], "conductivity", errors, units=units) if data.get("conductivity", "").strip() else None,
    }  # fmt: skip
    if (values["thickness"] is None) != (values["conductivity"] is None) and not errors:
        errors["conductivity" if values["conductivity"] is None else "thickness"] = (
            "give both the existing insulation's thickness and its k, or neither (bare pipe)"
        )
    return values, errors


def _see_other(location: str) -> RedirectResponse:
    return RedirectResponse(location, status_code=303)


@router.post("/houses/{house_id}/pipes")
def add_pipe_run(
    request: Request, session: SessionDep, org: OrgDep, user: CurrentUser, data: PostedFields,
    house_id: int,
) -> Response:  # fmt: skip
    house = svc.get_house(session=session, organization_id=org.id, house_id=house_id)
    values, errors = parse_pipe_form(data, house.units)

    def rerender(errors: dict[str, str], status: int) -> Response:
        ctx = house_context(session=session, organization_id=org.id, house_id=house.id)
        ctx["pipe_errors"], ctx["pipe_form"] = errors, data
        return render(request, "pages/house.html", ctx, status_code=status)

    if errors:
        return rerender(errors, 422)
    layers = (
        []
        if values["thickness"] is None
        else [{"thickness": values["thickness"], "conductivity": values["conductivity"]}]
    )
    pipe = {"pipe_outer_diameter": values["pipe_outer_diameter"], "layers": layers,
            "fluid_temperature": values["fluid_temperature"], "ambient_temperature": values["ambient_temperature"]}  # fmt: skip

    def work() -> str:
        surface = svc.add_pipe_run(session=session, house=house, name=data.get("name", ""), length=values["length"],
                                   pipe=pipe, hours_per_year=values["hours_per_year"],
                                   expected_version=form_version(data))  # fmt: skip
        return f"/houses/{house.id}/surfaces/{surface.id}"

    def add() -> str:  # the same form posted again answers with the pipe run it added first
        location, _ = idem.once(session=session, organization_id=org.id, user_id=user.id,
                                key=idem.read_key(data), purpose="pipe_run", work=work)  # fmt: skip
        return location

    return save_or_rerender(call=add, saved=_see_other, rerender=rerender,
                            field_key=lambda field: field.split(".")[-1])  # fmt: skip


@router.post("/houses/{house_id}/pipes/{surface_id}/insulate")
def insulate_pipe(
    request: Request,
    session: SessionDep,
    org: OrgDep,
    user: CurrentUser,
    data: PostedFields,
    house_id: int,
    surface_id: int,
) -> Response:
    house = svc.get_house(session=session, organization_id=org.id, house_id=house_id)
    surface = svc.get_surface(
        session=session, organization_id=org.id, house_id=house.id, surface_id=surface_id
    )
    errors: dict[str, str] = {}
    thickness = parse_length_field(data.get("thickness", ""), house.units, "thickness", errors)
    conductivity = parse_float(
        data.get("conductivity", ""), "conductivity", errors, units=house.units
    )

    def rerender(errors: dict[str, str], status: int) -> Response:
        ctx = pipe_run_context(house=house, surface=surface, insulate_form=data,
                               insulate_errors=errors)  # fmt: skip
        return render(request, "pages/pipe_run.html", ctx, status_code=status)

    if errors:
        return rerender(errors, 422)

    def work() -> str:
        upgrade = upg.add_pipe_insulation(session=session, house=house, surface=surface, name=data.get("name", ""),
                                          thickness=thickness or 0.0, conductivity=conductivity or 0.0,
                                          expected_version=form_version(data))  # fmt: skip
        return f"/houses/{house.id}/upgrades/{upgrade.id}"

    def insulate() -> str:  # the same form posted again answers with the upgrade it made first
        location, _ = idem.once(session=session, organization_id=org.id, user_id=user.id,
                                key=idem.read_key(data), purpose="pipe_insulation", work=work)  # fmt: skip
        return location

    return save_or_rerender(call=insulate, saved=_see_other, rerender=rerender)


@router.post("/houses/{house_id}/pipes/{surface_id}/service")
def save_pipe_service(
    request: Request,
    session: SessionDep,
    org: OrgDep,
    data: PostedFields,
    house_id: int,
    surface_id: int,
) -> Response:
    """What the pipe carries, where it runs, its bare surface (no JavaScript needed)."""
    house = svc.get_house(session=session, organization_id=org.id, house_id=house_id)
    surface = svc.get_surface(
        session=session, organization_id=org.id, house_id=house.id, surface_id=surface_id
    )
    values, errors = parse_pipe_service(data, units=house.units, house=house)
    try:
        version = form_version(data)
    except InputError as exc:
        values, errors = None, {**errors, "form": exc.message}

    def rerender(errors: dict[str, str], status: int) -> Response:
        ctx = pipe_run_context(house=house, surface=surface, service_form=data,
                               service_errors=errors)  # fmt: skip
        # as before: any message at the form's head (a malformed version mark, a field the
        # form does not show) is answered 409 like the conflict
        status = 409 if "form" in errors else status
        return render(request, "pages/pipe_run.html", ctx, status_code=status)

    def form_key(field: str) -> str:  # the verb's path, as the form names the field
        key = field.replace("water_heater.", "heater_").split(".")[-1]
        return key if key in data else "form"

    if values is None:
        return rerender(errors, 422)
    return save_or_rerender(
        call=lambda: sys_svc.save_pipe_service(house=house, surface=surface, values=values,
                                               expected_version=version),
        saved=lambda _: _see_other(f"/houses/{house.id}/surfaces/{surface.id}#carries"),
        rerender=rerender, field_key=form_key,
    )  # fmt: skip
