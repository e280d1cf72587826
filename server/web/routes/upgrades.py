"""Upgrades (a new assembly for a surface, air sealing) and packages of a saved house."""

from __future__ import annotations

from collections.abc import Callable
from typing import Any, cast

from fastapi import APIRouter, Request
from fastapi.responses import HTMLResponse, RedirectResponse
from sqlalchemy.orm import Session
from starlette.responses import Response

from server.documents.assembly import AssemblyResult
from server.documents.common import Units
from server.errors import InputError
from server.models import House, Surface
from server.services import houses as svc
from server.services import idempotency as idem
from server.services import upgrade_forms as forms
from server.services import upgrades as upg
from server.services.library import catalog_for
from server.services.number_text import NumberTextError, read_integer
from server.web.deps import CurrentUser, OrgDep, PostedFields, PostedForm, SessionDep, render
from server.web.editor import run_editor
from server.web.forms import form_version, parse_float
from server.web.layer_form import form_from_document
from server.web.pages.house import house_context
from server.web.pages.surface import saved_result, surface_context
from server.web.pages.upgrade import upgrade_context
from server.web.render import is_htmx, page_or_fragment
from server.web.saving import save_or_rerender

router = APIRouter()
Once = Callable[[str, Callable[[], str]], Callable[[], str]]


def _number(
    data: dict[str, str], key: str, errors: dict[str, str], *, optional: bool = True,
    units: str = "ip",
) -> float | None:  # fmt: skip
    text = data.get(key, "").strip()
    if not text:
        if not optional:
            errors[key] = "required"
        return None if optional else 0.0
    return parse_float(text, key, errors, positive=False, units=units)


def _surface_id(data: dict[str, str]) -> int:
    typed = data.get("surface_id", "")
    try:
        return read_integer(typed or "0", low=0)
    except NumberTextError:
        raise InputError(
            "surface_id", f"'{typed}' is not a surface of this house: choose one from the list"
        ) from None


def _see_other(location: str) -> RedirectResponse:
    return RedirectResponse(location, status_code=303)


def _house_page(request: Request, session: Session, org_id: int, house: House,
                data: dict[str, str], errors: dict[str, str], status: int) -> Response:  # fmt: skip
    """The House page with the upgrade form as typed and its messages."""
    ctx = house_context(session=session, organization_id=org_id, house_id=house.id)
    ctx["upgrade_errors"], ctx["upgrade_form"] = errors, data
    return render(request, "pages/house.html", ctx, status_code=status)


def _add_kind(
    request: Request, session: Session, org_id: int, house: House, data: dict[str, str], once: Once
) -> Response:
    """A ground, window or duct upgrade from the House page or a Surface page (``back``)."""
    part, units = data["kind"], house.units
    surface: Surface | None = None

    def rerender(errors: dict[str, str], status: int) -> Response:
        if data.get("back") == "surface" and surface is not None:
            catalog = catalog_for(session=session, organization_id=org_id)
            form = form_from_document(surface.assembly, cast(Units, units))
            ctx = surface_context(session=session, organization_id=org_id, house=house, surface=surface, form=form,
                                  result=saved_result(house=house, surface=surface, catalog=catalog), catalog=catalog)  # fmt: skip
            ctx["upgrade_errors"], ctx["upgrade_form"] = errors, data
            return render(request, "pages/surface.html", ctx, status_code=status)
        return _house_page(request, session, org_id, house, data, errors, status)

    if part in forms.PART_SURFACES:
        try:
            surface_id = _surface_id(data)
        except InputError as exc:
            return rerender({exc.field: exc.message}, 422)
        surface = svc.get_surface(session=session, organization_id=org_id, house_id=house.id,
                                  surface_id=surface_id)  # fmt: skip
    errors: dict[str, str] = {}
    fixed = _number(data, "cost_fixed", errors, units=units) or 0.0
    per_area = _number(data, "cost_per_area", errors, units=units) or 0.0
    change: dict[str, Any] = {}
    try:
        change = forms.read_change(part, data, units=units, surface=surface,
                                   ducts=(house.heating or {}).get("ducts"))  # fmt: skip
    except forms.ChangeError as exc:
        errors.update(exc.errors)
    if errors:
        return rerender(errors, 422)
    catalog = catalog_for(session=session, organization_id=org_id)

    def work() -> str:
        upgrade = upg.add_kind_upgrade(session=session, house=house, surface=surface, part=part,
                                       name=data.get("name", ""), change=change, fixed=fixed,
                                       per_area=per_area, catalog=catalog,
                                       expected_version=form_version(data))  # fmt: skip
        return f"/houses/{house.id}/upgrades/{upgrade.id}"

    return save_or_rerender(call=once(f"upgrade:{part}", work), saved=_see_other, rerender=rerender)


