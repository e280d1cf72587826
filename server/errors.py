"""One error type for every input that cannot be computed.

Services and physics raise :class:`InputError` (physics raises ``ValueError``; the service
layer re-raises it with the field path). The API turns both it and FastAPI's request-validation
errors into HTTP 422 with the body::

    {"detail": "<plain sentence about the first problem>",
     "errors": [{"field": "layers[2].thickness", "message": "must be greater than zero"}]}
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass
from typing import Any


@dataclass
class FieldError:
    field: str
    message: str


@dataclass
class InputError(Exception):
    """An input that cannot be computed. ``field`` is a dotted/indexed path (``layers[2].r``)."""

    field: str
    message: str
    more: list[FieldError] = dataclasses.field(default_factory=list)

    def __str__(self) -> str:  # pragma: no cover - repr helper
        return f"{self.field}: {self.message}"

    def errors(self) -> list[FieldError]:
        return [FieldError(self.field, self.message), *self.more]


class NotFound(Exception):
    """The object does not exist for this organization (shown as 404, never 403)."""


@dataclass
class Conflict(Exception):
    """Someone else saved the house since this form was loaded."""

    current_version: int


def field_path(loc: tuple[Any, ...] | list[Any]) -> str:
    """``("body", "layers", 2, "thickness")`` -> ``"layers[2].thickness"``."""
    out = ""
    for part in loc:
        if part in ("body", "query", "path", "form"):
            continue
        if isinstance(part, int):
            out += f"[{part}]"
        else:
            out += ("." if out else "") + str(part)
    return out or "body"
