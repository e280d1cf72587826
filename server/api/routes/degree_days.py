"""POST /api/v1/calc/degree-days: degree-days of an uploaded weather file (stateless)."""

from __future__ import annotations

from typing import Annotated, Literal

from fastapi import APIRouter, File, Form, Query, UploadFile
from starlette.concurrency import run_in_threadpool

from server.api.errors import ERROR_RESPONSES
from server.documents.climate import DegreeDaysResult
from server.errors import InputError
from server.services.climate import compute_degree_days

router = APIRouter(tags=["calculators"])

#: Largest upload read [bytes]: a year of hourly EPW is ~1.5 MB, so 20 MB leaves room for
#: several years or minute data (common practice).
MAX_UPLOAD_BYTES = 20 * 1024 * 1024

OptionalBase = Annotated[
    float | None,
    Form(allow_inf_nan=False, description="Base temperature in the request's units."),
]


@router.post(
    "/calc/degree-days",
    response_model=DegreeDaysResult,
    responses=ERROR_RESPONSES,
    summary="Degree-days, design temperatures and climate zone of a weather file",
)
async def calc_degree_days(
    file: Annotated[
        UploadFile | str,
        File(description="EPW, TMY3, or CSV with a timestamp and a temperature"),
    ],
    units: Annotated[Literal["ip", "si"], Form()],
    heating_base: OptionalBase = None,
    cooling_base: OptionalBase = None,
    temperature_column: Annotated[
        str | None, Form(max_length=200, description="CSV only: the temperature column's name")
    ] = None,
    temperature_unit: Annotated[
        str | None, Form(max_length=20, description="CSV only: C or F")
    ] = None,
    temperature_column_query: Annotated[
        str | None, Query(alias="temperature_column", max_length=200)
    ] = None,
    temperature_unit_query: Annotated[
        str | None, Query(alias="temperature_unit", max_length=20)
    ] = None,
) -> DegreeDaysResult:
    """Read the file and compute; the form fields win over the same-named query options."""
    # A client that sends the file's text as a plain form field gets it read the same way.
    too_big = not isinstance(file, str) and (file.size or 0) > MAX_UPLOAD_BYTES
    data = b"" if too_big else await _read(file)
    if too_big or len(data) > MAX_UPLOAD_BYTES:
        raise InputError(
            field="file",
            message=f"the file is larger than {MAX_UPLOAD_BYTES // (1024 * 1024)} MB; upload "
            "one year of hourly or daily data",
        )
    return await run_in_threadpool(
        compute_degree_days,
        data,
        units=units,
        heating_base=heating_base,
        cooling_base=cooling_base,
        temperature_column=temperature_column or temperature_column_query,
        temperature_unit=temperature_unit or temperature_unit_query,
    )


async def _read(file: UploadFile | str) -> bytes:
    """The upload's bytes, at most one byte past the limit (so the limit can be told)."""
    if isinstance(file, str):
        return file.encode()
    return await file.read(MAX_UPLOAD_BYTES + 1)
