"""The House page's share-links section (templates/partials/share_links.html, key ``share``)."""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

import segno
from sqlalchemy.orm import Session

from server.models import House, utcnow
from server.services import sharing


def qr_svg(url: str) -> str:
    """The link as an inline SVG QR code (no style attributes, so a strict CSP allows it)."""
    code = segno.make(url, error="m")
    return code.svg_inline(
        scale=5, border=2, dark="#1b2730", light="#ffffff", svgclass="qr",
        title="QR code of the homeowner's link",
    )  # fmt: skip


def _when(moment: Any) -> str:
    return moment.strftime("%Y-%m-%d") if moment else "—"


def share_context(
    *,
    session: Session,
    organization_id: int,
    house: House,
    new: Mapping[str, Any] | None = None,
    form: Mapping[str, str] | None = None,
    errors: Mapping[str, str] | None = None,
    repeated: bool = False,
) -> dict[str, Any]:
    """The firm's links to the house with their status; ``new`` is a link just made (its URL
    and QR code, shown once), ``repeated`` says a resubmitted form made no second link."""
    now = utcnow()
    rows = []
    links = sharing.list_links(session=session, organization_id=organization_id, house_id=house.id)
    for link in links:
        if link.revoked_at is not None:
            status = "revoked " + _when(link.revoked_at)
        elif not sharing.is_active(link, now=now):
            status = "expired"
        else:
            status = "active"
        rows.append({"id": link.id, "label": link.label or "—", "created": _when(link.created_at),
                     "expires": _when(link.expires_at), "views": link.view_count,
                     "last_viewed": _when(link.last_viewed_at), "status": status,
                     "active": status == "active"})  # fmt: skip
    share: dict[str, Any] = {
        "rows": rows,
        "new": new,
        "form": form or {"label": "", "days_valid": str(sharing.DEFAULT_DAYS)},
        "errors": errors or {},
        "max_days": sharing.MAX_DAYS,
    }
    if repeated:
        share["repeated"] = True
    return {"house": house, "share": share}
