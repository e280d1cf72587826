"""What the optimiser returns, its settings, and the helpers every method shares.

The numbered references are those of :mod:`.optimize` (its docstring holds the proof).
"""

from __future__ import annotations

from dataclasses import dataclass

from server.physics.variants import Figures, FloatArray, IntArray, Variants

OBJECTIVES = ("npv", "annual_savings", "co2")
#: most sets evaluated one by one when the MILP's assumptions fail
MAX_ENUMERATION = 100_000
#: most frontier points listed
FRONTIER_LIMIT = 200
#: relative tolerance of the budget and of ties [-]
TOLERANCE = 1e-9
#: net costs closer than this share of the cost spread (Σ over groups of the largest minus
#: the smallest option's net cost) are not told apart by the MILP: HiGHS accepts x within 1e-6
#: of integral, so a nearly integral point can seem up to 1e-6 of the spread cheaper [2]
RESOLUTION = 2e-6
METHOD_WORDS = {
    "milp": "mixed-integer linear programme (HiGHS), exact: the optimum is proven",
    "milp_piecewise": "mixed-integer linear programme with the heating load modelled piece by "
    "piece (HiGHS), exact: the optimum is proven",
    "enumeration": "every allowed set evaluated, exact",
    "milp_bound": "mixed-integer linear programme on an optimistic bound (HiGHS): the best set "
    "found, not proven optimal",
}


@dataclass(frozen=True, slots=True)
class Candidate:
    """A set of upgrades: its selection (option per group), ids, net cost, objective value."""

    selection: tuple[int, ...]
    upgrade_ids: tuple[str, ...]
    net_cost: float
    objective_value: float


@dataclass(frozen=True, slots=True)
class Optimum:
    """The best set within the budget, the frontier and how they were found.

    ``upper_bound`` (only when ``exact`` is false) is a value no allowed set can exceed.
    """

    objective: str
    budget: float
    best: Candidate
    frontier: tuple[Candidate, ...]
    exact: bool
    method: str
    upper_bound: float | None
    sets: int
    frontier_capped: bool
    warnings: tuple[str, ...]


def objective_values(figures: Figures, objective: str) -> FloatArray:
    """The objective of each evaluated variant: NPV, first-year savings or CO2 avoided [kg]."""
    if objective == "npv":
        return figures.npv
    if objective == "annual_savings":
        return figures.annual_savings
    if objective == "co2":
        return figures.co2_avoided_kg
    raise ValueError(f"the objective must be one of {', '.join(OBJECTIVES)}")


def candidate(variants: Variants, row: IntArray, objective: str) -> Candidate:
    figures = variants.evaluate(row[None, :])
    return Candidate(
        selection=tuple(int(v) for v in row),
        upgrade_ids=variants.upgrade_ids(row),
        net_cost=float(figures.net_cost[0]),
        objective_value=float(objective_values(figures, objective)[0]),
    )


def within_budget(net_cost: float, budget: float) -> bool:
    return net_cost <= budget + TOLERANCE * max(1.0, abs(budget))


def cost_step(net_cost: float) -> float:
    return 1e-7 * max(1.0, abs(net_cost))


def spread_words(limit: int) -> str:
    return (
        f"the frontier has more than {limit} points: {limit} of them are listed, spread evenly "
        "over it from the cheapest to the dearest, the best set for the budget among them"
    )


def capped_words(limit: int) -> str:
    return f"the frontier has more than {limit} points: the {limit} of highest net cost are listed"
