"""A saved house's export: the house document with its photos (``GET /api/v1/houses/{id}/document``,
``POST /api/v1/houses``).

``photos`` is there only when the house has photos, so the export of a house without any is the
very document ``POST /api/v1/calc/house`` takes; ask for ``?photos=false`` to leave them out of
one that has some. Each photo is its cleaned file (no metadata: :mod:`server.services.photos`)
as base64, its caption, the two choices and the slug of its surface (none: the house's own).
"""

from __future__ import annotations

from typing import Literal

from pydantic import Field

from server.documents.common import Slug, Strict
from server.documents.house import HouseDocument

#: base64 of the largest photo the settings can allow at import (4/3 × 10 MB, with room)
MAX_BASE64_CHARS = 16 * 1024 * 1024


class PhotoEntry(Strict):
    """One photo of the house (or of one of its surfaces)."""

    caption: str = Field(default="", max_length=200)
    surface: Slug | None = Field(default=None, description="the surface's id; none: the house's")
    show_on_share: bool = Field(default=False, description="shown on the homeowner's link")
    include_in_quote: bool = Field(default=False, description="printed on the quote")
    content_type: Literal["image/jpeg", "image/png"]
    data: str = Field(max_length=MAX_BASE64_CHARS, description="the image file, base64")


class HouseExport(HouseDocument):
    """The house document, and the house's photos when it has some."""

    photos: list[PhotoEntry] = Field(default_factory=list, max_length=500)
