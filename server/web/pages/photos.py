"""The photos section of the House page and of a Surface page (templates/partials/photos.html)."""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

from sqlalchemy.orm import Session

from server.models import House, Surface
from server.services import photos as svc


def photos_context(
    *,
    session: Session,
    organization_id: int,
    house: House,
    surface: Surface | None = None,
    typed: Mapping[str, str] | None = None,
    errors: Mapping[str, str] | None = None,
    message: str = "",
) -> dict[str, Any]:
    """The house's photos (on a Surface page: that surface's), the upload form with what was
    typed kept, its messages, and where each form sends the auditor back."""
    rows = svc.list_photos(session=session, organization_id=organization_id, house_id=house.id,
                           surface_id=surface.id if surface is not None else None)  # fmt: skip
    back = (
        f"/houses/{house.id}/surfaces/{surface.id}"
        if surface is not None
        else f"/houses/{house.id}"
    )
    return {
        "photos": rows,
        "photo_surface": surface,
        "photo_surface_names": svc.surface_names(house),
        "photo_typed": dict(typed or {}),
        "photo_errors": dict(errors or {}),
        "photo_message": message,
        "photo_back": back,
        "photo_max_side": svc.MAX_SIDE,
    }  # fmt: skip
