"""The Compare page (templates/pages/compare.html, body partials/compare_body.html): as found vs
each package, from the same :func:`server.services.comparison.compute_house` as the API.

The page's document asks for ranges (``uncertainty``: :data:`PAGE_UNCERTAINTY`, a fixed seed,
so the same house always shows the same ranges); with bills the service calibrates and the
ranges use the calibrated model. The best package for a budget is its own section
(:mod:`server.web.pages.compare_best`): a budget typed by one viewer never enters this context
or its cache.

The homeowner's view ``/s/<token>`` shows the same context (:mod:`server.web.pages.shared`).
Both are computed once per state of the house and kept (:mod:`server.web.compare_cache`).
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any

from markupsafe import Markup

from server.documents.house import HouseResult
from server.errors import InputError
from server.models import House
from server.services.bill_comparison import modelled_periods
from server.services.calibration import RATIO_WARNING
from server.services.catalog import Catalog
from server.services.cautions import GENERAL, cautions_for
from server.services.comparison import OVERSIZED_RATIO, compute_house
from server.services.heat_flows import energy_text, heat_flows
from server.services.house_document import house_document
from server.web.chart_bills import bills_chart
from server.web.chart_ranges import RangeRow, range_chart
from server.web.charts import bar_chart, both_layouts, cash_flow_chart
from server.web.compare_cache import cached_compare_context

#: the page's Monte Carlo: 2,000 draws (P10/P90 move by well under 1 % between seeds at this
#: count on the demo house) with a fixed seed, so a page shows the same figures every time
PAGE_UNCERTAINTY = {"samples": 2000, "seed": 7}
#: the inputs that most often explain a model far from its bills (common practice)
RATIO_INPUTS = (
    "Air leakage: the blower-door CFM50 and the N-factor (a tighter or leakier house than "
    "entered changes the use most).",
    "The heating system's efficiency: an older furnace or boiler often runs below its "
    "rating; a heat pump's seasonal COP depends on the climate.",
    "The areas: each surface's area, and whether it faces outdoors, the ground or an "
    "unheated space.",
    "The thermostat setpoint: a cooler house, setbacks at night or closed-off rooms use "
    "less than the model's base temperature assumes.",
)


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
        doc = house_document(house, extra_package=chosen, uncertainty=PAGE_UNCERTAINTY)
        result = compute_house(doc, catalog=catalog, upgrades_alone=False)  # packages only
    except InputError as exc:
        return {"house": house, "error": f"{exc.field}: {exc.message}", "result": None}
    ip = house.units == "ip"
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
        "ua_unit": "Btu/(h·°F)" if ip else "W/K",
        "power_unit": "Btu/h" if ip else "W",
        "share_svg": _heat_chart(result, house.units),
        "cost_svg": _bars(cost_rows, "Annual energy cost: as found and each package"),
        "flow_svg": _flows(flows, "Cumulative discounted cash flow (crosses zero at payback)")
        if flows
        else "",
        "oversized": _oversized(result),
        **_ranges(result),
        **_bills(result),
        "cautions": cautions_for(kinds, extra_topics=topics),
        "general_caution": GENERAL,
    }


def _heat_chart(result: HouseResult, units: str) -> Markup:
    rows = [
        (f.label, f.share, f"{f.share:.0%} · {energy_text(f.annual, units)}")
        for f in heat_flows(result.as_found)
    ]
    title = "Where the heat goes now: share of the heat lost in a year"
    return both_layouts(
        bar_chart(rows, title=title, label_width=300), bar_chart(rows, title=title, layout="narrow")
    )


def _oversized(result: HouseResult) -> list[str]:
    """The oversized-equipment sentences: as found, and each package's (from its warnings)."""
    notes = []
    ratio = result.as_found.capacity_ratio
    if ratio is not None and ratio > OVERSIZED_RATIO:
        notes.append(
            f"As found, the heating equipment's output is {ratio:.1f} times the design heat "
            f"loss (more than {OVERSIZED_RATIO:.1f}): it is already oversized for the house."
        )
    for p in result.packages:
        notes.extend(f"{p.name or p.id}: {w}" for w in p.warnings if "oversized" in w)
    return notes


def _ranges(result: HouseResult) -> dict[str, Any]:
    """Range bars of first-year savings (P10–P90, P50) and the chance each package pays back."""
    rows = [
        RangeRow(
            label=p.name or p.id,
            p10=p.range.annual_savings.p10 or 0.0,
            p50=p.range.annual_savings.p50 or 0.0,
            p90=p.range.annual_savings.p90 or 0.0,
            pays_back=p.range.probability_pays_back,
        )
        for p in result.packages
        if p.range is not None
    ]
    title = "First-year savings: 8 in 10 chance within each bar, the middle marked"
    years = result.analysis_years
    svg = (
        both_layouts(range_chart(rows, title=title, years=years),
                     range_chart(rows, title=title, years=years, layout="narrow"))
        if rows
        else ""
    )  # fmt: skip
    return {"range_rows": rows, "range_svg": svg, "uncertainty": result.uncertainty}


def _bills(result: HouseResult) -> dict[str, Any]:
    """Modelled vs bills: the ratio, the periods chart and, far from 1, what to check."""
    calibration = result.calibration
    if calibration is None:
        return {"calibration": None, "bills_svg": "", "ratio_inputs": ()}
    periods = modelled_periods(calibration)
    unit = calibration.fuel_unit
    title = "Monthly use: the bills against the model at the same weather"
    svg = (
        both_layouts(bills_chart(periods, unit=unit, title=title),
                     bills_chart(periods, unit=unit, title=title, layout="narrow"))
        if periods
        else ""
    )  # fmt: skip
    ratio = calibration.ratio
    far = ratio is not None and not RATIO_WARNING[0] <= ratio <= RATIO_WARNING[1]
    return {
        "calibration": calibration,
        "bill_periods": periods,
        "bills_svg": svg,
        "ratio_inputs": RATIO_INPUTS if far else (),
    }


def _bars(rows: list[tuple[str, float, str]], title: str) -> Markup:
    return both_layouts(bar_chart(rows, title=title), bar_chart(rows, title=title, layout="narrow"))


def _flows(flows: list[tuple[str, list[float]]], title: str) -> Markup:
    return both_layouts(
        cash_flow_chart(flows, title=title), cash_flow_chart(flows, title=title, layout="narrow")
    )
