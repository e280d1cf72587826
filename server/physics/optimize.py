"""The best set of upgrades under a net-cost budget, and the cost/benefit frontier: exactly.

Problem. A set picks at most one upgrade per surface, at most one air-sealing upgrade and at
most one per pipe run; its net cost C (installed − rebates) must not exceed the budget B; it
maximises one objective, each candidate computed as one modified house (:mod:`.variants`):
``npv`` (s · UPV* − C), ``annual_savings`` (s) or ``co2`` (CO2 avoided, kg/yr).

Why a mixed-integer linear programme is exact here (the proof)
---------------------------------------------------------------
1. Choice groups [see :mod:`.variants`]. Give every option o of group g a binary x_go with
   Σ_o x_go = 1 per group (option 0 = as found, so "no upgrade" is allowed). Whole-house UA,
   pipe loss P and net cost C are then exactly linear: UA = Σ ua_go x_go, P = Σ p_go x_go,
   C = Σ c_go x_go. Buffer spaces are no exception: b = H_ue / (H_iu + H_ue) couples the
   surfaces facing one space, so those surfaces form ONE group whose options are the product
   of theirs, each with its own b·H_iu computed exactly; across groups nothing couples.
2. Every objective is ``K − k_L·L − Σ_go (k_U·ua_go + k_P·p_go + k_C·c_go)·x_go`` with L the
   annual heating load and constants k_L, k_U, k_P, k_C ≥ 0 (prices, CO2 factors ≥ 0,
   efficiencies > 0, UPV* > 0) and the budget row Σ c_go x_go ≤ B: with a fixed base,
   L = 86 400 · HDD · UA is linear too, and the problem is a multiple-choice knapsack — a
   MILP whose optimum HiGHS proves [1], [2] (relative gap set to 1e-12 and the objective
   scaled so its spread is 1e6, so HiGHS's absolute gap of 1e-6 is 1e-12 of it).
3. Variable base. L(UA) = 86 400 · UA · f(τ), τ = T_set − G / UA, f the table's HDD
   interpolated and clamped to the table's ends. If f is convex and nondecreasing (slopes
   s_0 ≥ 0, s_i nondecreasing — true of any table HDD(τ) = Σ_days max(0, τ − T_day) sampled
   at its bases, a sum of convex functions), then below the top base f(τ) = max_k (a_k + β_k τ)
   over the table's segment lines and the constant line HDD_0 (the lower clamp). UA · f(T_set −
   G/UA) is the perspective of f evaluated at (T_set·UA − G, UA), convex in UA [3, §3.2.6], and
   equals max_k (a_k·UA + β_k·(T_set·UA − G)): a maximum of functions linear in UA. With an
   epigraph variable y ≥ each of them and k_L ≥ 0 in the minimised cost, y = max_k(...) = L/86 400
   at the optimum, so the MILP is exact.
   The top clamp breaks convexity (slope h_n after a steeper one). It cannot bind when the
   highest UA any selection can reach gives a balance point within the table:
   T_set − G / UA_max ≤ b_n (τ grows with UA). The code checks the slopes of L's pieces on
   the reachable interval [UA_min, UA_max] directly (this holds under that condition, and
   also when a non-convex part of the table lies beyond the reachable balance points).
4. Otherwise (not convex on the reachable interval) L is still piecewise LINEAR in UA: on a
   table segment L/86 400 = UA·(h_i + s_i(T_set − b_i)) − s_i·G, with breakpoints UA_i =
   G / (T_set − b_i), and L = UA·h_0 or UA·h_n where clamped. When the count of sets is at
   most :data:`MAX_ENUMERATION`, every set is evaluated (exact by enumeration); above it the
   piecewise-linear function is modelled with one binary per piece (UA_j ∈ [u_j w_j,
   u_{j+1} w_j], Σ w_j = 1), a formulation exact for any continuous piecewise-linear
   function [4].
5. A buffer-space group too large to list (:data:`.variants.GROUP_OPTION_CAP`) is the one case
   not solved exactly above the enumeration limit: b·H_iu = H_ue·H_iu / (H_iu + H_ue) is
   concave in H_iu, and its chord over [H_min, H_max] lies below it, so the MILP with the chord
   over-states every set's objective (the objective falls as UA grows): its optimum is an upper
   bound on the true optimum. The answer is then the solver's set re-evaluated exactly, with a
   warning stating that bound; it is never called exact.
6. Ducts, or windows' sun with the variable base (:mod:`.variant_systems`): the fuel is
   Q / η_dist with η_dist depending on the duct options, the buffer spaces' b (so on the
   surfaces' options) and the season (so on UA), and the balance point depends on UA and on
   each window's SHGC·A together. The objective is then not a function of the group sums and
   not separable, so no formulation above is exact: up to :data:`MAX_ENUMERATION` sets every
   set is evaluated on arrays (exact); above it no set is given, and the result says why.
After solving, the chosen set is re-evaluated by the array core, so every figure is a package's.
Among sets of equal objective the cheapest is taken (a second MILP minimising C with the
objective held at the optimum, to 1e-9 of its spread).

Frontier. When the objective depends on a set only through sums over groups (fixed base, or
a variable base with no pipe options: net cost and UA), the whole frontier is built exactly by
merging the groups' options one group at a time and keeping only the partial sets no other
beats [6]: an ε-constraint MILP costs 0.01-1.3 s a point on a 40-surface house, too slow for
200 points in a request. Otherwise (ε-constraint [5]): solve with B = ∞, then with B = that set's net cost − δ
(δ = max(1e-7 · max(1, |C|), 2e-6 of the cost spread): points closer than that in net cost
are one, since HiGHS takes x within 1e-6 of integral and a nearly integral point could seem
cheaper by that much; a set over the budget by such a point is caught on re-evaluation and the
budget tightened by the same step), and so on until no set
is left; a point whose objective ties the previous one replaces it (the previous was beaten on
cost). Every point found is Pareto-optimal: no set has lower-or-equal net cost and higher
objective. The count is capped (:data:`FRONTIER_LIMIT`), with a warning.

References
----------
[1] Q. Huangfu and J. A. J. Hall, "Parallelizing the dual revised simplex method",
    Mathematical Programming Computation 10 (2018) 119-142 (HiGHS), https://highs.dev
[2] SciPy documentation, ``scipy.optimize.milp`` (HiGHS branch-and-cut; option
    ``mip_rel_gap``), https://docs.scipy.org/doc/scipy/reference/generated/scipy.optimize.milp.html
[3] S. Boyd and L. Vandenberghe, Convex Optimization, Cambridge University Press (2004),
    §3.2.6 "Perspective of a function".
[4] J. P. Vielma, S. Ahmed and G. Nemhauser, "Mixed-integer models for nonseparable
    piecewise-linear optimization", Operations Research 58 (2010) 303-315 (the disaggregated
    convex combination model; from memory).
[5] V. Chankong and Y. Y. Haimes, Multiobjective Decision Making: Theory and Methodology,
    North-Holland (1983), the ε-constraint method (from memory).
[6] G. L. Nemhauser and Z. Ullmann, "Discrete dynamic programming and capital allocation",
    Management Science 15 (1969) 494-505 (merging the Pareto sets of independent choices;
    from memory).
"""

