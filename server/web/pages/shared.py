"""The homeowner's read-only view ``/s/<token>`` (templates/pages/shared.html).

It shows the compare page's figures (the same compare context, cached per version of the
house) in plain words: each package's money, the charts, cautions, and no edit controls or
links into the firm's pages.
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any

from sqlalchemy.orm import Session

from server.models import House, Organization, ShareLink
from server.services.library import catalog_for
from server.web.pages.compare import compare_context


def _plain_options(result: Any) -> list[dict[str, Any]]:
    """Each package's money figures for the plain-words cards."""
    return [
        {
            "id": p.id,
            "name": p.name or p.id,
            "annual_savings": p.annual_savings,
            "monthly_savings": p.monthly_savings,
            "installed_cost": p.installed_cost,
            "rebates": p.rebates,
            "net_cost": p.net_cost,
            "payback": p.simple_payback_years,
            "loan": p.monthly_loan_payment,
            "co2_avoided": p.co2_avoided,
            "total_cost": p.total_cost,
        }  # fmt: skip
        for p in result.packages
    ]


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
    return {
        **context,
        "token": token,
        "firm_name": org.name if org else "",
        "options": [o for o in options if o["id"] != "your-selection"],
        "selection": selection,
        "as_found_cost": result.as_found.total_cost if result is not None else None,
    }
