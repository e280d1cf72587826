"""A house's photos in its export and back (the ``photos`` list of
:class:`server.documents.house_photos.HouseExport`)."""

from __future__ import annotations

import base64
import binascii
from typing import Any

from sqlalchemy.orm import Session

from server.documents.house_photos import PhotoEntry
from server.errors import InputError
from server.models import House
from server.services import photos as svc
from server.services.photo_store import PhotoStore


def photo_entries(*, session: Session, store: PhotoStore, house: House) -> list[dict[str, Any]]:
    """Each photo of the house with its file as base64 (a photo whose file is missing from the
    photo directory is left out: there is nothing to carry)."""
    slugs = {s.id: s.slug for s in house.surfaces}
    out = []
    for photo in svc.list_photos(session=session, organization_id=house.organization_id,
                                 house_id=house.id):  # fmt: skip
        path = svc.file_of(store, photo)
        if not path.is_file():
            continue
        out.append({
            "caption": photo.caption, "surface": slugs.get(photo.surface_id or 0),
            "show_on_share": photo.show_on_share, "include_in_quote": photo.include_in_quote,
            "content_type": photo.content_type,
            "data": base64.b64encode(path.read_bytes()).decode("ascii"),
        })  # fmt: skip
    return out


def import_photos(*, session: Session, store: PhotoStore, limits: svc.PhotoLimits, house: House,
                  entries: list[PhotoEntry]) -> None:  # fmt: skip
    """Add each entry as a photo of ``house`` (checked and cleaned as an upload is)."""
    by_slug = {s.slug: s.id for s in house.surfaces}
    for i, entry in enumerate(entries):
        field = f"photos[{i}]"
        try:
            data = base64.b64decode(entry.data, validate=True)
        except (binascii.Error, ValueError):
            raise InputError(f"{field}.data", "not base64 text") from None
        surface_id = None
        if entry.surface is not None:
            if entry.surface not in by_slug:
                raise InputError(f"{field}.surface", f"no surface has the id {entry.surface!r}")
            surface_id = by_slug[entry.surface]
        if len(data) > limits.photo_max_bytes:
            raise InputError(f"{field}.data", "the photo is larger than this server takes")
        try:
            svc.add_photo(session=session, store=store, limits=limits, house=house, data=data,
                          caption=entry.caption, surface_id=surface_id,
                          show_on_share=entry.show_on_share,
                          include_in_quote=entry.include_in_quote)  # fmt: skip
        except InputError as exc:
            name = "caption" if exc.field == "caption" else "data"
            raise InputError(f"{field}.{name}", exc.message) from None
