"""The Pipes tool page (templates/pages/pipe.html; partials/pipe_result.html for htmx)."""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

from server.documents.pipe import PipeResult


def pipe_tool_context(
    *, form: Mapping[str, str], errors: Mapping[str, str], result: PipeResult | None
) -> dict[str, Any]:
    """The form as typed, its messages, and the computed loss when it could be computed."""
    return {"form": form, "errors": errors, "result": result, "nav": "pipe"}
