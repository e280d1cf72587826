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
from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np

if TYPE_CHECKING:  # scipy is imported where a solve needs it: it adds ~50 MB to every worker
    from scipy.optimize import Bounds, LinearConstraint

from server.physics import energy
from server.physics import house_model as model
from server.physics.fuels import KWH_J
from server.physics.units import BTU_J, HOUR_S
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


# --- the heating load as a function of UA --------------------------------------------------


@dataclass(frozen=True, slots=True)
class Piece:
    """L / 86 400 = slope · UA + offset [W/K · K·day] for UA in [start, end] [W/K]."""

    start: float
    end: float
    slope: float
    offset: float


def load_pieces(climate: model.Climate, ua_low: float, ua_high: float) -> list[Piece]:
    """The heating load L(UA)/86 400 as linear pieces covering [ua_low, ua_high] (proof, 4).

    Fixed base: one piece, slope HDD. Variable base with gains G > 0: breakpoints
    UA_i = G / (T_set − b_i) for the table bases below the setpoint; slope h_i + s_i (T_set −
    b_i) and offset −s_i G on table segment i; slope h_0 (or h_n) where the balance point is
    clamped to the table's lowest (highest) base.
    """
    vb = climate.variable_base
    if vb is None:
        return [Piece(ua_low, ua_high, climate.hdd_k_day, 0.0)]
    bases, hdd = vb.bases_c, vb.hdd_k_day
    setpoint, gains = vb.setpoint_c, vb.internal_gains_w
    if gains == 0:
        base = min(max(setpoint, bases[0]), bases[-1])
        value = float(np.interp(base, np.array(bases), np.array(hdd)))
        return [Piece(ua_low, ua_high, value, 0.0)]
    pieces: list[Piece] = []

    def at(base: float) -> float:  # UA at which the balance point is ``base``
        return gains / (setpoint - base) if base < setpoint else math.inf

    pieces.append(Piece(0.0, at(bases[0]), hdd[0], 0.0))
    for i in range(len(bases) - 1):
        slope_t = (hdd[i + 1] - hdd[i]) / (bases[i + 1] - bases[i])
        pieces.append(
            Piece(
                at(bases[i]),
                at(bases[i + 1]),
                hdd[i] + slope_t * (setpoint - bases[i]),
                -slope_t * gains,
            )
        )
    pieces.append(Piece(at(bases[-1]), math.inf, hdd[-1], 0.0))
    kept = [
        Piece(max(p.start, ua_low), min(p.end, ua_high), p.slope, p.offset)
        for p in pieces
        if p.start < p.end and p.end >= ua_low and p.start <= ua_high
    ]
    # pieces of zero length at a shared breakpoint add nothing
    useful = [p for p in kept if p.end > p.start]
    return useful or kept[:1]


def convex_on_range(pieces: list[Piece]) -> bool:
    """Are the pieces' slopes nondecreasing in UA (L convex on their interval; proof, 3)?"""
    slopes = [p.slope for p in pieces]
    scale = max((abs(s) for s in slopes), default=1.0) or 1.0
    return all(b >= a - 1e-12 * scale for a, b in zip(slopes, slopes[1:], strict=False))


# --- the linear model ------------------------------------------------------------------------


@dataclass
class _Model:
    """Coefficients of the minimised ``−objective`` per option, in one flat vector."""

    starts: list[int]
    cost_x: FloatArray  # k_U·ua + k_P·p + k_C·c per option (load term apart)
    k_load: float  # per unit of L / 86 400
    ua_x: FloatArray  # UA per option (chord slope × U·A for coupled groups)
    ua_const: float
    net_x: FloatArray
    pieces: list[Piece]
    relaxed: bool


def _coefficients(variants: Variants, objective: str) -> tuple[float, float, float, float]:
    """(k_J per J of heating load or pipe loss, k_U per W/K of cooling, k_C per net cost,
    nothing) of the minimised −objective."""
    house = variants.house
    heating = house.heating
    per_j_fuel = 1.0 / (heating.efficiency * heating.fuel.energy_per_unit_j)
    cool_kwh_per_ua = 0.0
    if house.cooling is not None:
        cooling = house.cooling
        per_j = (
            (1.0 / BTU_J / cooling.seer * HOUR_S)
            if cooling.seer is not None
            else 1.0 / (cooling.cop or 1.0)
        )
        cool_kwh_per_ua = house.climate.cdd_k_day * energy.DAY_S * per_j / KWH_J
    if objective == "co2":
        heating_factor = 0.0 if heating.fuel.biogenic else model.heating_co2_per_unit(house)
        return (
            per_j_fuel * heating_factor,
            cool_kwh_per_ua * house.electricity_co2_kg_per_kwh,
            0.0,
            0.0,
        )
    price_e = 0.0 if house.cooling is None else house.cooling.electricity_price_per_kwh
    k_j = per_j_fuel * heating.price_per_unit
    k_u = cool_kwh_per_ua * price_e
    if objective == "npv":
        return k_j * variants.upv, k_u * variants.upv, 1.0, 0.0
    return k_j, k_u, 0.0, 0.0


