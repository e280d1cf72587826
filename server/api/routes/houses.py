"""Saved houses as JSON documents: export and import (the calc/house document)."""

from __future__ import annotations

from fastapi import APIRouter, Depends

from server.api.errors import ERROR_RESPONSES, NOT_FOUND_RESPONSES, SIGNED_IN_RESPONSES
from server.deps import SessionDep, get_organization
from server.documents.house import HouseDocument
from server.models import Organization
from server.services.house_document import house_document, import_house
from server.services.houses import get_house

router = APIRouter(tags=["houses"])


@router.get(
    "/houses/{house_id}/document",
    response_model=HouseDocument,
    responses={**ERROR_RESPONSES, **SIGNED_IN_RESPONSES, **NOT_FOUND_RESPONSES},
)
def export_house(
    house_id: int, session: SessionDep, org: Organization = Depends(get_organization)
) -> HouseDocument:
    """The saved house as the same document POST /calc/house takes."""
    return house_document(get_house(session=session, organization_id=org.id, house_id=house_id))


@router.post("/houses", status_code=201, responses={**ERROR_RESPONSES, **SIGNED_IN_RESPONSES})
def import_house_document(
    document: HouseDocument, session: SessionDep, org: Organization = Depends(get_organization)
) -> dict[str, int | str]:
    """Create a saved house from a document; returns its id and page."""
    house = import_house(session=session, organization_id=org.id, document=document)
    return {"id": house.id, "url": f"/houses/{house.id}"}
