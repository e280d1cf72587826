"""The cost/benefit frontier: Pareto filtering, every set evaluated, and merging by group.

The numbered references are those of :mod:`.optimize` (its docstring holds the proof).
"""

from __future__ import annotations

import math

import numpy as np

from server.physics.optimize_milp import LinearModel
from server.physics.optimize_results import (
    TOLERANCE,
    Candidate,
    candidate,
    cost_step,
    objective_values,
)
from server.physics.variants import FloatArray, IntArray, Variants


def pareto(costs: FloatArray, values: FloatArray) -> list[int]:
    """Indices of the sets no other beats on both net cost and objective, ascending by cost.

    Costs within ``1e-7·max(1, |C|)`` of each other count as one (the frontier's δ); objective
    ties within 1e-9 of the objective's spread are ties.
    """
    order = np.lexsort((-values, costs))
    spread = float(values.max() - values.min()) if values.size else 0.0
    tie = TOLERANCE * max(1.0, spread)
    kept: list[int] = []
    running = -math.inf
    for index in order:
        cost, value = float(costs[index]), float(values[index])
        if kept and cost - float(costs[kept[-1]]) <= cost_step(float(costs[kept[-1]])):
            if value > float(values[kept[-1]]) + tie:
                kept[-1] = int(index)
                running = value
            continue
        if value > running + tie:
            kept.append(int(index))
            running = value
    return kept


def enumerate_sets(
    variants: Variants, budget: float, objective: str, limit: int
) -> tuple[Candidate, list[Candidate], bool]:
    rows = variants.all_selections()
    figures = variants.evaluate(rows)
    values = objective_values(figures, objective)
    costs = figures.net_cost
    allowed = (
        costs <= budget + TOLERANCE * max(1.0, abs(budget))
        if math.isfinite(budget)
        else np.ones(costs.size, bool)
    )
    spread = float(values.max() - values.min())
    tie = TOLERANCE * max(1.0, spread)
    top = float(values[allowed].max())
    ties = np.flatnonzero(allowed & (values >= top - tie))
    choice = int(ties[np.argmin(costs[ties])])
    best = candidate(variants, rows[choice], objective)
    front = pareto(costs, values)
    capped = 0 < limit < len(front)
    front = front[len(front) - limit :] if limit > 0 else []
    return best, [candidate(variants, rows[i], objective) for i in front], capped


def merged_frontier(
    variants: Variants, m: LinearModel, objective: str, limit: int, best: Candidate
) -> tuple[list[Candidate], bool]:
    """The exact frontier by merging the groups' options one group at a time [6].

    When the objective is a sum over groups (one load piece), a partial set beaten on both
    net cost and its share of the objective by another partial set over the same groups can
    be swapped for it in any whole set without loss, so only the unbeaten partial sets are
    kept at each step. With the variable base and no pipe options, the objective falls with
    both net cost and UA, so a set on the (net cost, objective) frontier is on the (net cost,
    UA) frontier: that one is built the same way, every point evaluated exactly and filtered.
    """
    separable = len(m.pieces) == 1
    slope = m.pieces[0].slope
    cost = np.zeros(1)
    score = np.zeros(1)
    parents: list[IntArray] = []
    choices: list[IntArray] = []
    for g, start in enumerate(m.starts):
        size = len(variants.groups[g].options)
        net = m.net_x[start : start + size]
        if separable:
            gain = -(
                m.cost_x[start : start + size] + m.k_load * slope * m.ua_x[start : start + size]
            )
        else:
            gain = -m.ua_x[start : start + size]
        all_cost = (cost[:, None] + net[None, :]).ravel()
        all_score = (score[:, None] + gain[None, :]).ravel()
        order = np.lexsort((-all_score, all_cost))
        ordered = all_score[order]
        before = np.concatenate(([-np.inf], np.maximum.accumulate(ordered)[:-1]))
        keep = order[ordered > before]
        parents.append(keep // size)
        choices.append(keep % size)
        cost, score = all_cost[keep], all_score[keep]
    count = cost.size
    rows = np.zeros((count, len(m.starts)), dtype=np.int64)
    index = np.arange(count)
    for g in range(len(m.starts) - 1, -1, -1):
        rows[:, g] = choices[g][index]
        index = parents[g][index]
    figures = variants.evaluate(rows)
    values = objective_values(figures, objective)
    front = pareto(figures.net_cost, values)
    capped = 0 < limit < len(front)
    if capped:
        picks = set(np.linspace(0, len(front) - 1, limit).round().astype(int).tolist())
        best_row = tuple(best.selection)
        at_best = [i for i, f in enumerate(front) if tuple(rows[f]) == best_row]
        if at_best and at_best[0] not in picks:
            nearest = min(picks, key=lambda p: abs(p - at_best[0]))
            picks.discard(nearest)
            picks.add(at_best[0])
        front = [front[i] for i in sorted(picks)]
    return [candidate(variants, rows[i], objective) for i in front], capped
