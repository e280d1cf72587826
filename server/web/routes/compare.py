"""Compare page: as found vs each package, from the same compute_house as the API."""

from __future__ import annotations

from fastapi import APIRouter, Query, Request
from fastapi.responses import HTMLResponse
from markupsafe import Markup

from server.errors import InputError
from server.services.cautions import GENERAL, cautions_for
from server.services.house import compute_house
from server.services.house_document import house_document
from server.services.library import catalog_for
from server.web.charts import bar_chart, both_layouts, cash_flow_chart
from server.web.compare_cache import cached_compare_context, fragment_html, house_row, page_html
from server.web.deps import OrgDep, SessionDep, run_unit

router = APIRouter()


def compare_context(house, catalog, chosen: list[str]) -> dict:  # type: ignore[no-untyped-def]
    """Everything the compare page (and the homeowner's view) shows, computed once per
    version of the house (see :mod:`server.web.compare_cache`)."""
    return cached_compare_context(house, catalog, chosen, build_compare_context)


def build_compare_context(house, catalog, chosen: list[str]) -> dict:  # type: ignore[no-untyped-def]
    """The compare context computed afresh (values must depend only on the cache's key)."""
    try:
        doc = house_document(house, extra_package=chosen)
        result = compute_house(doc, catalog=catalog, upgrades_alone=False)  # packages only
    except InputError as exc:
        return {"house": house, "error": f"{exc.field}: {exc.message}", "result": None}
    ua_unit = "Btu/(h·°F)" if house.units == "ip" else "W/K"
    share_rows = [
        (s.name or s.id, s.share_of_ua, f"{s.share_of_ua:.0%}") for s in result.as_found.surfaces
    ]
    if result.as_found.ua_infiltration:
        share = result.as_found.ua_infiltration / result.as_found.ua
        share_rows.append(("Air leakage", share, f"{share:.0%}"))
    options = [("As found", result.as_found.total_cost)] + [
        (p.name or p.id, p.total_cost) for p in result.packages
    ]
    cost_rows = [(label, cost, f"${cost:,.0f}/yr") for label, cost in options]
    flows = [
        (p.name or p.id, list(p.cash_flow.cumulative_discounted))
        for p in result.packages
        if p.cash_flow
    ]
    kinds = sorted({s.kind for s in house.surfaces})
    topics = ("air_sealing",) if any(u.document.get("cfm50_after") for u in house.upgrades) else ()
    return {
        "house": house,
        "result": result,
        "error": None,
        "chosen": chosen,
        "upgrades": house.upgrades,
        "ua_unit": ua_unit,
        "share_svg": _bars(share_rows, "Share of heat loss by surface, as found"),
        "cost_svg": _bars(cost_rows, "Annual energy cost: as found and each package"),
        "flow_svg": _flows(flows, "Cumulative discounted cash flow (crosses zero at payback)")
        if flows
        else "",
        "cautions": cautions_for(kinds, extra_topics=topics),
        "general_caution": GENERAL,
    }


def _bars(rows: list, title: str) -> Markup:
    return both_layouts(bar_chart(rows, title=title), bar_chart(rows, title=title, layout="narrow"))


def _flows(flows: list, title: str) -> Markup:
    return both_layouts(
        cash_flow_chart(flows, title=title), cash_flow_chart(flows, title=title, layout="narrow")
    )


@router.get("/houses/{house_id}/compare", name="compare")
async def compare_page(  # type: ignore[no-untyped-def]
    request: Request,
    session: SessionDep,
    org: OrgDep,
    house_id: int,
    pick: list[str] = Query(default=[]),
):
    is_htmx = request.headers.get("HX-Request") == "true"
    environment = request.app.state.templates.env

    def read() -> tuple[dict, Markup]:
        # The house row alone: its surfaces, upgrades and packages load only when not kept.
        house = house_row(session=session, organization_id=org.id, house_id=house_id)
        catalog = catalog_for(session=session, organization_id=org.id)
        context = compare_context(house, catalog, pick)
        # The body is rendered once per state of the house and kept (it reads nothing of the
        # viewer); so is the page around it, with marks for the viewer's name and CSRF token
        # (see page_html), filled in below on the event loop without the database.
        return context, fragment_html(context, environment, is_htmx=is_htmx)

    context, body = await run_unit(session, read)
    if is_htmx:
        return HTMLResponse(body)
    html = page_html(context, environment, viewer=request.state.viewer,
                     csrf_token=request.state.csrf_token)  # fmt: skip
    return HTMLResponse(html)
