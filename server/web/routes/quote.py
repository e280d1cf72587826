"""Quote page for one package (what it shows: :mod:`server.web.pages.quote`)."""

from __future__ import annotations

from fastapi import APIRouter, Request
from fastapi.responses import Response

from server.services import houses as svc
from server.web.deps import OrgDep, SessionDep, render
from server.web.pages.quote import quote_context

router = APIRouter()


@router.get("/houses/{house_id}/quote/{package_slug}", name="quote")
def quote_page(
    request: Request, session: SessionDep, org: OrgDep, house_id: int, package_slug: str
) -> Response:
    house = svc.get_house(session=session, organization_id=org.id, house_id=house_id)
    context = quote_context(
        session=session, organization=org, house=house, package_slug=package_slug
    )
    return render(request, "pages/quote.html", context)
