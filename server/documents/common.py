"""Shared pieces of the JSON documents: unit system, finite number types, strict base model."""

from __future__ import annotations

import math
import types
from contextvars import ContextVar
from dataclasses import dataclass
from functools import cache
from typing import Annotated, Any, Literal, Union, get_args, get_origin

from pydantic import (
    BaseModel,
    ConfigDict,
    Field,
    ModelWrapValidatorHandler,
    ValidationInfo,
    field_validator,
    model_validator,
)

from server.physics.units import IP_TO_SI
from server.services.number_text import NumberTextError, read_decimal, read_integer

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


#: the unit system of the document being validated (set while a document with ``units`` is)
_DOCUMENT_UNITS: ContextVar[str | None] = ContextVar("document_units", default=None)


def document_units(info: ValidationInfo | None = None) -> str | None:
    """``"ip"``/``"si"`` of the document being validated: ``context={"units": ...}`` given to
    ``model_validate``, else the ``units`` of the enclosing document, else None (unknown)."""
    context = info.context if info is not None else None
    if isinstance(context, dict) and context.get("units") in ("ip", "si"):
        return str(context["units"])
    return _DOCUMENT_UNITS.get()


def _number_kind(annotation: Any) -> str | None:
    if get_origin(annotation) is Annotated:
        return _number_kind(get_args(annotation)[0])
    if annotation is float:
        return "decimal"
    if annotation is int:
        return "integer"
    if get_origin(annotation) in (Union, types.UnionType):
        kinds = {_number_kind(arg) for arg in get_args(annotation) if arg is not type(None)}
        return kinds.pop() if len(kinds) == 1 else None
    return None


@cache
def _number_fields(model: type[BaseModel]) -> dict[str, str]:
    return {
        name: kind
        for name, info in model.model_fields.items()
        if (kind := _number_kind(info.annotation)) is not None
    }


@dataclass(frozen=True)
class UnitSpan:
    """Bounds of one quantity that mean the same in both unit systems.

    ``ip`` and ``si`` are (low, high) in the API's unit of each system, each the image of the
    other under the conversion :func:`server.services.convert.convert_value` applies
    (``si = ip × factor``, ``ip = si / factor``), so switching a house's units never turns a
    value one system accepts into one the other refuses.
    """

    quantity: str
    unit_ip: str
    unit_si: str
    ip: tuple[float, float]
    si: tuple[float, float]

    def check(self, value: float, units: str | None) -> float:
        """``value`` if inside the bounds of ``units`` (either system's when None)."""
        if units == "ip":
            (low, high), unit = self.ip, self.unit_ip
        elif units == "si":
            (low, high), unit = self.si, self.unit_si
        else:
            low, high = min(self.ip[0], self.si[0]), max(self.ip[1], self.si[1])
            return value if low <= value <= high else self.check(value, "ip")
        if not low <= value <= high:
            raise ValueError(f"must be between {low:.6g} and {high:.6g} {unit}")
        return value


def _image_bound(ip_value: float, factor: float, *, upper: bool) -> tuple[float, float]:
    """(ip, si) bound with si = ip × factor and si / factor back inside the ip bound."""
    step = -math.inf if upper else math.inf
    x = ip_value
    while True:
        y = x * factor
        back = y / factor
        if (back <= x) if upper else (back >= x):
            return x, y
        x = math.nextafter(x, step)


def unit_span(
    quantity: str, unit_ip: str, unit_si: str, *, low_ip: float, high_si: float
) -> UnitSpan:
    """Bounds from the looser of each end: ``low_ip`` (US units), ``high_si`` (metric)."""
    factor = IP_TO_SI[quantity]
    low = _image_bound(low_ip, factor, upper=False) if low_ip > 0 else (0.0, 0.0)
    high = _image_bound(high_si / factor, factor, upper=True)
    return UnitSpan(quantity, unit_ip, unit_si, (low[0], high[0]), (low[1], high[1]))


class Strict(BaseModel):
    """Request documents refuse unknown fields and non-finite numbers.

    A number given as a JSON string is read by the same reader as the pages' forms
    (server/services/number_text.py): ``"12,000"`` is 12000, ``"1,5"`` is 1.5 only in an SI
    document (elsewhere refused with a question), ``"1_000"``, ``"²"`` and ``"NaN"`` are refused.
    """

    model_config = ConfigDict(extra="forbid", allow_inf_nan=False)

    @field_validator("*", mode="before")
    @classmethod
    def _number_text(cls, value: Any, info: ValidationInfo) -> Any:
        if type(value) is not str or info.field_name is None:
            return value
        kind = _number_fields(cls).get(info.field_name)
        if kind is None:
            return value
        try:
            if kind == "integer":
                return read_integer(value)
            return read_decimal(value, decimal_comma=document_units(info) == "si")
        except NumberTextError as exc:
            raise ValueError(str(exc)) from None

    @model_validator(mode="wrap")
    @classmethod
    def _units_context(cls, data: Any, handler: ModelWrapValidatorHandler[Any]) -> Any:
        units = data.get("units") if isinstance(data, dict) else None
        if units not in ("ip", "si"):
            return handler(data)
        token = _DOCUMENT_UNITS.set(units)
        try:
            return handler(data)
        finally:
            _DOCUMENT_UNITS.reset(token)


class Out(BaseModel):
    """Response documents."""

    model_config = ConfigDict(extra="ignore")
