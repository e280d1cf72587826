"""Surface page: the layer editor (one form; htmx swaps the editor fragment)."""

from __future__ import annotations

from fastapi import APIRouter, Request
from fastapi.responses import RedirectResponse

from server.documents.assembly import AssemblyInput
from server.errors import InputError
from server.services import houses as svc
from server.services.assembly import evaluate_assembly
from server.services.cautions import cautions_for
from server.services.code_check import code_verdict
from server.services.firm_code_targets import rows_for
from server.services.library import catalog_for, list_materials
from server.services.moisture import check_assembly_moisture
from server.services.typical import typical_assemblies
from server.web.deps import OrgDep, PostedFields, SessionDep, render
from server.web.editor import run_editor
from server.web.forms import form_version, parse_float
from server.web.layer_form import (
    CAVITY_TYPES,
    LAYER_TYPES,
    AssemblyForm,
    form_from_document,
)
from server.web.svg_condensation import condensation_svg

router = APIRouter()


def _moisture(house, surface, result, catalog):  # type: ignore[no-untyped-def]
    """The dew-point check of the saved assembly, or None when it cannot be computed."""
    if result is None:
        return None
    try:
        doc = AssemblyInput.model_validate(surface.assembly)
        design = ((house.climate or {}).get("weather") or {}).get("heating_design_temperature")
        check = check_assembly_moisture(doc, result, units=house.units, catalog=catalog,
                                        outdoor_design_temperature=design)  # fmt: skip
    except (ValueError, InputError):
        return None
    return {"check": check, "svg": condensation_svg(check.result, units=house.units)}


def _context(
    session, org, house, surface, form: AssemblyForm, result, message: str = "", *, catalog
) -> dict:  # type: ignore[no-untyped-def]
    return {
        "moisture": None if form.has_errors else _moisture(house, surface, result, catalog),
        "code": code_verdict(
            house.climate, surface.kind, result, rows_for(session=session, organization_id=org.id)
        ),
        "cautions": cautions_for([surface.kind]),
        "house": house,
        "surface": surface,
        "editor_url": f"/houses/{house.id}/surfaces/{surface.id}/assembly",
        "upgrades": [u for u in house.upgrades if u.surface_id == surface.id],
        "form": form,
        "result": result,
        "message": message,
        "layer_types": LAYER_TYPES,
        "cavity_types": CAVITY_TYPES,
        "materials": list_materials(session=session, organization_id=org.id),
        "kinds": svc.SURFACE_KINDS,
        "typicals": typical_assemblies(),
        "units": house.units,
    }


def pipe_run_context(session, org, house, surface) -> dict:  # type: ignore[no-untyped-def]
    """A pipe run's page: its loss (same code path as /calc/pipe), its upgrades, cautions."""
    result = next((r for s, r in svc.pipe_rows(house) if s.id == surface.id), None)
    return {
        "house": house, "surface": surface, "result": result if not isinstance(result, str) else None,
        "error": result if isinstance(result, str) else None, "units": house.units,
        "upgrades": [u for u in house.upgrades if u.surface_id == surface.id],
        "cautions": cautions_for(["pipe_run"]), "insulate_errors": {}, "insulate_form": {},
    }  # fmt: skip


def _load(session, org, house_id: int, surface_id: int):  # type: ignore[no-untyped-def]
    house = svc.get_house(session=session, organization_id=org.id, house_id=house_id)
    surface = svc.get_surface(
        session=session, organization_id=org.id, house_id=house_id, surface_id=surface_id
    )
    return house, surface


@router.get("/houses/{house_id}/surfaces/{surface_id}", name="surface")
def surface_page(
    request: Request, session: SessionDep, org: OrgDep, house_id: int, surface_id: int
):  # type: ignore[no-untyped-def]
    house, surface = _load(session, org, house_id, surface_id)
    if surface.kind == "pipe_run":
        return render(
            request, "pages/pipe_run.html", pipe_run_context(session, org, house, surface)
        )
    catalog = catalog_for(session=session, organization_id=org.id)
    form = form_from_document(surface.assembly, house.units)
    try:
        result = evaluate_assembly(
            AssemblyInput.model_validate(surface.assembly), units=house.units, catalog=catalog
        )
    except (InputError, ValueError):
        result = None
    return render(
        request,
        "pages/surface.html",
        _context(session, org, house, surface, form, result, catalog=catalog),
    )


@router.post("/houses/{house_id}/surfaces/{surface_id}/assembly")
def save_assembly(
    request: Request,
    session: SessionDep,
    org: OrgDep,
    data: PostedFields,
    house_id: int,
    surface_id: int,
):  # type: ignore[no-untyped-def]
    house, surface = _load(session, org, house_id, surface_id)
    catalog = catalog_for(session=session, organization_id=org.id)

    def save(doc: dict, version: int | None):  # type: ignore[no-untyped-def]
        return svc.save_assembly(session=session, house=house, surface=surface, assembly=doc,
                                 catalog=catalog, expected_version=version)  # fmt: skip

    form, result, message, status = run_editor(data, units=house.units, save=save)
    if not request.headers.get("HX-Request") and status == 200:
        return RedirectResponse(f"/houses/{house.id}/surfaces/{surface.id}", status_code=303)
    template = (
        "partials/layer_editor.html" if request.headers.get("HX-Request") else "pages/surface.html"
    )
    # htmx swaps 200 responses only by default: return 200 with the messages in the fragment.
    code = 200 if request.headers.get("HX-Request") else status
    ctx = _context(session, org, house, surface, form, result, message, catalog=catalog)
    ctx["saved"] = status == 200  # the fragment then says which house version it stored
    return render(request, template, ctx, status_code=code)


@router.post("/houses/{house_id}/surfaces/{surface_id}")
def update_surface(
    request: Request,
    session: SessionDep,
    org: OrgDep,
    data: PostedFields,
    house_id: int,
    surface_id: int,
):  # type: ignore[no-untyped-def]
    house, surface = _load(session, org, house_id, surface_id)
    errors: dict[str, str] = {}
    try:
        version = form_version(data)
    except InputError as exc:
        version, errors[exc.field] = None, exc.message
    if data.get("action") == "delete" and not errors:
        try:
            svc.delete_surface(
                session=session, house=house, surface=surface, expected_version=version
            )
            return RedirectResponse(f"/houses/{house.id}", status_code=303)
        except svc.Conflict:
            errors["form"] = "Someone else saved this house after you opened it; nothing was deleted."
    deleting = data.get("action") == "delete"
    area = None if deleting else parse_float(data.get("area", ""), "area", errors, units=house.units)
    if not errors:
        try:
            svc.update_surface(
                session=session, house=house, surface=surface, name=data.get("name", ""),
                kind=data.get("kind", surface.kind), area=area or 0.0, expected_version=version,
            )  # fmt: skip
        except InputError as exc:
            errors[exc.field] = exc.message
        except svc.Conflict:
            errors["form"] = "Someone else saved this house after you opened it; nothing was saved."
    if errors:
        catalog = catalog_for(session=session, organization_id=org.id)
        form = form_from_document(surface.assembly, house.units)
        result = evaluate_assembly(
            AssemblyInput.model_validate(surface.assembly), units=house.units, catalog=catalog
        )
        ctx = _context(session, org, house, surface, form, result, catalog=catalog)
        ctx["detail_errors"], ctx["detail_form"] = errors, (None if deleting else data)
        status = 409 if "form" in errors else 422  # someone else's save came first
        return render(request, "pages/surface.html", ctx, status_code=status)
    return RedirectResponse(f"/houses/{house.id}/surfaces/{surface.id}", status_code=303)
