"""Shared pieces of the JSON documents: unit system, finite number types, strict base model."""

from __future__ import annotations

from typing import Annotated, Literal

from pydantic import BaseModel, ConfigDict, Field

Units = Literal["ip", "si"]

#: a finite number (NaN and infinity refused)
Number = Annotated[float, Field(allow_inf_nan=False)]
#: a finite number greater than zero
Positive = Annotated[float, Field(gt=0, allow_inf_nan=False)]
#: a finite number, zero or more
NonNegative = Annotated[float, Field(ge=0, allow_inf_nan=False)]
#: a finite share in [0, 1)
Fraction01 = Annotated[float, Field(ge=0, lt=1, allow_inf_nan=False)]
Name = Annotated[str, Field(max_length=120)]
Slug = Annotated[str, Field(min_length=1, max_length=80, pattern=r"^[a-z0-9][a-z0-9-]*$")]


class Strict(BaseModel):
    """Request documents refuse unknown fields and non-finite numbers."""

    model_config = ConfigDict(extra="forbid", allow_inf_nan=False)


class Out(BaseModel):
    """Response documents."""

    model_config = ConfigDict(extra="ignore")
