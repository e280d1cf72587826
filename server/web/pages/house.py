"""The Houses list and the House page (templates/pages/houses.html, pages/house.html)."""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

from sqlalchemy.orm import Session

from server.services import houses as svc
from server.services.envelope import envelope_rows
from server.services.house_progress import house_facts, section_todo
from server.services.library import catalog_for
from server.services.organization_code_targets import rows_for
from server.services.typical import typical_assemblies
from server.web.pages.bills import bills_context
from server.web.pages.house_run import house_run
from server.web.pages.photos import photos_context
from server.web.pages.settings import settings_context
from server.web.pages.sharing import share_context
from server.web.pages.spaces import spaces_context
from server.web.pages.systems import systems_context

#: the House page's sections in the order an auditor walks through them (anchor key, label)
HOUSE_SECTIONS: tuple[tuple[str, str], ...] = (
    ("house", "House & systems"),
    ("envelope", "Envelope"),
    ("air", "Air leakage"),
    ("bills", "Bills"),
    ("upgrades", "Upgrades"),
    ("share", "Share"),
)


def houses_context(
    *,
    session: Session,
    organization_id: int,
    query: str = "",
    form: Mapping[str, str] | None = None,
    errors: Mapping[str, str] | None = None,
) -> dict[str, Any]:
    """The firm's houses matching ``query``, and the new-house form (typed text kept)."""
    rows = svc.list_houses(session=session, organization_id=organization_id, query=query)
    return {"rows": rows, "q": query, "form": form or {}, "errors": errors or {}}


def house_context(*, session: Session, organization_id: int, house_id: int) -> dict[str, Any]:
    """Everything the House page shows: surfaces with their UA, pipe runs, the settings and
    share-links sections, and empty add-forms (a route puts a rejected form's text over them)."""
    house = svc.get_house(session=session, organization_id=organization_id, house_id=house_id)
    catalog = catalog_for(session=session, organization_id=organization_id)
    run = house_run(house=house, catalog=catalog)  # the one calculation every section shows
    rows, total_ua, as_found = envelope_rows(  # calc/house's figures: behind, b, ground U
        house, catalog, rows_for(session=session, organization_id=organization_id), found=run.found
    )
    return {
        **settings_context(house=house),
        **share_context(session=session, organization_id=organization_id, house=house),
        **systems_context(house=house, catalog=catalog, run=run),
        **bills_context(house=house, catalog=catalog, run=run),
        **spaces_context(session=session, organization_id=organization_id, house=house, run=run),
        **photos_context(session=session, organization_id=organization_id, house=house),
        "house": house,
        "rows": rows,
        "total_ua": total_ua,
        "envelope_error": as_found.error,
        "pipes": svc.pipe_rows(house),
        "kinds": svc.SURFACE_KINDS,
        "typicals": typical_assemblies(),
        "house_sections": HOUSE_SECTIONS,
        "todo": section_todo(house_facts(house, rows)),
        "form": {},
        "errors": {},
    }
