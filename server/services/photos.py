"""Photos of what was found: checked, cleaned, kept, listed, shown, deleted.

An upload is taken only when Pillow reads it as an image. It is then rebuilt from its pixels
alone: turned upright by its EXIF orientation first (``ImageOps.exif_transpose``), scaled so its
long side is at most :data:`MAX_SIDE` px, and written as a new JPEG (quality 85), or a PNG when
it came as one, with no EXIF, GPS, ICC, XMP or comment block: a photo's location never reaches
the disk. Limits come from the settings: the upload's size (``photo_max_bytes``), all of a
house's photos together (``house_photo_max_bytes``), and :data:`MAX_PIXELS` against
decompression bombs (the size is read from the header, before any pixel is decoded).
"""

from __future__ import annotations

import io
import warnings
from dataclasses import dataclass
from pathlib import Path
from typing import BinaryIO

from PIL import Image, ImageOps, UnidentifiedImageError
from sqlalchemy import delete, func, select
from sqlalchemy.orm import Session

from server.config import Settings
from server.errors import InputError, NotFound
from server.models import House, Photo, ShareLink, Surface
from server.services.photo_store import PhotoStore, new_storage_key

MAX_SIDE = 2000  #: the long side kept [px]; the tablet resizes to the same before sending
MAX_PIXELS = 50_000_000  #: the largest image decoded (e.g. 8,660 × 5,773 px)
MAX_CAPTION = 200
JPEG_QUALITY = 85
NOT_AN_IMAGE = "this file is not an image: take or choose a photo (JPEG or PNG)"


@dataclass(frozen=True)
class PhotoLimits:
    """Per upload and per house [bytes]."""

    photo_max_bytes: int
    house_max_bytes: int

    @classmethod
    def of(cls, settings: Settings) -> PhotoLimits:
        return cls(settings.photo_max_bytes, settings.house_photo_max_bytes)


@dataclass(frozen=True)
class CleanImage:
    """An image rebuilt from its pixels, ready to store."""

    data: bytes
    content_type: str
    width: int
    height: int


def _megabytes(n: int) -> str:
    return f"{n / (1024 * 1024):.0f} MB" if n >= 1024 * 1024 else f"{n / 1024:.0f} KB"


def read_upload(stream: BinaryIO, *, limits: PhotoLimits) -> bytes:
    """At most ``photo_max_bytes`` of the uploaded file; InputError when it is larger."""
    data = stream.read(limits.photo_max_bytes + 1)
    if len(data) > limits.photo_max_bytes:
        raise InputError(
            "photo",
            f"the photo is larger than {_megabytes(limits.photo_max_bytes)}: take it again at a "
            "lower resolution, or let the page shrink it (it does when scripts run)",
        )
    if not data:
        raise InputError("photo", "choose a photo first")
    return data


def clean_image(data: bytes) -> CleanImage:
    """``data`` as a new JPEG or PNG with no metadata, upright, long side ≤ MAX_SIDE px."""
    try:
        with warnings.catch_warnings():  # our own, lower pixel limit is checked below
            warnings.simplefilter("ignore", Image.DecompressionBombWarning)
            image = Image.open(io.BytesIO(data))
    except Image.DecompressionBombError:
        raise InputError("photo", _too_many_pixels("the image")) from None
    except (UnidentifiedImageError, OSError, SyntaxError, ValueError):
        raise InputError("photo", NOT_AN_IMAGE) from None
    width, height = image.size
    if width * height > MAX_PIXELS:  # read from the header: nothing decoded yet
        raise InputError("photo", _too_many_pixels(f"the image is {width} × {height} px,"))
    as_png = image.format == "PNG"
    try:
        if image.format == "JPEG":  # decode at a reduced scale when that is enough
            image.draft("RGB", (MAX_SIDE, MAX_SIDE))
        image.load()
    except (OSError, SyntaxError, ValueError):  # truncated or corrupt
        raise InputError("photo", NOT_AN_IMAGE) from None
    upright = ImageOps.exif_transpose(image) or image
    upright.thumbnail((MAX_SIDE, MAX_SIDE), Image.Resampling.LANCZOS)
    pixels = _pixels_for(upright, as_png=as_png)
    out = io.BytesIO()
    if as_png:
        pixels.save(out, format="PNG", optimize=True)
    else:
        pixels.save(out, format="JPEG", quality=JPEG_QUALITY, optimize=True)
    return CleanImage(out.getvalue(), "image/png" if as_png else "image/jpeg", *pixels.size)


def _too_many_pixels(what: str) -> str:
    return f"{what} more than the {MAX_PIXELS // 1_000_000} million pixels taken"


