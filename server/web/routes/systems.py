"""House page routes: the systems cards (ducts, heat pump, design load, ventilation, ...)."""

from __future__ import annotations

from typing import Any

from fastapi import APIRouter, Request
from fastapi.responses import RedirectResponse, Response
from sqlalchemy.orm import Session

from server.errors import InputError
from server.models import House, Organization
from server.services import houses as svc
from server.services.library import catalog_for
from server.services.system_sections import save_system_card
from server.web.deps import OrgDep, PostedFields, SessionDep
from server.web.forms import form_version
from server.web.pages.house import house_context
from server.web.pages.settings import settings_context
from server.web.pages.systems import systems_context
from server.web.render import is_htmx, page_or_fragment
from server.web.saving import save_or_rerender
from server.web.systems_forms import CARDS, location_choices, parse_card

router = APIRouter()


def _respond(request: Request, session: Session, org: Organization, house: House,
             ctx: dict[str, Any], status: int) -> Response:  # fmt: skip
    """htmx: the section (and the settings block, whose forms carry the house version);
    a saved form: back to the House page; a rejected one: the whole page, messages beside."""
    air = ctx.get("sys_card") == "n_factor"  # the Air leakage block holds the N-factor card
    if status == 200 and not is_htmx(request):
        return RedirectResponse(f"/houses/{house.id}#{'air' if air else 'systems'}", 303)
    # every other card on the page takes the new version from data-house-version (app.js);
    # the settings block still comes out of band with a systems card (tests/web/test_systems)
    return page_or_fragment(
        request, page="pages/house.html",
        fragment="partials/house_air.html" if air else "partials/house_systems_swap.html",
        context={**settings_context(house=house), "house": house, "settings_oob": not air, **ctx},
        page_context=lambda: house_context(session=session, organization_id=org.id, house_id=house.id),
        status_code=status,
    )  # fmt: skip


@router.post("/houses/{house_id}/systems/{card}")
def save_card(
    request: Request,
    session: SessionDep,
    org: OrgDep,
    data: PostedFields,
    house_id: int,
    card: str,
) -> Response:
    house = svc.get_house(session=session, organization_id=org.id, house_id=house_id)
    if card not in CARDS:
        raise svc.NotFound
    values, errors = parse_card(card, data, units=house.units, locations=location_choices(house))
    try:
        version = form_version(data)
    except InputError as exc:
        values, errors = None, {**errors, "form": exc.message}

    def rerender(errors: dict[str, str], status: int) -> Response:
        catalog = catalog_for(session=session, organization_id=org.id)
        ctx = systems_context(house=house, catalog=catalog, card=card, typed=data, errors=errors,
                              message="Not saved: check the marked fields.")  # fmt: skip
        return _respond(request, session, org, house, ctx, status)

    def saved(_: None) -> Response:
        catalog = catalog_for(session=session, organization_id=org.id)
        ctx = systems_context(
            house=house, catalog=catalog, card=card, message=f"{CARDS[card][0]} saved."
        )
        return _respond(request, session, org, house, ctx, 200)

    if values is None:
        return rerender(errors, 422)
    # written now: Conflict for a stale form or when another save came first
    return save_or_rerender(
        call=lambda: save_system_card(house=house, card=card, values=values, expected_version=version),
        saved=saved, rerender=rerender,
    )  # fmt: skip
