"""The compare page's "Best package for a budget" section (templates/partials/compare_best.html).

Computed only when asked (the section's GET form sends ``objective``): the optimizer runs on
the house's document with ``optimize`` (:func:`server.services.best_package.best_result`, the
one code path of calc/house). What it found is kept per state of the house, budget and
objective in a small cache of its own (:data:`MAX_KEPT` entries), so budgets typed by one
viewer never evict or change the compare page others see (:mod:`server.web.compare_cache`).
The form and its "Save as a package" button are rendered per request (CSRF, idempotency key,
house version), never kept.
"""

from __future__ import annotations

import threading
from collections import OrderedDict
from collections.abc import Hashable
from typing import Any, cast

from markupsafe import Markup
from sqlalchemy.orm import object_session

from server.documents.house import HouseResult
from server.errors import InputError
from server.models import House
from server.services.best_package import Objective, best_result, package_name
from server.services.catalog import Catalog
from server.services.number_text import NumberTextError, read_decimal
from server.services.optimize import OBJECTIVE_WORDS
from server.web.chart_frontier import Mark, frontier_chart
from server.web.charts import both_layouts
from server.web.compare_cache import _catalog_key, _price_book_stamp, load_all_columns

#: where the compare body (kept for every viewer) takes this per-request section
SLOT = "<!--compare-best-->"
MAX_KEPT = 64
OBJECTIVES: dict[str, str] = {
    "npv": "Net present value",
    "annual_savings": "First-year savings",
    "co2": "CO₂ avoided",
}

_lock = threading.Lock()
_kept: OrderedDict[Hashable, dict[str, Any]] = OrderedDict()


def clear() -> None:
    """Forget every kept result (tests)."""
    with _lock:
        _kept.clear()


def read_choice(
    *, units: str, budget: str, objective: str
) -> tuple[float | None, Objective, dict[str, str]]:
    """The budget (None: no budget) and objective from the typed text, and messages by field."""
    errors: dict[str, str] = {}
    value: float | None = None
    if budget.strip():
        try:
            value = read_decimal(budget, decimal_comma=units == "si", low=0, high=1e9)
        except NumberTextError as exc:
            errors["budget"] = str(exc)
    if objective not in OBJECTIVES:
        errors["objective"] = "choose one of the three goals"
        objective = "npv"
    return value, cast(Objective, objective), errors


def _key(house: House, catalog: Catalog, budget: float | None, objective: str) -> Hashable:
    session = object_session(house)
    return (house.id, house.version, house.updated_at, _catalog_key(catalog),
            _price_book_stamp(session, house.organization_id), budget, objective)  # fmt: skip


def _value(objective: str, npv: float, savings: float, co2: float) -> float:
    return {"npv": npv, "annual_savings": savings, "co2": co2}[objective]


def _text(objective: str, value: float) -> str:
    if objective == "co2":
        return f"{value:,.0f} kg/yr"
    sign = "−" if value < 0 else ""
    return f"{sign}${abs(value):,.0f}" + ("/yr" if objective == "annual_savings" else "")


def _build(result: HouseResult, budget: float | None, objective: str,
           names: dict[str, str], saved_sets: dict[tuple[str, ...], str]) -> dict[str, Any]:  # fmt: skip
    """The kept part of the section: the best set, its figures and the frontier chart."""
    best = result.best
    points = [
        Mark(
            label=" + ".join(names.get(u, u) for u in f.upgrades) or "No upgrade",
            net_cost=f.net_cost,
            value=f.objective_value,
            words=f"{' + '.join(names.get(u, u) for u in f.upgrades) or 'No upgrade'}: net cost "
            f"${f.net_cost:,.0f}, {_text(objective, f.objective_value)}",
        )
        for f in result.frontier or []
    ]
    saved = [
        Mark(
            label=p.name or p.id,
            net_cost=p.net_cost,
            value=_value(objective, p.npv, p.annual_savings, p.co2_avoided),
            words=f"{p.name or p.id} (saved package): net cost ${p.net_cost:,.0f}, "
            f"{_text(objective, _value(objective, p.npv, p.annual_savings, p.co2_avoided))}",
        )
        for p in result.packages
    ]
    best_mark = None
    if best is not None:
        value = _value(objective, best.npv, best.annual_savings, best.co2_avoided)
        best_mark = Mark("Best", best.net_cost, value,
                         f"Best for the budget: net cost ${best.net_cost:,.0f}, {_text(objective, value)}")  # fmt: skip
    title = f"What each budget buys: {OBJECTIVE_WORDS[objective]} against net cost"
    axis = OBJECTIVE_WORDS[objective]

    def chart(layout: str) -> str:
        return frontier_chart(points, saved=saved, best=best_mark, budget=budget, title=title,
                              value_axis=axis, value_text=lambda v: _text(objective, v),
                              money_text=lambda v: f"${v:,.0f}", layout=layout)  # fmt: skip

    chosen = tuple(sorted(best.upgrades)) if best is not None else ()
    return {
        "best": best,
        "best_names": [names.get(u, u) for u in best.upgrades] if best is not None else [],
        "optimization": result.optimization,
        "frontier": result.frontier or [],
        "frontier_svg": Markup(both_layouts(chart("wide"), chart("narrow"))) if points else "",
        "already_saved": saved_sets.get(chosen) if best is not None else None,
        "package_name": package_name(budget=budget, objective=cast(Objective, objective)),
        "calibrated": best.calibrated if best is not None else None,
    }


def best_context(
    *, house: House, catalog: Catalog, budget_text: str, objective: str, asked: bool,
    errors: dict[str, str] | None = None,
) -> dict[str, Any]:  # fmt: skip
    """The section's context: the form (what was typed kept, messages by field) and, when
    ``asked`` and the form reads, the best set and the frontier (kept per state)."""
    budget, goal, problems = read_choice(units=house.units, budget=budget_text, objective=objective)
    problems.update(errors or {})
    out: dict[str, Any] = {
        "house_id": house.id,
        "version": house.version,
        "budget_text": budget_text,
        "objective": goal,
        "objectives": OBJECTIVES,
        "budget": budget,
        "asked": asked,
        "best_errors": problems,
        "best_found": None,
    }
    if not asked or "budget" in problems or "objective" in problems:
        return out
    key = _key(house, catalog, budget, goal)
    with _lock:
        found = _kept.get(key)
        if found is not None:
            _kept.move_to_end(key)
    if found is None:
        load_all_columns(house)
        try:
            result = best_result(house, catalog=catalog, budget=budget, objective=goal)
        except InputError as exc:
            out["best_errors"] = {**problems, "form": f"{exc.field}: {exc.message}"}
            return out
        names = {u.slug: u.name for u in house.upgrades}
        saved_sets = {tuple(sorted(p.upgrade_slugs)): p.name for p in house.packages}
        found = _build(result, budget, goal, names, saved_sets)
        with _lock:
            _kept[key] = found
            while len(_kept) > MAX_KEPT:
                _kept.popitem(last=False)
    out["best_found"] = found
    return out
