"""Compare page: as found vs each package (context from :mod:`server.web.pages.compare`), and
the best package for a budget (:mod:`server.web.pages.compare_best`) with its save button."""

from __future__ import annotations

from typing import Any
from urllib.parse import urlencode

from fastapi import APIRouter, Query, Request
from fastapi.responses import HTMLResponse, RedirectResponse
from markupsafe import Markup
from starlette.responses import Response

from server.models import House
from server.services import houses as svc
from server.services import idempotency as idem
from server.services.best_package import save_best_package
from server.services.catalog import Catalog
from server.services.library import catalog_for
from server.web.compare_cache import fragment_html, house_row
from server.web.deps import CurrentUser, OrgDep, PostedFields, SessionDep, render, run_unit
from server.web.forms import form_version
from server.web.pages import compare as page
from server.web.pages import compare_best as best
from server.web.render import is_htmx
from server.web.saving import save_or_rerender

router = APIRouter()
BEST_FRAGMENT = "partials/compare_best.html"


def compare_context(house: House, catalog: Catalog, chosen: list[str]) -> dict[str, Any]:
    """Kept only for server/web/pages/shared.py until it imports
    :func:`server.web.pages.compare.compare_context` (keyword arguments) itself."""
    return page.compare_context(house=house, catalog=catalog, chosen=chosen)


def _page(
    request: Request, house: House, body: Markup, best_ctx: dict[str, Any], *, fragment: bool,
    status_code: int = 200,
) -> Response:  # fmt: skip
    """The compare body (kept for every viewer) with this viewer's best-package section in
    its slot (the section carries this viewer's CSRF token and idempotency key)."""
    environment = request.app.state.templates.env
    section = environment.get_template(BEST_FRAGMENT).render(best_ctx, request=request)
    html = Markup(str(body).replace(best.SLOT, section, 1))
    if fragment:
        return HTMLResponse(html, status_code=status_code)
    return render(request, "pages/compare.html", {"house": house, "compare_body_html": html},
                  status_code=status_code)  # fmt: skip


@router.get("/houses/{house_id}/compare", name="compare")
async def compare_page(
    request: Request,
    session: SessionDep,
    org: OrgDep,
    house_id: int,
    pick: list[str] = Query(default=[]),
    budget: str = Query(default="", max_length=40),
    objective: str | None = Query(default=None, max_length=40),
) -> Response:
    fragment_only = is_htmx(request)
    best_only = fragment_only and request.headers.get("HX-Target") == "compare-best"
    environment = request.app.state.templates.env

    def read() -> tuple[House, Markup, dict[str, Any]]:
        # The house row alone: its surfaces, upgrades and packages load only when not kept.
        house = house_row(session=session, organization_id=org.id, house_id=house_id)
        catalog = catalog_for(session=session, organization_id=org.id)
        best_ctx = best.best_context(house=house, catalog=catalog, budget_text=budget,
                                     objective=objective or "npv", asked=objective is not None)  # fmt: skip
        best_ctx["chosen"] = pick
        if best_only:
            return house, Markup(best.SLOT), best_ctx
        context = page.compare_context(house=house, catalog=catalog, chosen=pick)
        # The body is rendered once per state of the house and kept (it reads nothing of the
        # viewer); the page around it, with the viewer's name and CSRF token, is rendered below.
        return house, fragment_html(context, environment, is_htmx=fragment_only), best_ctx

    house, body, best_ctx = await run_unit(session, read)
    status = 422 if best_ctx["best_errors"] else 200
    return _page(request, house, body, best_ctx, fragment=fragment_only, status_code=status)


@router.post("/houses/{house_id}/compare/best-package")
def save_best(
    request: Request, session: SessionDep, org: OrgDep, user: CurrentUser, data: PostedFields,
    house_id: int,
) -> Response:  # fmt: skip
    """Save the best set for the posted budget and objective as a package, then show it."""
    house = svc.get_house(session=session, organization_id=org.id, house_id=house_id)
    catalog = catalog_for(session=session, organization_id=org.id)
    budget_text, objective = data.get("budget", ""), data.get("objective", "npv")
    amount, goal, errors = best.read_choice(units=house.units, budget=budget_text,
                                            objective=objective)  # fmt: skip

    def rerender(errors: dict[str, str], status: int) -> Response:
        context = page.compare_context(house=house, catalog=catalog, chosen=[])
        body = fragment_html(context, request.app.state.templates.env, is_htmx=False)
        best_ctx = best.best_context(house=house, catalog=catalog, budget_text=budget_text,
                                     objective=goal, asked=True, errors=errors)  # fmt: skip
        best_ctx["chosen"] = []
        return _page(request, house, body, best_ctx, fragment=False, status_code=status)

    if errors:
        return rerender(errors, 422)
    query = urlencode({"budget": budget_text, "objective": goal})

    def work() -> str:
        save_best_package(session=session, house=house, catalog=catalog, budget=amount,
                          objective=goal, expected_version=form_version(data))  # fmt: skip
        return f"/houses/{house.id}/compare?{query}#compare-best"

    def save() -> str:  # the same form posted again answers as the first time
        location, _ = idem.once(session=session, organization_id=org.id, user_id=user.id,
                                key=idem.read_key(data), purpose="best-package", work=work)  # fmt: skip
        return location

    return save_or_rerender(
        call=save, saved=lambda location: RedirectResponse(location, status_code=303),
        rerender=rerender, conflict_key="version", not_done="the package was not saved",
        field_key=lambda field: "budget" if field == "budget" else "form",
    )  # fmt: skip
