"""Calculator pages that need no saved house: pipe-insulation sizing."""

from __future__ import annotations

from fastapi import APIRouter, Request
from fastapi.responses import HTMLResponse, Response
from pydantic import ValidationError

from server.documents.pipe import PipeRequest
from server.errors import InputError, field_path
from server.services.pipe import compute_pipe
from server.web.deps import PostedFields, render
from server.web.forms import parse_float, parse_length_field
from server.web.pages.pipe_tool import pipe_tool_context
from server.web.render import page_or_fragment

router = APIRouter()

PIPE_DEFAULTS = {
    "ip": {"units": "ip", "pipe_outer_diameter": "7/8", "thickness": "3/4", "conductivity": "0.25",
           "fluid_temperature": "140", "ambient_temperature": "55", "surface_coefficient": "",
           "emissivity": "0.9", "length": "40", "hours_per_year": "3000", "target_heat_loss_per_length": ""},
    "si": {"units": "si", "pipe_outer_diameter": "22", "thickness": "19", "conductivity": "0.035",
           "fluid_temperature": "60", "ambient_temperature": "13", "surface_coefficient": "",
           "emissivity": "0.9", "length": "12", "hours_per_year": "3000", "target_heat_loss_per_length": ""},
}  # fmt: skip
_LENGTHS = ("pipe_outer_diameter", "thickness")
_OPTIONAL = ("surface_coefficient", "hours_per_year", "target_heat_loss_per_length")
_SIGNED = ("fluid_temperature", "ambient_temperature")


def _pipe_request(form: dict[str, str], errors: dict[str, str]) -> PipeRequest | None:
    units = "si" if form.get("units") == "si" else "ip"
    values: dict[str, float | None] = {}
    for key in PIPE_DEFAULTS["ip"]:
        if key == "units":
            continue
        text = form.get(key, "").strip()
        if key in _OPTIONAL and not text:
            values[key] = None
            continue
        if key in _LENGTHS:
            values[key] = parse_length_field(text, units, key, errors)
            continue
        values[key] = parse_float(text, key, errors, positive=key not in _SIGNED, units=units)
    if errors:
        return None
    body = {
        "units": units,
        "pipe_outer_diameter": values["pipe_outer_diameter"],
        "layers": [{"thickness": values["thickness"], "conductivity": values["conductivity"]}],
        "fluid_temperature": values["fluid_temperature"],
        "ambient_temperature": values["ambient_temperature"],
        "emissivity": values["emissivity"],
        "length": values["length"],
    }
    for key in _OPTIONAL:
        if values.get(key) is not None:
            body[key] = values[key]
    try:
        return PipeRequest.model_validate(body)
    except ValidationError as exc:
        for err in exc.errors():
            path = field_path(err.get("loc", ()))
            key = path.split(".")[-1] if path.startswith("layers") else path
            errors[key] = err.get("msg", "").removeprefix("Value error, ")
        return None


@router.get("/tools/pipe", name="pipe_tool")
def pipe_page(request: Request, units: str = "ip") -> HTMLResponse:
    form = dict(PIPE_DEFAULTS["si" if units == "si" else "ip"])
    errors: dict[str, str] = {}
    req = _pipe_request(form, errors)
    result = compute_pipe(req) if req else None
    return render(
        request, "pages/pipe.html", pipe_tool_context(form=form, errors=errors, result=result)
    )


@router.post("/tools/pipe")
def pipe_compute(request: Request, form: PostedFields) -> Response:
    errors: dict[str, str] = {}
    req = _pipe_request(form, errors)
    result = None
    if req is not None:
        try:
            result = compute_pipe(req)
        except InputError as exc:
            for err in exc.errors():
                errors[err.field.split(".")[-1]] = err.message
    return page_or_fragment(
        request, page="pages/pipe.html", fragment="partials/pipe_result.html",
        context=pipe_tool_context(form=form, errors=errors, result=result),
        status_code=422 if errors else 200,
    )  # fmt: skip
