"""Photos of what was found: upload, show, edit, delete; and the homeowner's shown ones.

Each form answers htmx with the photos card (templates/partials/photos.html) and a plain post
with a 303 back to the page it came from (a rejected upload: that page, with the message and
the caption kept, 422). Images are served only to the firm's signed-in users (someone else's
photo is a 404), and on a share link only those marked to be shown there.
"""

from __future__ import annotations

from typing import Any, cast

from fastapi import APIRouter, Request
from fastapi.responses import RedirectResponse
from sqlalchemy.orm import Session
from starlette.datastructures import UploadFile
from starlette.responses import FileResponse, Response

from server.documents.common import Units
from server.errors import InputError, NotFound
from server.models import House, Organization, Photo, Surface
from server.services import houses as house_svc
from server.services import idempotency as idem
from server.services import photos as svc
from server.services import sharing
from server.services.library import catalog_for
from server.services.number_text import NumberTextError, read_integer
from server.services.photo_store import PhotoStore
from server.web.deps import CurrentUser, OrgDep, PostedForm, SessionDep, render
from server.web.layer_form import form_from_document
from server.web.pages.house import house_context
from server.web.pages.photos import photos_context
from server.web.pages.surface import saved_result, surface_context
from server.web.render import is_htmx

router = APIRouter()
#: the firm's own images: never in a shared cache; a photo's file never changes (a new photo
#: gets a new id), so the browser may keep it for a day
PRIVATE_IMAGE = {"Cache-Control": "private, max-age=86400"}
#: a photo on a share link: the shared view's own headers (no Referer, no caching, no indexing)
SHARED_HEADERS = {
    "Referrer-Policy": "no-referrer",
    "Cache-Control": "no-store",
    "X-Robots-Tag": "noindex, nofollow",
}


def _store(request: Request) -> PhotoStore:
    return PhotoStore(request.app.state.settings.photo_path())


def _surface_on_page(house: House, value: object) -> Surface | None:
    """The surface whose page a form came from ("" or anything else: the House page)."""
    try:
        surface_id = read_integer(str(value or ""))
    except NumberTextError:
        return None
    return svc.surface_of(house, surface_id)


def _answer(request: Request, session: Session, org: Organization, house: House,
            surface: Surface | None, *, typed: dict[str, str] | None = None,
            errors: dict[str, str] | None = None, message: str = "") -> Response:  # fmt: skip
    """htmx: the card; a plain post: 303 back to the page, or that page at 422 with the
    message when the form was refused."""
    ctx = photos_context(session=session, organization_id=org.id, house=house, surface=surface,
                         typed=typed, errors=errors, message=message)  # fmt: skip
    if is_htmx(request):
        return render(request, "partials/photos.html", {**ctx, "house": house})
    if not errors:
        back = ctx["photo_back"]
        return RedirectResponse(f"{back}#photos", status_code=303)
    return render(request, *_page(session, org, house, surface, ctx), status_code=422)


def _page(session: Session, org: Organization, house: House, surface: Surface | None,
          ctx: dict[str, Any]) -> tuple[str, dict[str, Any]]:  # fmt: skip
    if surface is None or surface.kind == "pipe_run":
        page = house_context(session=session, organization_id=org.id, house_id=house.id)
        return "pages/house.html", {**page, **ctx}
    catalog = catalog_for(session=session, organization_id=org.id)
    form = form_from_document(surface.assembly, cast(Units, house.units))
    result = saved_result(house=house, surface=surface, catalog=catalog)
    page = surface_context(session=session, organization_id=org.id, house=house, surface=surface,
                           form=form, result=result, catalog=catalog)  # fmt: skip
    return "pages/surface.html", {**page, **ctx}


