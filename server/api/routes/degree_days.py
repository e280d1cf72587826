"""POST /api/v1/calc/degree-days: degree-days of an uploaded weather file (stateless)."""

from __future__ import annotations

import io
from typing import Annotated, BinaryIO, Literal

from fastapi import APIRouter, File, Form, Query, UploadFile
from starlette.concurrency import run_in_threadpool

from server.api.errors import ERROR_RESPONSES
from server.documents.climate import DegreeDaysResult
from server.errors import InputError
from server.services.climate import compute_degree_days

router = APIRouter(tags=["calculators"])

#: Largest upload taken [bytes]: a year of hourly EPW is ~1.5 MB (common practice); a file
#: with more rows than a weather year is refused as soon as they are read, whatever its size.
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
    """Read the file and compute; the form fields win over the same-named query options.

    The upload is read from its spooled temporary file one bounded line at a time (in the
    threadpool): a file longer than a weather year is refused before the rest is read.
    """
    # A client that sends the file's text as a plain form field gets it read the same way
    # (Starlette bounds such a field at 1 MB).
    data: BinaryIO = io.BytesIO(file.encode()) if isinstance(file, str) else file.file
    size = None if isinstance(file, str) else file.size
    if (size if size is not None else _stream_size(data)) > MAX_UPLOAD_BYTES:
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


def _stream_size(stream: BinaryIO) -> int:
    """Bytes from the stream's position to its end (the position is kept)."""
    at = stream.tell()
    end = stream.seek(0, io.SEEK_END)
    stream.seek(at)
    return end - at
