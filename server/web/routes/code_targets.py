"""Code targets page: the prescriptive table by climate zone, editable by the firm."""

from __future__ import annotations

from fastapi import APIRouter, Request
from fastapi.responses import RedirectResponse

from server.errors import InputError
from server.physics.code_targets import SURFACE_KINDS
from server.services.firm_code_targets import own_keys, reset_row, rows_for, save_row
from server.services.number_text import NumberTextError, read_integer
from server.web.deps import OrgDep, PostedFields, SessionDep, render
from server.web.forms import parse_float

router = APIRouter()
KIND_LABELS = {
    "ceiling": "Ceiling / attic", "wood_frame_wall": "Wood-frame wall", "mass_wall": "Mass wall",
    "floor": "Floor", "basement_wall": "Basement wall", "crawlspace_wall": "Crawlspace wall",
    "slab": "Slab (R, depth)", "fenestration": "Windows (U)",
}  # fmt: skip


def _context(session, org, form=None, errors=None) -> dict:  # type: ignore[no-untyped-def]
    rows = rows_for(session=session, organization_id=org.id)
    table = {(r.climate_zone, r.surface_kind): r for r in rows}
    return {"table": table, "zones": list(range(9)), "kinds": SURFACE_KINDS, "kind_labels": KIND_LABELS,
            "own": own_keys(session=session, organization_id=org.id), "form": form or {}, "errors": errors or {},
            "edition": next(iter(rows)).edition if rows else "", "nav": "code-targets"}  # fmt: skip


@router.get("/code-targets", name="code_targets")
def code_targets_page(request: Request, session: SessionDep, org: OrgDep):  # type: ignore[no-untyped-def]
    return render(request, "pages/code_targets.html", _context(session, org))


@router.post("/code-targets")
def save_code_target(request: Request, session: SessionDep, org: OrgDep, data: PostedFields):  # type: ignore[no-untyped-def]
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
    return render(
        request, "pages/code_targets.html", _context(session, org, data, errors), status_code=422
    )
