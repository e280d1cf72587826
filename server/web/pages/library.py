"""The Library page (templates/pages/library.html)."""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

from sqlalchemy.orm import Session

from server.services.library import list_materials


def library_context(
    *,
    session: Session,
    organization_id: int,
    form: Mapping[str, str] | None = None,
    errors: Mapping[str, str] | None = None,
) -> dict[str, Any]:
    """Built-in materials with their sources and the firm's own, and the add-material form."""
    materials = list_materials(session=session, organization_id=organization_id)
    return {"materials": materials, "form": form or {}, "errors": errors or {}}
