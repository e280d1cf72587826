"""Compare page: as found vs each package (context from :mod:`server.web.pages.compare`)."""

from __future__ import annotations

from typing import Any

from fastapi import APIRouter, Query, Request
from fastapi.responses import HTMLResponse
from markupsafe import Markup
from starlette.responses import Response

from server.models import House
from server.services.catalog import Catalog
from server.services.library import catalog_for
from server.web.compare_cache import fragment_html, house_row
from server.web.deps import OrgDep, SessionDep, render, run_unit
from server.web.pages import compare as page
from server.web.render import is_htmx

router = APIRouter()


def compare_context(house: House, catalog: Catalog, chosen: list[str]) -> dict[str, Any]:
    """Kept only for server/web/pages/shared.py until it imports
    :func:`server.web.pages.compare.compare_context` (keyword arguments) itself."""
    return page.compare_context(house=house, catalog=catalog, chosen=chosen)


@router.get("/houses/{house_id}/compare", name="compare")
async def compare_page(
    request: Request,
    session: SessionDep,
    org: OrgDep,
    house_id: int,
    pick: list[str] = Query(default=[]),
) -> Response:
    fragment_only = is_htmx(request)
    environment = request.app.state.templates.env

    def read() -> tuple[House, Markup]:
        # The house row alone: its surfaces, upgrades and packages load only when not kept.
        house = house_row(session=session, organization_id=org.id, house_id=house_id)
        catalog = catalog_for(session=session, organization_id=org.id)
        context = page.compare_context(house=house, catalog=catalog, chosen=pick)
        # The body is rendered once per state of the house and kept (it reads nothing of the
        # viewer); the page around it, with the viewer's name and CSRF token, is rendered below.
        return house, fragment_html(context, environment, is_htmx=fragment_only)

    house, body = await run_unit(session, read)
    if fragment_only:
        return HTMLResponse(body)
    return render(request, "pages/compare.html", {"house": house, "compare_body_html": body})
