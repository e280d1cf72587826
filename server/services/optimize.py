"""The best package for a budget, in a house document (``optimize`` -> ``best``, ``frontier``).

Rules decided here (the contract was silent):

* ``optimize.budget`` is on the net cost (installed cost − rebates), in the document's
  currency; omitted (null) means no budget. A negative or non-finite budget, or an unknown
  objective, is a 422 naming the field (the document model refuses them).
* The empty set ("no upgrade", net cost 0, every saving 0) is always allowed. When it is the
  best allowed set — nothing within the budget beats leaving the house as it is, e.g. a budget
  of 0 and no free upgrade — ``best`` is ``null`` and ``optimization.best_is_no_upgrade`` is
  true, with a plain warning.
* ``best`` is computed as a package is (one modified house through the package path,
  :func:`server.physics.house_model.evaluate_option` and the package figures), with its
  upgrades in document order; ``frontier`` is computed by the array core
  (:mod:`server.physics.variants`), the same figures to floating-point rounding.
* ``frontier`` spans every budget (it shows what more or less money would buy), ascending by
  net cost, at most ``optimize.frontier_limit`` points (the ones of highest net cost when there
  are more; a warning says so). The empty set appears on it when it is a frontier point.
* ``optimization`` says how the answer was found and whether it is exact (see
  :mod:`server.physics.optimize`); when it is not, a warning states the bound.
"""

from __future__ import annotations

import math

import numpy as np

from server.documents.house import (
    FrontierPoint,
    HouseDocument,
    HouseResult,
    OptimizationFigures,
)
from server.errors import InputError
from server.physics import house_model as model
from server.physics import optimize as search
from server.physics.units import from_si
from server.physics.variants import Variants, unsupported
from server.services.house_figures import _option

OBJECTIVE_WORDS = {
    "npv": "net present value",
    "annual_savings": "first-year savings at today's prices",
    "co2": "CO2 avoided per year (kg)",
}


def attach_optimum(
    doc: HouseDocument,
    house: model.House,
    upgrades: list[model.Upgrade],
    as_found: model.HouseEnergy,
    result: HouseResult,
) -> None:
    """With ``doc.optimize``: fill ``result.best``, ``result.frontier`` and
    ``result.optimization``. Without it nothing changes."""
    wanted = doc.optimize
    if wanted is None:
        return
    budget = math.inf if wanted.budget is None else wanted.budget
    reason = unsupported(house, upgrades)
    variants = None
    front_options: list[model.OptionResult | None] = []
    if reason is not None:  # through the package path, set by set
        found, front_options = search.best_package_by_model(
            house,
            upgrades,
            budget=budget,
            objective=wanted.objective,
            frontier_limit=wanted.frontier_limit,
            reason=reason,
        )
    else:
        try:
            variants = Variants(house, upgrades)
        except ValueError as exc:  # compute_house checked these already; a guard against a 500
            raise InputError("upgrades", str(exc)) from None
        found = search.best_package(
            variants,
            budget=budget,
            objective=wanted.objective,
            frontier_limit=wanted.frontier_limit,
        )
    warnings = list(found.warnings)
    by_id = {u.id: u for u in upgrades}
    best = None
    if not found.exact and found.method == "enumeration":
        pass  # no answer: the warning says why
    elif found.best.upgrade_ids:
        chosen = [by_id[name] for name in found.best.upgrade_ids]
        option = model.evaluate_option(house, as_found, "best", chosen)
        best = _option(doc, house, by_id, as_found, option, "Best for the budget")
    else:
        warnings.append(
            "no set of upgrades within the budget beats leaving the house as it is "
            f"({OBJECTIVE_WORDS[wanted.objective]}); best is null: no upgrade"
        )
    frontier = []
    if found.frontier and variants is None:
        frontier = [
            _point_of_option(doc, as_found, point, option)
            for point, option in zip(found.frontier, front_options, strict=True)
        ]
    elif found.frontier and variants is not None:
        rows = [list(point.selection) for point in found.frontier]
        figures = variants.evaluate(np.array(rows, dtype=np.int64))
        for index, point in enumerate(found.frontier):
            sir = float(figures.sir[index])
            savings = float(figures.annual_savings[index])
            net = float(figures.net_cost[index])
            frontier.append(
                FrontierPoint(
                    upgrades=list(point.upgrade_ids),
                    net_cost=net,
                    objective_value=point.objective_value,
                    annual_savings=savings,
                    npv=float(figures.npv[index]),
                    sir=None if math.isnan(sir) else sir,
                    co2_avoided=float(figures.co2_avoided_kg[index]),
                    installed_cost=float(figures.installed_cost[index]),
                    rebates=float(figures.rebates[index]),
                    simple_payback_years=None if savings <= 0 else max(net, 0.0) / savings,
                    total_cost=float(figures.total_cost[index]),
                    ua=from_si(float(figures.ua_w_per_k[index]), "ua", doc.units),
                )
            )
    result.best = best
    result.frontier = frontier
    result.optimization = OptimizationFigures(
        objective=wanted.objective,
        objective_meaning=OBJECTIVE_WORDS[wanted.objective],
        budget=wanted.budget,
        objective_value=found.best.objective_value,
        best_is_no_upgrade=not found.best.upgrade_ids,
        exact=found.exact,
        method=found.method,
        method_meaning=search.METHOD_WORDS[found.method],
        upper_bound=found.upper_bound,
        sets=found.sets,
        frontier_capped=found.frontier_capped,
        warnings=warnings,
    )


def _point_of_option(
    doc: HouseDocument,
    as_found: model.HouseEnergy,
    point: search.Candidate,
    option: model.OptionResult | None,
) -> FrontierPoint:
    """A frontier point from its evaluated option (None: no upgrade, the as-found house)."""
    if option is None:
        return FrontierPoint(
            upgrades=[], net_cost=0.0, objective_value=0.0, annual_savings=0.0, npv=0.0,
            sir=None, co2_avoided=0.0, installed_cost=0.0, rebates=0.0,
            simple_payback_years=None, total_cost=as_found.total_cost,
            ua=from_si(as_found.ua_w_per_k, "ua", doc.units),
        )  # fmt: skip
    money = option.appraisal
    return FrontierPoint(
        upgrades=list(point.upgrade_ids),
        net_cost=money.net_cost,
        objective_value=point.objective_value,
        annual_savings=money.annual_savings,
        npv=money.npv,
        sir=money.sir,
        co2_avoided=option.co2_avoided_kg,
        installed_cost=money.installed_cost,
        rebates=money.rebates,
        simple_payback_years=money.simple_payback_years,
        total_cost=option.energy.total_cost,
        ua=from_si(option.energy.ua_w_per_k, "ua", doc.units),
    )
