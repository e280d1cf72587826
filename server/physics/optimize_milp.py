"""The mixed-integer linear programme of the best set: its coefficients and HiGHS solves.

The epigraph form (proof, 3), the piecewise form (proof, 4) and the chord bound of a buffer
space too large to list (proof, 5) share one model; scipy is imported only when a solve runs.
The numbered references are those of :mod:`.optimize` (its docstring holds the proof).
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
from server.physics.optimize_load import Piece, load_pieces
from server.physics.optimize_results import TOLERANCE, objective_values
from server.physics.units import BTU_J, HOUR_S
from server.physics.variants import FloatArray, IntArray, Variants


@dataclass
class LinearModel:
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


def linear_model(variants: Variants, objective: str) -> LinearModel:
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
    return LinearModel(
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
class Solver:
    """One MILP of the family: max objective (or min net cost at a held objective)."""

    variants: Variants
    model: LinearModel
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


def relaxed_value(variants: Variants, m: LinearModel, row: IntArray, objective: str) -> float:
    """The objective of a selection in the relaxed (chord) model: an over-estimate."""
    x = np.zeros(m.ua_x.size)
    for g, start in enumerate(m.starts):
        x[start + int(row[g])] = 1.0
    ua = float(m.ua_x @ x) + m.ua_const
    _ua, pipe, installed, rebate = variants.group_sums(row[None, :])
    figures = variants.figures_from_sums(np.array([ua]), pipe, installed, rebate)
    return float(objective_values(figures, objective)[0])
