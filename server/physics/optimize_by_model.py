"""The best set found by evaluating every allowed set as a package, for a house the array
core (:mod:`.variants`) does not model.

The numbered references are those of :mod:`.optimize` (its docstring holds the proof).
"""

from __future__ import annotations

import math

import numpy as np

from server.physics import house_model as model
from server.physics.optimize_frontier import pareto
from server.physics.optimize_results import (
    FRONTIER_LIMIT,
    OBJECTIVES,
    TOLERANCE,
    Candidate,
    Optimum,
    capped_words,
    within_budget,
)

#: most sets evaluated one by one through the package path when the array core does not
#: model the house (each is one modified house, about a millisecond)
MAX_MODEL_ENUMERATION = 4096


def best_package_by_model(
    house: model.House,
    upgrades: list[model.Upgrade],
    *,
    budget: float,
    objective: str,
    frontier_limit: int = FRONTIER_LIMIT,
    reason: str,
) -> tuple[Optimum, list[model.OptionResult | None]]:
    """Every allowed set evaluated as a package (:func:`.house_model.evaluate_option`), for a
    house the array core does not model (``reason``); up to :data:`MAX_MODEL_ENUMERATION`
    sets, else no answer (``best`` is the empty set, ``exact`` false, a warning says why).

    Returns the optimum and, for each frontier point, its evaluated option (None: no upgrade).
    """
    import itertools

    if objective not in OBJECTIVES:
        raise ValueError(f"the objective must be one of {', '.join(OBJECTIVES)}")
    targets: dict[str, list[model.Upgrade]] = {}
    for upgrade in upgrades:
        targets.setdefault(model.upgrade_target(upgrade), []).append(upgrade)
    groups = list(targets.values())
    sets = math.prod(len(g) + 1 for g in groups)
    empty = Candidate(tuple(0 for _ in groups), (), 0.0, 0.0)
    if sets > MAX_MODEL_ENUMERATION:
        words = (
            f"the optimiser's fast core does not model {reason}, and this house has {sets} sets "
            f"of upgrades, more than the {MAX_MODEL_ENUMERATION} it evaluates one by one: no "
            "best set is given"
        )
        return Optimum(
            objective, budget, empty, (), False, "enumeration", None, sets, False, (words,)
        ), []
    as_found = model.evaluate(house)
    order = {u.id: i for i, u in enumerate(upgrades)}
    candidates: list[Candidate] = []
    options: list[model.OptionResult | None] = []
    for combo in itertools.product(*(range(len(g) + 1) for g in groups)):
        chosen = sorted(
            (groups[g][k - 1] for g, k in enumerate(combo) if k > 0), key=lambda u: order[u.id]
        )
        if not chosen:
            candidates.append(empty)
            options.append(None)
            continue
        option = model.evaluate_option(house, as_found, "set", chosen)
        value = {
            "npv": option.appraisal.npv,
            "annual_savings": option.appraisal.annual_savings,
            "co2": option.co2_avoided_kg,
        }[objective]
        candidates.append(
            Candidate(combo, tuple(u.id for u in chosen), option.appraisal.net_cost, value)
        )
        options.append(option)
    costs = np.array([c.net_cost for c in candidates])
    values = np.array([c.objective_value for c in candidates])
    allowed = (
        np.array([within_budget(c, budget) for c in costs])
        if math.isfinite(budget)
        else np.ones(costs.size, bool)
    )
    tie = TOLERANCE * max(1.0, float(values.max() - values.min()))
    top = float(values[allowed].max())
    ties = np.flatnonzero(allowed & (values >= top - tie))
    best = candidates[int(ties[np.argmin(costs[ties])])]
    front = pareto(costs, values)
    capped = 0 < frontier_limit < len(front)
    front = front[len(front) - frontier_limit :] if frontier_limit > 0 else []
    warnings = (capped_words(frontier_limit),) if capped else ()
    optimum = Optimum(
        objective,
        budget,
        best,
        tuple(candidates[i] for i in front),
        True,
        "enumeration",
        None,
        sets,
        capped,
        warnings,
    )
    return optimum, [options[i] for i in front]