def _ua_range(variants: Variants) -> tuple[float, float, list[tuple[int, float, float]]]:
    """Lowest and highest UA any selection reaches [W/K] and each coupled space's chord
    (space index, slope, intercept) of b·H_iu over [H_min, H_max] (proof, 5)."""
    from server.physics.variants import adjustment_factor

    coupled = {g for space in variants.coupled for g in space.groups}
    low = sum(float(variants.ua[g].min()) for g in range(len(variants.groups)) if g not in coupled)
    high = sum(float(variants.ua[g].max()) for g in range(len(variants.groups)) if g not in coupled)
    chords = []
    for index, space in enumerate(variants.coupled):
        h_min = sum(float(variants.ua[g].min()) for g in space.groups)
        h_max = sum(float(variants.ua[g].max()) for g in space.groups)
        ends = np.array([h_min, h_max])
        g_ends = adjustment_factor(ends, space.h_ue_w_per_k) * ends
        slope = 0.0 if h_max == h_min else float((g_ends[1] - g_ends[0]) / (h_max - h_min))
        chords.append((index, slope, float(g_ends[0] - slope * h_min)))
        low += float(g_ends[0])
        high += float(g_ends[1])
    return low, high, chords


def _model(variants: Variants, objective: str) -> _Model:
    k_j, k_u, k_c, _ = _coefficients(variants, objective)
    low, high, chords = _ua_range(variants)
    coupled_slope: dict[int, float] = {}
    ua_const = 0.0
    for index, slope, intercept in chords:
        ua_const += intercept
        for g in variants.coupled[index].groups:
            coupled_slope[g] = slope
    starts, cost, ua, net = [], [], [], []
    position = 0
    for g in range(len(variants.groups)):
        starts.append(position)
        position += len(variants.groups[g].options)
        scale = coupled_slope.get(g, 1.0)
        ua.append(variants.ua[g] * scale)
        net.append(variants.installed[g] - variants.rebate[g])
        cost.append(k_u * ua[-1] + k_j * variants.pipe[g] + k_c * net[-1])
    pad = 1e-9 * max(1.0, abs(high))
    pieces = load_pieces(variants.house.climate, max(low - pad, 0.0), high + pad)
    return _Model(
        starts=starts,
        cost_x=np.concatenate(cost) if cost else np.zeros(0),
        k_load=k_j * energy.DAY_S,
        ua_x=np.concatenate(ua) if ua else np.zeros(0),
        ua_const=ua_const,
        net_x=np.concatenate(net) if net else np.zeros(0),
        pieces=pieces,
        relaxed=bool(variants.coupled),
    )