@router.post("/houses/{house_id}/upgrades")
def add_upgrade(
    request: Request, session: SessionDep, org: OrgDep, user: CurrentUser, data: PostedFields,
    house_id: int,
) -> Response:  # fmt: skip
    house = svc.get_house(session=session, organization_id=org.id, house_id=house_id)

    def once(purpose: str, work: Callable[[], str]) -> Callable[[], str]:
        """The same form posted again answers with the upgrade it made the first time."""

        def add() -> str:
            location, _ = idem.once(session=session, organization_id=org.id, user_id=user.id,
                                    key=idem.read_key(data), purpose=purpose, work=work)  # fmt: skip
            return location

        return add

    def rerender(errors: dict[str, str], status: int) -> Response:
        return _house_page(request, session, org.id, house, data, errors, status)

    kind = data.get("kind", "")
    if kind in forms.FORM_KINDS:
        return _add_kind(request, session, org.id, house, data, once)
    if kind == "air_sealing":
        errors: dict[str, str] = {}
        units = house.units
        target = _number(data, "cfm50_after", errors, optional=False, units=units)
        fixed = _number(data, "cost_fixed", errors, units=units) or 0.0
        rebate = _number(data, "rebate", errors, units=units) or 0.0
        life = _number(data, "life_years", errors, units=units)
        if errors:
            return rerender(errors, 422)

        def sealing() -> str:
            upg.add_air_sealing(session=session, house=house, name=data.get("name", ""), cfm50_after=target or 0.0,
                                fixed=fixed, rebate=rebate, life_years=life, expected_version=form_version(data))  # fmt: skip
            return f"/houses/{house.id}#upgrades"

        return save_or_rerender(
            call=once("air_sealing", sealing), saved=_see_other, rerender=rerender
        )
    try:
        surface_id = _surface_id(data)
    except InputError as exc:
        return rerender({exc.field: exc.message}, 422)
    surface = svc.get_surface(session=session, organization_id=org.id, house_id=house.id,
                              surface_id=surface_id)  # fmt: skip

    def assembly() -> str:
        upgrade = upg.add_assembly_upgrade(session=session, house=house, surface=surface, name=data.get("name", ""),
                                           start=data.get("start", "as_found"), expected_version=form_version(data))  # fmt: skip
        return f"/houses/{house.id}/upgrades/{upgrade.id}"

    return save_or_rerender(
        call=once("assembly_upgrade", assembly), saved=_see_other, rerender=rerender
    )


@router.get("/houses/{house_id}/upgrades/{upgrade_id}", name="upgrade")
def upgrade_page(
    request: Request, session: SessionDep, org: OrgDep, house_id: int, upgrade_id: int
) -> HTMLResponse:
    house = svc.get_house(session=session, organization_id=org.id, house_id=house_id)
    upgrade = upg.get_upgrade(house, upgrade_id)
    context = upgrade_context(session=session, organization_id=org.id, house=house, upgrade=upgrade)
    return render(request, "pages/upgrade.html", context)


