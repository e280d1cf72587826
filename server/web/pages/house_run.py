"""The one calculation behind a House page render.

The House page shows figures in several sections (the envelope table, the buffer spaces, the
design load, the bills' modelled vs measured ratio). They all come from one
:func:`server.services.comparison.compute_house` of the saved house: the compare page's own run with
no selection (as found + every saved package, with the bills when there are any), taken from
the compare cache (:mod:`server.web.compare_cache`), so a House page, the compare page and the
homeowner's view of one state of the house compute it once between them.

When that run fails (say an upgrade that no longer computes), the house is computed as found
alone (upgrades and packages left out), so the envelope, spaces and systems still show their
figures; the reason is kept for the sections that show it.
"""

from __future__ import annotations

from dataclasses import dataclass

from server.documents.house import HouseResult
from server.models import House
from server.services.catalog import Catalog
from server.services.envelope import AsFound, as_found_of, as_found_run
from server.web.pages.compare import compare_context


@dataclass(frozen=True)
class HouseRun:
    """The House page's one calculation.

    ``result``: as found + saved packages, or (when that failed) as found alone, or None when
    even that failed; ``with_packages``: whether ``result`` holds the packages; ``error``: why
    the full run failed ("field: message", "" when it computed); ``found``: the as-found
    figures by surface for the envelope table.
    """

    result: HouseResult | None
    with_packages: bool
    error: str
    found: AsFound


def house_run(*, house: House, catalog: Catalog) -> HouseRun:
    """The compare page's run of ``house`` (kept per state), else the as-found run alone."""
    ctx = compare_context(house=house, catalog=catalog, chosen=[])
    result: HouseResult | None = ctx.get("result")
    if result is not None:
        return HouseRun(result, True, "", as_found_of(result.as_found))
    alone, found = as_found_run(house, catalog)
    return HouseRun(alone, False, str(ctx.get("error") or "the house cannot be computed"), found)
