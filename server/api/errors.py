"""The 422 body every calculator returns for input it cannot compute, and its handlers."""

from __future__ import annotations

import math
from typing import Any

from fastapi import FastAPI, Request
from fastapi.exceptions import RequestValidationError
from fastapi.responses import JSONResponse
from pydantic import BaseModel

from server.errors import InputError, field_path


class FieldProblem(BaseModel):
    field: str
    message: str


class ErrorBody(BaseModel):
    """Plain-words error: ``detail`` is one sentence, ``errors`` names each bad field."""

    detail: str
    errors: list[FieldProblem] = []


ERROR_RESPONSES: dict[int | str, dict[str, Any]] = {
    400: {
        "model": ErrorBody,
        "description": "The body could not be read at all (e.g. bytes that are not text).",
    },
    413: {
        "model": ErrorBody,
        "description": "The body is larger than the server takes (WARMSTEAD_MAX_BODY_BYTES, "
        "25 MB unless set otherwise).",
    },
    422: {
        "model": ErrorBody,
        "description": "The body is not valid JSON, or an input cannot be computed; the body says which.",
    },
    503: {
        "model": ErrorBody,
        "description": "The server is busy: the request waited 30 s for its turn. Try again after "
        "the Retry-After header's seconds.",
    },
}


#: what a route that needs a signed-in user may also answer (see server/web/deps.py)
SIGNED_IN_RESPONSES: dict[int | str, dict[str, Any]] = {
    401: {"model": ErrorBody, "description": "Not signed in (no valid session cookie)."},
    403: {
        "model": ErrorBody,
        "description": "A state-changing request without the session's CSRF token "
        "(send it in the X-CSRF-Token header).",
    },
}
NOT_FOUND_RESPONSES: dict[int | str, dict[str, Any]] = {
    404: {"model": ErrorBody, "description": "No such house in the signed-in user's firm."},
}


def _plain(error: dict[str, Any]) -> str:
    kind = error.get("type", "")
    ctx = error.get("ctx") or {}
    if kind == "missing":
        return "is required"
    if kind == "extra_forbidden":
        return "is not a field this calculator knows"
    if kind in ("finite_number",):
        return "must be a finite number (not NaN or infinity)"
    if kind in ("float_parsing", "float_type", "int_parsing", "int_type"):
        return "must be a number"
    if kind == "greater_than":
        return (
            "must be greater than zero"
            if ctx.get("gt") == 0
            else f"must be greater than {ctx.get('gt')}"
        )
    if kind == "greater_than_equal":
        return "must be zero or more" if ctx.get("ge") == 0 else f"must be at least {ctx.get('ge')}"
    if kind == "too_short":
        return f"needs at least {ctx.get('min_length')} item(s)"
    if kind == "too_long":
        return f"allows at most {ctx.get('max_length')} item(s)"
    if kind in ("string_too_long",):
        return f"must be at most {ctx.get('max_length')} characters"
    if kind == "string_pattern_mismatch":
        return "has characters that are not allowed here"
    if kind in ("model_type", "dict_type", "model_attributes_type"):
        return "must be an object"
    if kind == "list_type":
        return "must be a list"
    if kind in ("string_type",):
        return "must be text"
    if kind == "less_than":
        return f"must be less than {ctx.get('lt')}"
    if kind == "less_than_equal":
        return f"must be at most {ctx.get('le')}"
    if kind in ("literal_error", "enum"):
        return f"must be one of {ctx.get('expected', '')}".strip()
    if kind == "json_invalid":
        return "the body is not valid JSON"
    message = str(error.get("msg", "is not valid"))
    return message.removeprefix("Value error, ")


_VERBS = {"must", "is", "needs", "allows", "has"}


def _body(problems: list[FieldProblem]) -> dict[str, Any]:
    first = problems[0]
    if first.field == "body":
        lead = first.message
    elif first.message[:1].islower() and first.message.split(" ", 1)[0] in _VERBS:
        lead = f"{first.field} {first.message}"
    else:
        lead = f"{first.field}: {first.message}"
    return ErrorBody(detail=lead, errors=problems).model_dump()


def install_error_handlers(app: FastAPI) -> None:
    """Map request-validation errors and :class:`InputError` to plain-words 422 bodies."""

    @app.exception_handler(RequestValidationError)
    async def _validation(_request: Request, exc: RequestValidationError) -> JSONResponse:
        problems = []
        for err in exc.errors():
            loc = [p for p in err.get("loc", ()) if not (isinstance(p, str) and "[" in p)]
            if err.get("type") == "json_invalid":
                loc = []
            problems.append(FieldProblem(field=field_path(loc), message=_plain(err)))
        if not problems:
            problems = [FieldProblem(field="body", message="the request is not valid")]
        return JSONResponse(_body(problems), status_code=422)

    @app.exception_handler(InputError)
    async def _input(_request: Request, exc: InputError) -> JSONResponse:
        problems = [FieldProblem(field=e.field, message=e.message) for e in exc.errors()]
        return JSONResponse(_body(problems), status_code=422)


def finite(value: float, name: str = "value") -> float:
    """Raise ValueError unless ``value`` is a finite number (for pydantic validators)."""
    if not math.isfinite(value):
        raise ValueError(f"{name} must be a finite number (not NaN or infinity)")
    return value
