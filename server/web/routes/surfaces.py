"""Surface page: the layer editor (one form; htmx swaps the editor fragment)."""

from __future__ import annotations

from typing import Any, cast

from fastapi import APIRouter, Request
from fastapi.responses import HTMLResponse, RedirectResponse
from sqlalchemy.orm import Session
from starlette.responses import Response

from server.documents.assembly import AssemblyResult
from server.documents.common import Units
from server.errors import InputError
from server.models import House, Organization, Surface
from server.services import houses as svc
from server.services.library import catalog_for
from server.services.surface_details import save_surface_details
from server.web.deps import OrgDep, PostedFields, SessionDep, render
from server.web.editor import run_editor
from server.web.forms import form_version
from server.web.layer_form import form_from_document
from server.web.pages.pipe_run import pipe_run_context
from server.web.pages.surface import saved_result, surface_context
from server.web.render import is_htmx, page_or_fragment
from server.web.saving import save_or_rerender

router = APIRouter()


def _load(
    session: Session, org: Organization, house_id: int, surface_id: int
) -> tuple[House, Surface]:
    house = svc.get_house(session=session, organization_id=org.id, house_id=house_id)
    surface = svc.get_surface(
        session=session, organization_id=org.id, house_id=house_id, surface_id=surface_id
    )
    return house, surface


@router.get("/houses/{house_id}/surfaces/{surface_id}", name="surface")
def surface_page(
    request: Request, session: SessionDep, org: OrgDep, house_id: int, surface_id: int
) -> HTMLResponse:
    house, surface = _load(session, org, house_id, surface_id)
    if surface.kind == "pipe_run":
        return render(
            request, "pages/pipe_run.html", pipe_run_context(house=house, surface=surface)
        )
    catalog = catalog_for(session=session, organization_id=org.id)
    form = form_from_document(surface.assembly, cast(Units, house.units))
    result = saved_result(house=house, surface=surface, catalog=catalog)
    context = surface_context(session=session, organization_id=org.id, house=house, surface=surface,
                              form=form, result=result, catalog=catalog)  # fmt: skip
    return render(request, "pages/surface.html", context)


@router.post("/houses/{house_id}/surfaces/{surface_id}/assembly")
def save_assembly(
    request: Request,
    session: SessionDep,
    org: OrgDep,
    data: PostedFields,
    house_id: int,
    surface_id: int,
) -> Response:
    house, surface = _load(session, org, house_id, surface_id)
    catalog = catalog_for(session=session, organization_id=org.id)

    def save(doc: dict[str, Any], version: int | None) -> AssemblyResult:
        return svc.save_assembly(session=session, house=house, surface=surface, assembly=doc,
                                 catalog=catalog, expected_version=version)  # fmt: skip

    form, result, message, status = run_editor(data, units=cast(Units, house.units), save=save)
    if not is_htmx(request) and status == 200:
        return RedirectResponse(f"/houses/{house.id}/surfaces/{surface.id}", status_code=303)
    ctx = surface_context(session=session, organization_id=org.id, house=house, surface=surface,
                          form=form, result=result, catalog=catalog, message=message)  # fmt: skip
    ctx["saved"] = status == 200  # the fragment then says which house version it stored
    return page_or_fragment(request, page="pages/surface.html", fragment="partials/layer_editor.html",
                            context=ctx, status_code=status)  # fmt: skip


@router.post("/houses/{house_id}/surfaces/{surface_id}")
def update_surface(
    request: Request,
    session: SessionDep,
    org: OrgDep,
    data: PostedFields,
    house_id: int,
    surface_id: int,
) -> Response:
    house, surface = _load(session, org, house_id, surface_id)
    catalog = catalog_for(session=session, organization_id=org.id)
    deleting = data.get("action") == "delete"

    def rerender(errors: dict[str, str], status: int) -> Response:
        if surface.kind == "pipe_run":  # no layers to show: the pipe run's own page
            ctx = pipe_run_context(house=house, surface=surface,
                                   insulate_errors={"form": " ".join(errors.values())})  # fmt: skip
            return render(request, "pages/pipe_run.html", ctx, status_code=status)
        form = form_from_document(surface.assembly, cast(Units, house.units))
        result = saved_result(house=house, surface=surface, catalog=catalog)
        ctx = surface_context(session=session, organization_id=org.id, house=house, surface=surface,
                              form=form, result=result, catalog=catalog,
                              details_typed=None if deleting else dict(data),
                              details_errors=errors)  # fmt: skip
        ctx["detail_errors"], ctx["detail_form"] = errors, (None if deleting else data)
        return render(request, "pages/surface.html", ctx, status_code=status)

    try:
        version = form_version(data)
    except InputError as exc:
        return rerender({exc.field: exc.message}, 422)
    if deleting:
        return save_or_rerender(
            call=lambda: svc.delete_surface(session=session, house=house, surface=surface,
                                            expected_version=version),
            saved=lambda _: RedirectResponse(f"/houses/{house.id}", status_code=303),
            rerender=rerender, not_done="nothing was deleted",
        )  # fmt: skip
    return save_or_rerender(
        call=lambda: save_surface_details(session=session, house=house, surface=surface, data=data,
                                          catalog=catalog, expected_version=version),
        saved=lambda _: RedirectResponse(f"/houses/{house.id}/surfaces/{surface.id}", status_code=303),
        rerender=rerender,
    )  # fmt: skip