from __future__ import annotations

import math

import numpy as np

from server.physics.optimize_by_model import MAX_MODEL_ENUMERATION, best_package_by_model
from server.physics.optimize_frontier import enumerate_sets, merged_frontier, pareto
from server.physics.optimize_load import Piece, convex_on_range, load_pieces
from server.physics.optimize_milp import Solver, linear_model, relaxed_value
from server.physics.optimize_results import (
    FRONTIER_LIMIT,
    MAX_ENUMERATION,
    METHOD_WORDS,
    OBJECTIVES,
    RESOLUTION,
    TOLERANCE,
    Candidate,
    Optimum,
    candidate,
    capped_words,
    cost_step,
    objective_values,
    spread_words,
    within_budget,
)
from server.physics.variants import Variants

#: the optimiser's public names, wherever they are defined (importers use ``optimize.<name>``)
__all__ = [
    "FRONTIER_LIMIT",
    "MAX_ENUMERATION",
    "MAX_MODEL_ENUMERATION",
    "METHOD_WORDS",
    "OBJECTIVES",
    "RESOLUTION",
    "TOLERANCE",
    "Candidate",
    "Optimum",
    "Piece",
    "best_package",
    "best_package_by_model",
    "convex_on_range",
    "load_pieces",
    "objective_values",
    "pareto",
]