def _pixels_for(image: Image.Image, *, as_png: bool) -> Image.Image:
    """A new image holding only the pixels (``Image.frombytes``: empty ``info``, so no EXIF,
    ICC profile, text chunk or comment can be carried into the saved file)."""
    keep = ("RGB", "RGBA", "L", "LA") if as_png else ("RGB", "L")
    if image.mode not in keep:
        if not as_png and ("A" in image.mode or image.mode == "P"):
            rgba = image.convert("RGBA")
            flat = Image.new("RGB", rgba.size, (255, 255, 255))
            flat.paste(rgba, mask=rgba.getchannel("A"))
            image = flat
        else:
            image = image.convert("RGBA" if as_png and "A" in image.mode else "RGB")
    return Image.frombytes(image.mode, image.size, image.tobytes())


def clean_caption(caption: str) -> str:
    text = " ".join(caption.split())
    if len(text) > MAX_CAPTION:
        raise InputError(
            "caption", f"keep the caption to {MAX_CAPTION} characters (it has {len(text)})"
        )
    return text


def house_bytes(*, session: Session, house_id: int) -> int:
    total = session.scalar(
        select(func.coalesce(func.sum(Photo.bytes), 0)).where(Photo.house_id == house_id)
    )
    return int(total or 0)  # fmt: skip


def list_photos(
    *, session: Session, organization_id: int, house_id: int, surface_id: int | None = None
) -> list[Photo]:
    """The house's photos, oldest first; with ``surface_id`` only that surface's."""
    query = select(Photo).where(
        Photo.organization_id == organization_id, Photo.house_id == house_id
    )
    if surface_id is not None:
        query = query.where(Photo.surface_id == surface_id)
    return list(session.scalars(query.order_by(Photo.created_at, Photo.id)))  # fmt: skip


def get_photo(*, session: Session, organization_id: int, house_id: int, photo_id: int) -> Photo:
    photo = session.get(Photo, photo_id) if 0 < photo_id < 2**63 else None
    if photo is None or photo.organization_id != organization_id or photo.house_id != house_id:
        raise NotFound
    return photo


def add_photo(
    *,
    session: Session,
    store: PhotoStore,
    limits: PhotoLimits,
    house: House,
    data: bytes,
    caption: str = "",
    surface_id: int | None = None,
    show_on_share: bool = False,
    include_in_quote: bool = False,
) -> Photo:
    """Check and clean ``data``, write its file, add its row (InputError names the field)."""
    text = clean_caption(caption)
    if surface_id is not None and not any(s.id == surface_id for s in house.surfaces):
        raise InputError("surface_id", "that surface is not part of this house")
    image = clean_image(data)
    used = house_bytes(session=session, house_id=house.id)
    if used + len(image.data) > limits.house_max_bytes:
        raise InputError(
            "photo",
            f"this house's photos already take {_megabytes(used)} of the "
            f"{_megabytes(limits.house_max_bytes)} a house may hold: delete some first",
        )
    key = new_storage_key()
    photo = Photo(organization_id=house.organization_id, house_id=house.id, surface_id=surface_id,
                  caption=text, storage_key=key, content_type=image.content_type,
                  width=image.width, height=image.height, bytes=len(image.data),
                  show_on_share=show_on_share, include_in_quote=include_in_quote)  # fmt: skip
    store.write(file_of(store, photo), image.data, session=session)
    session.add(photo)
    session.flush()
    return photo


def file_of(store: PhotoStore, photo: Photo) -> Path:
    return store.path(photo.organization_id, photo.house_id, photo.storage_key, photo.content_type)


def update_photo(
    *, photo: Photo, caption: str, show_on_share: bool, include_in_quote: bool
) -> Photo:
    photo.caption = clean_caption(caption)
    photo.show_on_share = show_on_share
    photo.include_in_quote = include_in_quote
    return photo


def delete_photo(*, session: Session, store: PhotoStore, photo: Photo) -> None:
    """Delete the row now and its file once the deletion is committed."""
    store.remove_after_commit(session, file_of(store, photo))
    session.delete(photo)
    session.flush()


def delete_house(
    *, session: Session, store: PhotoStore, organization_id: int, house_id: int
) -> None:
    """Delete a house (its rows go by the database's cascades) and, once committed, its photos'
    directory."""
    house = session.get(House, house_id)
    if house is None or house.organization_id != organization_id:
        raise NotFound
    store.remove_after_commit(session, store.house_dir(organization_id, house_id))
    session.expunge(house)
    # one DELETE: the database's cascades take surfaces, upgrades, packages, links and photos
    session.execute(delete(House).where(House.id == house_id))


def shared_photos(*, session: Session, link: ShareLink) -> list[Photo]:
    """The photos of a share link's house the auditor marked as shown."""
    return [p for p in list_photos(session=session, organization_id=link.organization_id,
                                   house_id=link.house_id) if p.show_on_share]  # fmt: skip


def quote_photos(*, session: Session, house: House) -> list[Photo]:
    """The house's photos chosen for the quote."""
    return [p for p in list_photos(session=session, organization_id=house.organization_id,
                                   house_id=house.id) if p.include_in_quote]  # fmt: skip


def surface_names(house: House) -> dict[int, str]:
    return {s.id: s.name for s in house.surfaces}


def surface_of(house: House, surface_id: int | None) -> Surface | None:
    return next((s for s in house.surfaces if s.id == surface_id), None)
