"""The Compare page (templates/pages/compare.html, body partials/compare_body.html): as found vs
each package, from the same :func:`server.services.house.compute_house` as the API.

The homeowner's view ``/s/<token>`` shows the same context (:mod:`server.web.pages.shared`).
Both are computed once per state of the house and kept (:mod:`server.web.compare_cache`).
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any

from markupsafe import Markup

from server.errors import InputError
from server.models import House
from server.services.catalog import Catalog
from server.services.cautions import GENERAL, cautions_for
from server.services.house import compute_house
from server.services.house_document import house_document
from server.web.charts import bar_chart, both_layouts, cash_flow_chart
from server.web.compare_cache import cached_compare_context


def compare_context(*, house: House, catalog: Catalog, chosen: Sequence[str]) -> dict[str, Any]:
    """Everything the compare page (and the homeowner's view) shows for ``house`` with the
    upgrades ``chosen`` (their slugs, in order) as "Your selection": the copy kept for this
    very state of the house, or computed afresh and kept."""
    return cached_compare_context(
        house=house, catalog=catalog, chosen=list(chosen), build=build_compare_context
    )


def build_compare_context(*, house: House, catalog: Catalog, chosen: list[str]) -> dict[str, Any]:
    """The compare context computed afresh (its values must depend only on the cache's key)."""
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
    topics = ("air_sealing",) if any(u.kind == "air_sealing" for u in house.upgrades) else ()
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


def _bars(rows: list[tuple[str, float, str]], title: str) -> Markup:
    return both_layouts(bar_chart(rows, title=title), bar_chart(rows, title=title, layout="narrow"))


def _flows(flows: list[tuple[str, list[float]]], title: str) -> Markup:
    return both_layouts(
        cash_flow_chart(flows, title=title), cash_flow_chart(flows, title=title, layout="narrow")
    )