@dataclass
class _Solver:
    """One MILP of the family: max objective (or min net cost at a held objective)."""

    variants: Variants
    model: _Model
    piecewise: bool
    solves: int = 0

    def _layout(self) -> tuple[int, int, int]:
        """(number of x, index of the first load variable, number of load variables)."""
        n = self.model.cost_x.size
        if len(self.model.pieces) == 1:
            return n, n, 0
        if not self.piecewise:
            return n, n, 1
        return n, n, 2 * len(self.model.pieces)

    def _rows(
        self, budget: float, held: float | None, scale: float
    ) -> tuple[FloatArray, list[LinearConstraint], FloatArray, Bounds, FloatArray]:
        from scipy.optimize import Bounds, LinearConstraint
        from scipy.sparse import csr_array, lil_array

        m = self.model
        n, first, extra = self._layout()
        total = n + extra
        # minimised −objective (scaled), load term by layout
        c = np.zeros(total)
        c[:n] = m.cost_x
        pieces = m.pieces
        if extra == 0:
            c[:n] += m.k_load * pieces[0].slope * m.ua_x
            const = m.k_load * (pieces[0].slope * m.ua_const + pieces[0].offset)
        elif not self.piecewise:
            c[first] = m.k_load
            const = 0.0
        else:
            for j, p in enumerate(pieces):
                c[first + j] = m.k_load * p.offset  # w_j
                c[first + len(pieces) + j] = m.k_load * p.slope  # v_j
            const = 0.0
        c *= scale
        const *= scale
        constraints: list[LinearConstraint] = []
        groups = len(m.starts)
        eq = lil_array((groups, total))
        for g, start in enumerate(m.starts):
            eq[g, start : start + len(self.variants.groups[g].options)] = 1.0
        constraints.append(LinearConstraint(csr_array(eq), 1.0, 1.0))
        if math.isfinite(budget):
            row = np.zeros(total)
            row[:n] = m.net_x
            constraints.append(
                LinearConstraint(row[None, :], -np.inf, budget + TOLERANCE * max(1.0, abs(budget)))
            )
        lower = np.zeros(total)
        upper = np.ones(total)
        integrality = np.zeros(total)
        integrality[:n] = 1
        if extra and not self.piecewise:
            # y ≥ slope_k · UA + offset_k for every piece (epigraph, proof 3)
            rows = np.zeros((len(pieces), total))
            rhs = np.zeros(len(pieces))
            for k, p in enumerate(pieces):
                rows[k, :n] = p.slope * m.ua_x
                rows[k, first] = -1.0
                rhs[k] = -(p.slope * m.ua_const + p.offset)
            constraints.append(LinearConstraint(rows, -np.inf, rhs))
            upper[first] = np.inf
        elif extra:
            s = len(pieces)
            w = first
            v = first + s
            integrality[w : w + s] = 1
            upper[v : v + s] = [p.end for p in pieces]
            link = np.zeros((1, total))
            link[0, :n] = -m.ua_x
            link[0, v : v + s] = 1.0
            constraints.append(LinearConstraint(link, m.ua_const, m.ua_const))
            choose = np.zeros((1, total))
            choose[0, w : w + s] = 1.0
            constraints.append(LinearConstraint(choose, 1.0, 1.0))
            bounds_rows = np.zeros((2 * s, total))
            for j, p in enumerate(pieces):
                bounds_rows[2 * j, v + j] = 1.0
                bounds_rows[2 * j, w + j] = -p.end
                bounds_rows[2 * j + 1, v + j] = -1.0
                bounds_rows[2 * j + 1, w + j] = p.start
            constraints.append(LinearConstraint(bounds_rows, -np.inf, 0.0))
        if held is not None:
            constraints.append(LinearConstraint(c[None, :], -np.inf, held - const))
        return c, constraints, integrality, Bounds(lower, upper), np.array([const])

    def _run(
        self,
        c: FloatArray,
        constraints: list[LinearConstraint],
        integrality: FloatArray,
        bounds: Bounds,
    ) -> FloatArray | None:
        from scipy.optimize import milp

        self.solves += 1
        result = milp(
            c,
            constraints=constraints,
            integrality=integrality,
            bounds=bounds,
            options={"mip_rel_gap": 1e-12, "presolve": True},
        )
        if result.x is None or result.status not in (0,):
            return None
        return np.asarray(result.x)

    def _selection(self, x: FloatArray) -> IntArray:
        m = self.model
        row = np.zeros(len(m.starts), dtype=np.int64)
        for g, start in enumerate(m.starts):
            size = len(self.variants.groups[g].options)
            row[g] = int(np.argmax(x[start : start + size]))
        return row

    def scale(self) -> float:
        """Factor that makes the spread of the minimised objective about 1e6."""
        m = self.model
        spread = 0.0
        for g, start in enumerate(m.starts):
            size = len(self.variants.groups[g].options)
            part = (
                m.cost_x[start : start + size]
                + m.k_load * max(p.slope for p in m.pieces) * m.ua_x[start : start + size]
            )
            spread += float(part.max() - part.min())
        return 1e6 / spread if spread > 0 else 1.0

    def best(self, budget: float) -> tuple[IntArray, IntArray | None] | None:
        """The selection of highest objective with net cost ≤ budget, and the cheapest
        selection of (about) that objective, to be checked by the caller."""
        scale = self.scale()
        c, cons, integrality, bounds, const = self._rows(budget, None, scale)
        x = self._run(c, cons, integrality, bounds)
        if x is None:
            return None
        held = float(c @ x + const[0])
        tie = TOLERANCE * 1e6
        c2, cons2, integrality2, bounds2, _ = self._rows(budget, held + tie, scale)
        cost = np.zeros_like(c2)
        cost[: self.model.net_x.size] = self.model.net_x
        x2 = self._run(cost, cons2, integrality2, bounds2)
        return self._selection(x), None if x2 is None else self._selection(x2)