@router.post("/houses/{house_id}/photos")
def add_photo(
    request: Request, session: SessionDep, org: OrgDep, user: CurrentUser, form: PostedForm,
    house_id: int,
) -> Response:  # fmt: skip
    """A photo from the tablet's camera (or a file), with its caption, for the house or one
    of its surfaces (``surface_id``)."""
    house = house_svc.get_house(session=session, organization_id=org.id, house_id=house_id)
    caption = str(form.get("caption") or "")
    surface = _surface_on_page(house, form.get("surface_id"))
    raw_surface = str(form.get("surface_id") or "").strip()
    upload = form.get("photo")
    try:
        if raw_surface and surface is None:
            raise InputError("surface_id", "that surface is not part of this house")
        if not isinstance(upload, UploadFile) or not (upload.filename or upload.size):
            raise InputError("photo", "choose a photo first")
        limits = svc.PhotoLimits.of(request.app.state.settings)
        data = svc.read_upload(upload.file, limits=limits)  # refused past the limit

        def work() -> str:
            svc.add_photo(session=session, store=_store(request), limits=limits, house=house,
                          data=data, caption=caption, surface_id=surface.id if surface else None)  # fmt: skip
            return f"/houses/{house.id}#photos"

        # the same form sent again (a resend from the outbox after a lost answer) adds no second
        _location, repeated = idem.once(session=session, organization_id=org.id, user_id=user.id,
                                        key=idem.read_key(str(form.get(idem.FIELD) or "")),
                                        purpose="photo", work=work)  # fmt: skip
    except InputError as exc:
        return _answer(request, session, org, house, surface, typed={"caption": caption},
                       errors={exc.field: exc.message})  # fmt: skip
    message = "This photo was added already." if repeated else "Photo added."
    return _answer(request, session, org, house, surface, message=message)


def _image(photo: Photo, store: PhotoStore, headers: dict[str, str]) -> Response:
    path = svc.file_of(store, photo)
    if not path.is_file():
        return Response("This photo's file is missing.", status_code=404,
                        media_type="text/plain", headers=headers)  # fmt: skip
    return FileResponse(path, media_type=photo.content_type, headers=headers,
                        content_disposition_type="inline")  # fmt: skip


@router.get("/houses/{house_id}/photos/{photo_id}", name="photo_image")
def photo_image(
    request: Request, session: SessionDep, org: OrgDep, house_id: int, photo_id: int
) -> Response:
    """The image (signed in, same firm; anything else is a 404)."""
    photo = svc.get_photo(session=session, organization_id=org.id, house_id=house_id,
                          photo_id=photo_id)  # fmt: skip
    return _image(photo, _store(request), PRIVATE_IMAGE)


@router.post("/houses/{house_id}/photos/{photo_id}")
def update_photo(
    request: Request, session: SessionDep, org: OrgDep, form: PostedForm, house_id: int,
    photo_id: int,
) -> Response:  # fmt: skip
    """The caption and the two choices: shown on the homeowner's link, put on the quote."""
    house = house_svc.get_house(session=session, organization_id=org.id, house_id=house_id)
    photo = svc.get_photo(session=session, organization_id=org.id, house_id=house.id,
                          photo_id=photo_id)  # fmt: skip
    surface = _surface_on_page(house, form.get("on_surface"))
    caption = str(form.get("caption") or "")
    try:
        svc.clean_caption(caption)
    except InputError as exc:
        return _answer(request, session, org, house, surface, errors={"edit": exc.message})
    svc.update_photo(photo=photo, caption=caption, show_on_share=bool(form.get("show_on_share")),
                     include_in_quote=bool(form.get("include_in_quote")))  # fmt: skip
    session.flush()
    return _answer(request, session, org, house, surface, message="Photo saved.")


@router.post("/houses/{house_id}/photos/{photo_id}/delete")
def delete_photo(
    request: Request, session: SessionDep, org: OrgDep, form: PostedForm, house_id: int,
    photo_id: int,
) -> Response:  # fmt: skip
    house = house_svc.get_house(session=session, organization_id=org.id, house_id=house_id)
    photo = svc.get_photo(session=session, organization_id=org.id, house_id=house.id,
                          photo_id=photo_id)  # fmt: skip
    svc.delete_photo(session=session, store=_store(request), photo=photo)
    surface = _surface_on_page(house, form.get("on_surface"))
    return _answer(request, session, org, house, surface, message="Photo deleted.")


@router.get("/s/{token}/photos/{photo_id}", name="shared_photo")
def shared_photo(request: Request, session: SessionDep, token: str, photo_id: int) -> Response:
    """A photo on the homeowner's link: only one of that link's house marked to be shown."""
    link = sharing.resolve_token(session=session, token=token)
    photo = None
    if link is not None:
        try:
            photo = svc.get_photo(session=session, organization_id=link.organization_id,
                                  house_id=link.house_id, photo_id=photo_id)  # fmt: skip
        except NotFound:
            photo = None
    if photo is None or not photo.show_on_share:
        return Response("Not found.", status_code=404, media_type="text/plain",
                        headers=SHARED_HEADERS)  # fmt: skip
    return _image(photo, _store(request), SHARED_HEADERS)
