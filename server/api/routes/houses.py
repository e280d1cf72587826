"""Saved houses as JSON documents: export and import (the calc/house document, with the
house's photos when it has some: :mod:`server.documents.house_photos`)."""

from __future__ import annotations

from fastapi import APIRouter, Depends, Query, Request
from fastapi.responses import JSONResponse

from server.api.errors import ERROR_RESPONSES, NOT_FOUND_RESPONSES, SIGNED_IN_RESPONSES
from server.deps import SessionDep, get_organization
from server.documents.house_photos import HouseExport
from server.models import Organization
from server.services.house_document import house_export, import_house
from server.services.houses import get_house
from server.services.photo_store import PhotoStore
from server.services.photos import PhotoLimits

router = APIRouter(tags=["houses"])


@router.get(
    "/houses/{house_id}/document",
    response_model=HouseExport,
    responses={**ERROR_RESPONSES, **SIGNED_IN_RESPONSES, **NOT_FOUND_RESPONSES},
)
def export_house(
    request: Request,
    house_id: int,
    session: SessionDep,
    org: Organization = Depends(get_organization),
    photos: bool = Query(True, description="carry the house's photos (base64) when it has some"),
) -> JSONResponse:
    """The saved house as the same document POST /calc/house takes, and its photos (a
    ``photos`` list, only when the house has photos and ``photos`` is not false)."""
    house = get_house(session=session, organization_id=org.id, house_id=house_id)
    store = PhotoStore(request.app.state.settings.photo_path())
    return JSONResponse(house_export(house, session=session, store=store, photos=photos))


@router.post("/houses", status_code=201, responses={**ERROR_RESPONSES, **SIGNED_IN_RESPONSES})
def import_house_document(
    request: Request,
    document: HouseExport,
    session: SessionDep,
    org: Organization = Depends(get_organization),
) -> dict[str, int | str]:
    """Create a saved house from a document (with its photos, when it has some); returns its
    id and page."""
    settings = request.app.state.settings
    into = (PhotoStore(settings.photo_path()), PhotoLimits.of(settings))
    house = import_house(session=session, organization_id=org.id, document=document,
                         photos_into=into)  # fmt: skip
    return {"id": house.id, "url": f"/houses/{house.id}"}