@router.post("/houses/{house_id}/upgrades/{upgrade_id}")
def update_upgrade(
    request: Request,
    session: SessionDep,
    org: OrgDep,
    data: PostedFields,
    house_id: int,
    upgrade_id: int,
) -> Response:
    house = svc.get_house(session=session, organization_id=org.id, house_id=house_id)
    upgrade = upg.get_upgrade(house, upgrade_id)

    def rerender(errors: dict[str, str], status: int) -> Response:
        ctx = upgrade_context(session=session, organization_id=org.id, house=house, upgrade=upgrade,
                              errors=errors)  # fmt: skip
        ctx["detail_form"] = data
        return render(request, "pages/upgrade.html", ctx, status_code=status)

    if data.get("action") == "delete":
        return save_or_rerender(
            call=lambda: upg.delete_upgrade(session=session, house=house, upgrade=upgrade,
                                            expected_version=form_version(data)),
            saved=lambda _: _see_other(f"/houses/{house.id}#upgrades"), rerender=rerender,
        )  # fmt: skip
    errors: dict[str, str] = {}
    units = house.units
    fixed = _number(data, "cost_fixed", errors, units=units) or 0.0
    per_area = _number(data, "cost_per_area", errors, units=units) or 0.0
    rebate = _number(data, "rebate", errors, units=units) or 0.0
    life = _number(data, "life_years", errors, units=units)
    part, change, catalog = forms.change_part(upgrade), None, None
    if part is not None:
        try:
            change = forms.read_change(part, data, units=units, surface=None,
                                       ducts=(house.heating or {}).get("ducts"))  # fmt: skip
        except forms.ChangeError as exc:
            errors.update(exc.errors)
        catalog = catalog_for(session=session, organization_id=org.id)
    if errors:
        return rerender(errors, 422)
    return save_or_rerender(
        call=lambda: upg.update_upgrade(session=session, house=house, upgrade=upgrade, name=data.get("name", ""),
                                        fixed=fixed, per_area=per_area, rebate=rebate, life_years=life,
                                        expected_version=form_version(data), change=change, catalog=catalog),
        saved=lambda _: _see_other(f"/houses/{house.id}/upgrades/{upgrade.id}"), rerender=rerender,
    )  # fmt: skip


@router.post("/houses/{house_id}/upgrades/{upgrade_id}/assembly")
def save_upgrade_assembly(
    request: Request,
    session: SessionDep,
    org: OrgDep,
    data: PostedFields,
    house_id: int,
    upgrade_id: int,
) -> Response:
    house = svc.get_house(session=session, organization_id=org.id, house_id=house_id)
    upgrade = upg.get_upgrade(house, upgrade_id)
    if not upg.edits_assembly(upgrade):
        raise svc.NotFound
    catalog = catalog_for(session=session, organization_id=org.id)

    def save(doc: dict[str, Any], version: int | None) -> AssemblyResult:
        return upg.save_upgrade_assembly(session=session, house=house, upgrade=upgrade, assembly=doc,
                                         catalog=catalog, expected_version=version)  # fmt: skip

    units = cast(Units, house.units)  # the column holds only 'ip' or 'si'
    form, result, message, status = run_editor(data, units=units, save=save)
    if not is_htmx(request) and status == 200:
        return RedirectResponse(f"/houses/{house.id}/upgrades/{upgrade.id}", status_code=303)
    ctx = upgrade_context(session=session, organization_id=org.id, house=house, upgrade=upgrade,
                          form=form, result=result, message=message, catalog=catalog)  # fmt: skip
    ctx["saved"] = status == 200  # the fragment then says which house version it stored
    return page_or_fragment(request, page="pages/upgrade.html", fragment="partials/layer_editor.html",
                            context=ctx, status_code=status)  # fmt: skip


def _package_id(text: str) -> int:
    try:
        return read_integer(text, low=0)
    except NumberTextError:
        raise InputError("package", "unknown package") from None


@router.post("/houses/{house_id}/packages")
def add_package(
    request: Request,
    session: SessionDep,
    org: OrgDep,
    user: CurrentUser,
    form: PostedForm,
    data: PostedFields,
    house_id: int,
) -> Response:
    house = svc.get_house(session=session, organization_id=org.id, house_id=house_id)

    def rerender(errors: dict[str, str], status: int) -> Response:
        return _house_page(request, session, org.id, house, data, errors, status)

    def save() -> str:
        if data.get("action", "").startswith("delete:"):
            upg.delete_package(session=session, house=house, package_id=_package_id(data["action"][7:]),
                               expected_version=form_version(data))  # fmt: skip
            return f"/houses/{house.id}#packages"

        def work() -> str:
            upg.add_package(session=session, house=house, name=data.get("name", ""),
                            upgrade_slugs=[str(v) for v in form.getlist("upgrades")], expected_version=form_version(data))  # fmt: skip
            return f"/houses/{house.id}#packages"

        # the same form posted again answers as the first time, with no second package
        location, _ = idem.once(session=session, organization_id=org.id, user_id=user.id,
                                key=idem.read_key(data), purpose="package", work=work)  # fmt: skip
        return location

    # every message of the package form is shown beside its list of upgrades
    return save_or_rerender(call=save, saved=_see_other, rerender=rerender, conflict_key="package",
                            field_key=lambda _: "package")  # fmt: skip
