"""The Price book page (templates/pages/price_book.html)."""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

from sqlalchemy.orm import Session

from server.models import PriceBookItem
from server.services import price_book as book


def item_form(item: PriceBookItem) -> dict[str, str]:
    """A row as the strings its edit form shows."""
    return {"name": item.name, "upgrade_type": item.upgrade_type, "basis": item.basis,
            "units": item.units, "unit_cost": f"{item.unit_cost:g}",
            "fixed_cost": f"{item.fixed_cost:g}", "notes": item.notes}  # fmt: skip


def price_book_context(
    *,
    session: Session,
    organization_id: int,
    form: Mapping[str, str] | None = None,
    errors: Mapping[str, str] | None = None,
    edit_id: int | None = None,
    edit_form: Mapping[str, str] | None = None,
    edit_errors: Mapping[str, str] | None = None,
    message: str = "",
) -> dict[str, Any]:
    """The firm's items, each with its edit form (item ``edit_id`` shows what was typed and its
    messages), and the new-item form."""
    items = book.list_items(session=session, organization_id=organization_id)
    return {
        "items": [
            {
                "item": i,
                "example": book.is_example(i),
                "form": edit_form if i.id == edit_id and edit_form else item_form(i),
                "errors": edit_errors if i.id == edit_id and edit_errors else {},
            }  # fmt: skip
            for i in items
        ],
        "form": form or {"units": "ip", "basis": "per_area", "upgrade_type": "attic_fill"},
        "errors": errors or {},
        "types": book.UPGRADE_TYPES,
        "bases": book.BASES,
        "message": message,
        "edit_id": edit_id,
    }