def _candidate(variants: Variants, row: IntArray, objective: str) -> Candidate:
    figures = variants.evaluate(row[None, :])
    return Candidate(
        selection=tuple(int(v) for v in row),
        upgrade_ids=variants.upgrade_ids(row),
        net_cost=float(figures.net_cost[0]),
        objective_value=float(objective_values(figures, objective)[0]),
    )


def _within(net_cost: float, budget: float) -> bool:
    return net_cost <= budget + TOLERANCE * max(1.0, abs(budget))


def _step(net_cost: float) -> float:
    return 1e-7 * max(1.0, abs(net_cost))


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
        if kept and cost - float(costs[kept[-1]]) <= _step(float(costs[kept[-1]])):
            if value > float(values[kept[-1]]) + tie:
                kept[-1] = int(index)
                running = value
            continue
        if value > running + tie:
            kept.append(int(index))
            running = value
    return kept


def _enumerate(
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
    best = _candidate(variants, rows[choice], objective)
    front = pareto(costs, values)
    capped = 0 < limit < len(front)
    front = front[len(front) - limit :] if limit > 0 else []
    return best, [_candidate(variants, rows[i], objective) for i in front], capped


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
    m = _model(variants, objective)
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
        empty = _candidate(variants, np.zeros(len(variants.groups), dtype=np.int64), objective)
        return Optimum(
            objective, budget, empty, (), False, "enumeration", None, sets, False, (words,)
        )
    if method == "enumeration" or (
        method == "auto"
        and (m.relaxed or not convex or variants.nonlinear is not None)
        and sets <= MAX_ENUMERATION
    ):
        best, listed, capped = _enumerate(variants, budget, objective, frontier_limit)
        if capped:
            warnings.append(_capped_words(frontier_limit))
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
    solver = _Solver(variants, m, piecewise=not convex)
    name = "milp_bound" if m.relaxed else ("milp" if convex else "milp_piecewise")
    empty = _candidate(variants, np.zeros(len(variants.groups), dtype=np.int64), objective)

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
            found = _candidate(variants, rows[0], objective)
            if math.isfinite(limit_budget) and not _within(found.net_cost, limit_budget):
                # HiGHS's integrality tolerance (1e-6) let a nearly integral point over the
                # budget: tighten by the excess and a growing share of the cost spread, retry
                bound -= (found.net_cost - bound) + RESOLUTION * max(1.0, cost_spread) * 2**attempt
                continue
            if rows[1] is not None:  # the cheapest of that objective, when it checks out
                cheaper = _candidate(variants, rows[1], objective)
                tie = TOLERANCE * max(1.0, abs(found.objective_value))
                if (
                    cheaper.net_cost <= found.net_cost
                    and (not math.isfinite(limit_budget) or _within(cheaper.net_cost, limit_budget))
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
        upper = _relaxed_value(variants, m, row, objective)
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
        front, capped = _merged_frontier(variants, m, objective, frontier_limit, best)
        if capped:
            warnings.append(_spread_words(frontier_limit))
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
            limit_budget = found.net_cost - max(_step(found.net_cost), RESOLUTION * cost_spread)
            if limit_budget < low_cost - _step(low_cost):
                break
        front.reverse()
        if m.relaxed:
            values = np.array([p.objective_value for p in front])
            costs = np.array([p.net_cost for p in front])
            front = [front[i] for i in pareto(costs, values)] if front else []
        if capped:
            warnings.append(_capped_words(frontier_limit))
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


def _spread_words(limit: int) -> str:
    return (
        f"the frontier has more than {limit} points: {limit} of them are listed, spread evenly "
        "over it from the cheapest to the dearest, the best set for the budget among them"
    )


def _merged_frontier(
    variants: Variants, m: _Model, objective: str, limit: int, best: Candidate
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
    return [_candidate(variants, rows[i], objective) for i in front], capped


def _capped_words(limit: int) -> str:
    return f"the frontier has more than {limit} points: the {limit} of highest net cost are listed"


def _relaxed_value(variants: Variants, m: _Model, row: IntArray, objective: str) -> float:
    """The objective of a selection in the relaxed (chord) model: an over-estimate."""
    x = np.zeros(m.ua_x.size)
    for g, start in enumerate(m.starts):
        x[start + int(row[g])] = 1.0
    ua = float(m.ua_x @ x) + m.ua_const
    _ua, pipe, installed, rebate = variants.group_sums(row[None, :])
    figures = variants.figures_from_sums(np.array([ua]), pipe, installed, rebate)
    return float(objective_values(figures, objective)[0])


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
        np.array([_within(c, budget) for c in costs])
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
    warnings = (_capped_words(frontier_limit),) if capped else ()
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