def best_package(
    variants: Variants,
    *,
    budget: float,
    objective: str,
    frontier_limit: int = FRONTIER_LIMIT,
    method: str = "auto",
) -> Optimum:
    """The best set of upgrades with net cost ≤ ``budget`` and the frontier (module docstring).

    Parameters
    ----------
    variants : Variants
        The house's choice groups.
    budget : float
        Most net cost [money]; ``math.inf`` for none.
    objective : str
        ``npv``, ``annual_savings`` or ``co2``.
    frontier_limit : int
        Most frontier points (0: no frontier).
    method : str
        ``auto`` (exact MILP when its assumptions hold, else enumeration up to
        :data:`MAX_ENUMERATION` sets, else the piecewise MILP or the bound), or force
        ``milp`` (epigraph or piecewise as the load needs) or ``enumeration`` (tests).

    Returns
    -------
    Optimum

    Raises
    ------
    ValueError
        A negative or NaN budget, or an unknown objective.
    """
    if objective not in OBJECTIVES:
        raise ValueError(f"the objective must be one of {', '.join(OBJECTIVES)}")
    if math.isnan(budget) or budget < 0:
        raise ValueError("the budget must be zero or more")
    sets = variants.count()
    m = linear_model(variants, objective)
    convex = convex_on_range(m.pieces)
    warnings: list[str] = []
    if variants.nonlinear is not None and sets > MAX_ENUMERATION:
        # proof, 6: no linear model is exact; no answer rather than a heuristic
        words = (
            f"the objective depends on {variants.nonlinear}, so it is not a sum over the "
            f"upgrades and no linear programme is exact; this house has {sets} sets of "
            f"upgrades, more than the {MAX_ENUMERATION} evaluated one by one: no best set is "
            "given"
        )
        empty = candidate(variants, np.zeros(len(variants.groups), dtype=np.int64), objective)
        return Optimum(
            objective, budget, empty, (), False, "enumeration", None, sets, False, (words,)
        )
    if method == "enumeration" or (
        method == "auto"
        and (m.relaxed or not convex or variants.nonlinear is not None)
        and sets <= MAX_ENUMERATION
    ):
        best, listed, capped = enumerate_sets(variants, budget, objective, frontier_limit)
        if capped:
            warnings.append(capped_words(frontier_limit))
        return Optimum(
            objective,
            budget,
            best,
            tuple(listed),
            True,
            "enumeration",
            None,
            sets,
            capped,
            tuple(warnings),
        )
    solver = Solver(variants, m, piecewise=not convex)
    name = "milp_bound" if m.relaxed else ("milp" if convex else "milp_piecewise")
    empty = candidate(variants, np.zeros(len(variants.groups), dtype=np.int64), objective)

    cost_spread = sum(
        float(np.ptp(variants.installed[g] - variants.rebate[g]))
        for g in range(len(variants.groups))
    )

    def solve(limit_budget: float) -> Candidate | None:
        bound = limit_budget
        for attempt in range(12):
            rows = solver.best(bound)
            if rows is None:
                return None
            found = candidate(variants, rows[0], objective)
            if math.isfinite(limit_budget) and not within_budget(found.net_cost, limit_budget):
                # HiGHS's integrality tolerance (1e-6) let a nearly integral point over the
                # budget: tighten by the excess and a growing share of the cost spread, retry
                bound -= (found.net_cost - bound) + RESOLUTION * max(1.0, cost_spread) * 2**attempt
                continue
            if rows[1] is not None:  # the cheapest of that objective, when it checks out
                cheaper = candidate(variants, rows[1], objective)
                tie = TOLERANCE * max(1.0, abs(found.objective_value))
                if (
                    cheaper.net_cost <= found.net_cost
                    and (
                        not math.isfinite(limit_budget)
                        or within_budget(cheaper.net_cost, limit_budget)
                    )
                    and cheaper.objective_value >= found.objective_value - tie
                ):
                    found = cheaper
            return found
        return None

    best = solve(budget) or empty
    upper = None
    if m.relaxed:
        # the relaxed optimum's own (optimistic) value bounds every set (proof, 5)
        row = np.array(best.selection, dtype=np.int64)
        upper = relaxed_value(variants, m, row, objective)
        if best.objective_value < empty.objective_value or (
            best.objective_value == empty.objective_value and best.net_cost > 0
        ):
            best = empty
        warnings.append(
            "a buffer space has too many combinations of upgrades to list: this is the best set "
            f"found by the solver on an optimistic bound, not proven optimal; no allowed set "
            f"can exceed {upper:.6g}"
        )
    front: list[Candidate] = []
    capped = False
    mergeable = not m.relaxed and (
        len(m.pieces) == 1 or all(float(np.ptp(p)) == 0.0 for p in variants.pipe)
    )
    if frontier_limit > 0 and mergeable:
        front, capped = merged_frontier(variants, m, objective, frontier_limit, best)
        if capped:
            warnings.append(spread_words(frontier_limit))
    elif frontier_limit > 0:
        low_cost = sum(
            float((variants.installed[g] - variants.rebate[g]).min())
            for g in range(len(variants.groups))
        )
        limit_budget = math.inf
        spread_tie = TOLERANCE * max(1.0, abs(best.objective_value))
        while True:
            found = solve(limit_budget)
            if found is None:
                break
            if front and abs(found.objective_value - front[-1].objective_value) <= spread_tie:
                front[-1] = found
            else:
                if len(front) == frontier_limit:
                    capped = True
                    break
                front.append(found)
            # a step beyond what the integrality tolerance lets a near-integral point gain
            limit_budget = found.net_cost - max(cost_step(found.net_cost), RESOLUTION * cost_spread)
            if limit_budget < low_cost - cost_step(low_cost):
                break
        front.reverse()
        if m.relaxed:
            values = np.array([p.objective_value for p in front])
            costs = np.array([p.net_cost for p in front])
            front = [front[i] for i in pareto(costs, values)] if front else []
        if capped:
            warnings.append(capped_words(frontier_limit))
    return Optimum(
        objective,
        budget,
        best,
        tuple(front),
        not m.relaxed,
        name,
        upper,
        sets,
        capped,
        tuple(warnings),
    )
