"""The homeowner's read-only view ``/s/<token>`` (templates/pages/shared.html).

It shows the compare page's figures (the same compare context, cached per version of the
house) in plain words: each package's money (matched to the bills when the house has them,
the modelled figure beside), one sentence of its savings range, the charts, cautions, and no
edit controls or links into the firm's pages. The sentences come from
:mod:`server.services.plain_words`, as on the quote.
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any

from markupsafe import Markup
from sqlalchemy.orm import Session

from server.documents.house import HouseResult
from server.models import House, Organization, ShareLink
from server.services import plain_words as words
from server.services.library import catalog_for
from server.services.photos import shared_photos
from server.web.charts import bar_chart, both_layouts
from server.web.pages.compare import compare_context


def _plain_options(result: HouseResult) -> list[dict[str, Any]]:
    """Each package's money figures for the plain-words cards (the calibrated ones first)."""
    options = []
    for p in result.packages:
        lead = words.lead_figures(result, p)
        options.append({
            "id": p.id,
            "name": p.name or p.id,
            "calibrated": lead.calibrated,
            "annual_savings": lead.lead.annual_savings,
            "modelled_savings": lead.modelled.annual_savings,
            "monthly_savings": lead.lead.monthly_savings,
            "installed_cost": p.installed_cost,
            "rebates": p.rebates,
            "net_cost": p.net_cost,
            "payback": lead.lead.simple_payback_years,
            "loan": p.monthly_loan_payment,
            "co2_avoided": p.co2_avoided,
            "total_cost": lead.lead.cost_after,
            "range_sentence": words.range_sentence(p, for_homeowner=True),
            "pays_back_sentence": words.pays_back_sentence(p, years=result.analysis_years),
        })  # fmt: skip
    return options


def _matched_cost_chart(result: HouseResult, options: list[dict[str, Any]]) -> Markup:
    """The annual-cost bars with the costs matched to the bills (as the cards say them)."""
    rows = [("As found", words.cost_now(result))] + [(o["name"], o["total_cost"]) for o in options]
    bars = [(label, cost, f"${cost:,.0f}/yr") for label, cost in rows]
    title = "Annual energy cost, matched to your bills: now and with each option"
    return both_layouts(bar_chart(bars, title=title), bar_chart(bars, title=title, layout="narrow"))


def shared_context(
    *, session: Session, link: ShareLink, house: House, token: str, pick: Sequence[str]
) -> dict[str, Any]:
    """The shared house as found and with each package (``pick``: the upgrades toggled on,
    recomputed without saving), under the name of the firm that shared it."""
    org = session.get(Organization, link.organization_id)
    catalog = catalog_for(session=session, organization_id=link.organization_id)
    context = compare_context(house=house, catalog=catalog, chosen=pick)
    result = context.get("result")
    options = _plain_options(result) if result is not None else []
    selection = next((o for o in options if o["id"] == "your-selection"), None)
    matched = result is not None and words.is_calibrated(result)
    if result is not None and matched:
        context = {**context, "cost_svg": _matched_cost_chart(result, options)}
    return {
        **context,
        "matched": matched,
        "token": token,
        "organization_name": org.name if org else "",
        "shared_photos": shared_photos(session=session, link=link),  # show_on_share ones only
        "options": [o for o in options if o["id"] != "your-selection"],
        "selection": selection,
        "as_found_cost": words.cost_now(result) if result is not None else None,
        "basis_sentence": words.calibration_sentence(result) if result is not None else "",
        "no_range_sentence": words.no_range_sentence(result) if result is not None else None,
    }
