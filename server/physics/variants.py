"""House variants on arrays: the house split into independent choice groups, evaluated in bulk.

A package changes each surface, pipe run and the air leakage at most once, and the degree-day
method of :mod:`.house_model` makes every figure of a variant a function of three sums over
those changes: the whole-house UA [W/K], the pipe losses [J/yr] and the money [1]. So the house
is decomposed once into *choice groups*, each holding the options of one thing that can change:

* a surface: as found, or each assembly upgrade on it; its UA contribution is ``b·U·A`` with b
  = 1 outdoors or on the ground, or a buffer space's given b;
* the surfaces facing one buffer space whose b is computed (ISO 13789 [2]): b = H_ue / (H_iu +
  H_ue) depends on H_iu = Σ U·A of all of them, so they form ONE group whose options are the
  product of their options, each with its ``b(H_iu)·H_iu`` computed exactly for that
  combination. (When the product has more than :data:`GROUP_OPTION_CAP` options the surfaces
  stay separate "coupled" groups and b is applied to their summed U·A at evaluation: still
  exact, but no longer a sum over groups);
* the air leakage: as found, or each air-sealing upgrade (infiltration UA [3]);
* each pipe run: as found, or each pipe-insulation upgrade (annual loss [J]).

Option 0 of every group is the as-found state. A *selection* picks one option per group (an
integer row); :meth:`Variants.evaluate` takes an array of selections and returns every figure
as arrays, with the house's own heating degree-days (fixed base, or the variable base:
balance point = setpoint − gains / UA, clamped to the table, as :class:`.house_model.Climate`
does) and the economic factor UPV* computed once [4]:

    UA   = Σ_g ua[g, s_g]                                    [W/K]
    Q_h  = UA · HDD(UA) · 86 400 s/day,  P = Σ_g pipe[g, s_g]   [J]
    fuel = (Q_h + P) / (η · E_unit);  cooling E = UA · CDD · 86 400 / SEER-or-COP
    s    = cost_as_found − cost;  NPV = s · UPV* − C;  SIR = s · UPV* / C  (C > 0)

The figures equal those of :func:`.house_model.evaluate` and :func:`.house_model.evaluate_option`
for the same set of upgrades (up to the order of floating-point sums).

References
----------
[1] ASHRAE Handbook—Fundamentals (2021), ch. 19, degree-day method (see :mod:`.energy`).
[2] ISO 13789:2017, clause 6.4, the adjustment factor b (see :mod:`.buffer_spaces`).
[3] M. Sherman, LBL N-factor infiltration (see :func:`.energy.infiltration_ua`).
[4] NIST Handbook 135 (1995), ch. 4 and 6: UPV*, NPV, SIR (see :mod:`.economics`).
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np

from server.physics import buffer_spaces as buffers
from server.physics import economics as money
from server.physics import energy
from server.physics import house_model as model
from server.physics import variant_systems as vsys
from server.physics.variant_groups import (
    GROUP_OPTION_CAP,
    ChoiceGroup,
    CoupledSpace,
    Figures,
    FloatArray,
    IntArray,
    Option,
    adjustment_factor,
    build_groups,
    unsupported,
)
from server.physics.variant_selections import Selections

__all__ = [
    "GROUP_OPTION_CAP",
    "ChoiceGroup",
    "CoupledSpace",
    "Figures",
    "FloatArray",
    "IntArray",
    "Option",
    "Variants",
    "adjustment_factor",
    "unsupported",
]
from server.physics.fuels import KWH_J
from server.physics.units import BTU_J, HOUR_S


class Variants(Selections):
    """A house and its upgrades as choice groups, evaluated on arrays.

    Parameters
    ----------
    house : House
        The as-found house (SI).
    upgrades : sequence of Upgrade
        Every candidate upgrade (at most one of them per group in a selection).
    group_cap : int
        Largest product of options a buffer-space group may hold (:data:`GROUP_OPTION_CAP`).

    Raises
    ------
    ValueError
        Duplicate upgrade ids, an upgrade naming a surface or pipe run the house does not
        have, air sealing without a blower-door figure or to a leakier target, a surface
        facing an unknown space.
    """

    def __init__(
        self,
        house: model.House,
        upgrades: Sequence[model.Upgrade],
        *,
        group_cap: int = GROUP_OPTION_CAP,
    ) -> None:
        reason = unsupported(house, upgrades)
        if reason is not None:
            raise ValueError(f"the array core does not model {reason}")
        self.house = house
        seen: set[str] = set()
        for upgrade in upgrades:
            if upgrade.id in seen:
                raise ValueError(f"two upgrades are called '{upgrade.id}'")
            seen.add(upgrade.id)
        self.upgrades = {u.id: u for u in upgrades}
        groups, coupled, self.ducts = build_groups(house, upgrades, group_cap)
        spaces = {s.id: s for s in house.spaces}
        self.groups: tuple[ChoiceGroup, ...] = tuple(groups)
        self.coupled: tuple[CoupledSpace, ...] = tuple(coupled)
        self._coupled_groups = frozenset(g for space in coupled for g in space.groups)
        self._by_set: list[dict[frozenset[str], int]] = [
            {frozenset(option.upgrade_ids): o for o, option in enumerate(group.options)}
            for group in self.groups
        ]
        self._group_of: dict[str, int] = {}
        for g, group in enumerate(self.groups):
            for option in group.options:
                for name in option.upgrade_ids:
                    self._group_of[name] = g
        # per-group arrays and the constants every evaluation uses, computed once
        self.ua = [np.array([o.ua_w_per_k for o in g.options]) for g in self.groups]
        self.pipe = [np.array([o.pipe_loss_j for o in g.options]) for g in self.groups]
        self.installed = [np.array([o.installed_cost for o in g.options]) for g in self.groups]
        self.rebate = [np.array([o.rebate for o in g.options]) for g in self.groups]
        # the same, padded into one (group, option) table each, for gathering every group's
        # value of many selections at once (:meth:`group_sums`)
        widest = max((len(g.options) for g in self.groups), default=1)
        self._tables = np.zeros((4, len(self.groups), widest))
        for g in range(len(self.groups)):
            for t, values in enumerate(
                (self.ua[g], self.pipe[g], self.installed[g], self.rebate[g])
            ):
                self._tables[t, g, : len(values)] = values
        self._ua_columns = np.array(
            [g for g in range(len(self.groups)) if g not in self._coupled_groups], dtype=np.int64
        )
        bases = (
            0 if house.climate.variable_base is None else len(house.climate.variable_base.bases_c)
        )
        has_sun = any(o.solar_w for g in self.groups for o in g.options)
        #: each group's options' solar tables (options, K) [W], None: no sun in the balance
        self.solar = (
            [
                np.array([o.solar_w if o.solar_w else (0.0,) * bases for o in g.options])
                for g in self.groups
            ]
            if has_sun
            else None
        )
        self._duct_b = self._duct_locations(spaces)
        #: why the objective is not a function of the group sums alone (None: it is, the
        #: MILP of :mod:`.optimize` applies)
        self.nonlinear: str | None = None
        if self.ducts is not None:
            self.nonlinear = (
                "the ducts' distribution efficiency, which divides the heating load and "
                "depends on the buffer spaces' b and the season"
            )
        elif has_sun:
            self.nonlinear = (
                "the windows' sun, which moves the balance point with each window's SHGC"
            )
        econ = house.economics
        #: NIST 135's UPV* = Σ_{t=1..N} ((1 + e) / (1 + d))^t [4]
        self.upv = money.present_value_of_savings(
            1.0, econ.discount_rate, econ.escalation_rate, econ.years
        )
        self._as_found = self.evaluate(np.zeros((1, len(self.groups)), dtype=np.int64), _base=True)

    def _duct_locations(
        self, spaces: dict[str, buffers.BufferSpace]
    ) -> tuple[tuple[str, float | int], tuple[str, float | int]]:
        """Where the supply and return run, as ("b", value), ("group", g) or ("coupled", k)."""
        if self.ducts is None:
            return (("b", 0.0), ("b", 0.0))
        found: list[tuple[str, float | int]] = []
        for side in (self.ducts.system.supply, self.ducts.system.returns):
            where = side.location
            if where in (vsys.duct_physics.CONDITIONED, vsys.duct_physics.OUTDOORS):
                found.append(("b", vsys.duct_physics.location_factor(where, {})))
                continue
            group = next(
                (g for g, grp in enumerate(self.groups) if grp.key == f"space:{where}"), None
            )
            coupled = next((k for k, c in enumerate(self.coupled) if c.id == where), None)
            if group is not None:
                found.append(("group", group))
            elif coupled is not None:
                found.append(("coupled", coupled))
            else:  # a given b, or a space no surface faces: b at H_iu = 0
                found.append(("b", buffers.space_factors(spaces[where], 0.0).b))
        return (found[0], found[1])

    def state(self, selections: IntArray) -> vsys.State:
        """The per-variant inputs beyond the group sums (sun, ducts) of each selection."""
        sel = np.asarray(selections, dtype=np.int64)
        if sel.ndim == 1:
            sel = sel[None, :]
        n = sel.shape[0]
        solar = None
        if self.solar is not None:
            solar = np.zeros((n, self.solar[0].shape[1]))
            for g, table in enumerate(self.solar):
                solar += table[sel[:, g]]
        if self.ducts is None:
            return vsys.State(solar=solar)
        sides = []
        for kind, value in self._duct_b:
            if kind == "b":
                sides.append(np.full(n, float(value)))
            elif kind == "group":
                g = int(value)
                b = np.array([o.space_b for o in self.groups[g].options], dtype=float)
                sides.append(b[sel[:, g]])
            else:
                space = self.coupled[int(value)]
                h_iu = np.zeros(n)
                for g in space.groups:
                    h_iu += self.ua[g][sel[:, g]]
                sides.append(adjustment_factor(h_iu, space.h_ue_w_per_k))
        leak_g = len(self.groups) - 2
        return vsys.State(solar, sel[:, leak_g], sel[:, leak_g + 1], sides[0], sides[1])

    # --- evaluation ---------------------------------------------------------------------------

    def group_sums(
        self, selections: IntArray
    ) -> tuple[FloatArray, FloatArray, FloatArray, FloatArray]:
        """UA [W/K] (b applied), pipe loss [J], installed cost and rebates of each selection."""
        sel = np.asarray(selections, dtype=np.int64)
        if sel.ndim == 1:
            sel = sel[None, :]
        n = sel.shape[0]
        groups = len(self.groups)
        # each group's value of each selection, (4, n, 1 + groups) with a zero column first;
        # the running sum along the groups (np.cumsum adds strictly in order) ends at the sum
        # 0 + v_0 + v_1 + ... of a loop over the groups, float for float
        gathered = np.zeros((4, n, 1 + groups))
        gathered[:, :, 1:] = self._tables[:, np.arange(groups)[None, :], sel]
        sums = np.cumsum(gathered[1:], axis=2)[:, :, -1]
        pipe, installed, rebate = sums[0], sums[1], sums[2]
        if len(self._ua_columns) == groups:
            ua = np.cumsum(gathered[0], axis=1)[:, -1]
        else:
            ua = np.cumsum(gathered[0][:, np.concatenate(([0], 1 + self._ua_columns))], axis=1)[
                :, -1
            ]
        for space in self.coupled:
            h_iu = np.zeros(n)
            for g in space.groups:
                h_iu += self.ua[g][sel[:, g]]
            ua += adjustment_factor(h_iu, space.h_ue_w_per_k) * h_iu
        return ua, pipe, installed, rebate

    def heating_degree_days(self, ua: FloatArray, state: vsys.State | None = None) -> FloatArray:
        """HDD [K·day] at each UA [W/K]: fixed, or at the clamped balance point (as
        :meth:`.house_model.Climate.heating_degree_days`, the sun of ``state`` included)."""
        ua = np.asarray(ua, dtype=float)
        return vsys.heating_energy(self.house, ua, self._state_for(ua, state), None)[0]

    def heating_load_j(self, ua: FloatArray, state: vsys.State | None = None) -> FloatArray:
        """Annual heating load Q = UA · HDD(UA) · 86 400 s/day [J] [1]."""
        ua = np.asarray(ua, dtype=float)
        return vsys.heating_energy(self.house, ua, self._state_for(ua, state), None)[1]

    def delivered_load_j(self, ua: FloatArray, state: vsys.State | None = None) -> FloatArray:
        """What the equipment must make for the load, Q / η_dist [J] (Q without ducts)."""
        ua = np.asarray(ua, dtype=float)
        state = self._state_for(ua, state)
        return vsys.heating_energy(self.house, ua.ravel(), state, self.ducts)[2].reshape(ua.shape)

    def _state_for(self, ua: FloatArray, state: vsys.State | None) -> vsys.State:
        if state is not None:
            return state
        if self.nonlinear is not None:
            raise ValueError(f"the heating of this house needs each variant's {self.nonlinear}")
        return vsys.State()

    def evaluate(self, selections: IntArray, *, _base: bool = False) -> Figures:
        """Every figure of each selection (rows of option indices), as arrays [1], [4]."""
        ua, pipe, installed, rebate = self.group_sums(selections)
        state = self.state(selections)
        return self.figures_from_sums(ua, pipe, installed, rebate, state=state, _base=_base)

    def figures_from_sums(
        self,
        ua: FloatArray,
        pipe: FloatArray,
        installed: FloatArray,
        rebate: FloatArray,
        *,
        state: vsys.State | None = None,
        _base: bool = False,
    ) -> Figures:
        """Every figure from the group sums: UA [W/K], pipe loss [J], installed cost, rebates
        (and ``state``: each variant's sun and ducts, needed when the house has them)."""
        house = self.house
        ua = np.asarray(ua, dtype=float)
        hdd, load, delivered = vsys.heating_energy(
            house, ua, self._state_for(ua, state), self.ducts
        )
        heating = house.heating
        fuel = (delivered + pipe) / (heating.efficiency * heating.fuel.energy_per_unit_j)
        heating_co2 = fuel * model.heating_co2_per_unit(house)
        biogenic = heating_co2 if heating.fuel.biogenic else np.zeros_like(heating_co2)
        heating_co2 = heating_co2 - biogenic
        zeros = np.zeros_like(ua)
        cooling_load, cooling_kwh, cooling_cost = zeros, zeros, zeros
        if house.cooling is not None:
            cooling = house.cooling
            cooling_load = ua * house.climate.cdd_k_day * energy.DAY_S
            if cooling.seer is not None:
                electricity = cooling_load / BTU_J / cooling.seer * HOUR_S
            elif cooling.cop is not None:
                electricity = cooling_load / cooling.cop
            else:
                raise ValueError("the cooling system needs a SEER or a COP")
            cooling_kwh = electricity / KWH_J
            cooling_cost = cooling_kwh * cooling.electricity_price_per_kwh
        cooling_co2 = cooling_kwh * house.electricity_co2_kg_per_kwh
        heating_cost = fuel * heating.price_per_unit
        total = heating_cost + cooling_cost
        co2 = heating_co2 + cooling_co2
        if _base:
            savings, avoided = zeros, zeros
        else:
            savings = self._as_found.total_cost[0] - total
            avoided = self._as_found.co2_kg[0] - co2
        net = installed - rebate
        present = savings * self.upv
        safe_net = np.where(net > 0, net, 1.0)
        return Figures(
            ua_w_per_k=ua,
            heating_degree_days_k_day=hdd,
            heating_load_j=load,
            pipe_loss_j=pipe,
            heating_fuel_units=fuel,
            heating_cost=heating_cost,
            cooling_load_j=cooling_load,
            cooling_electricity_kwh=cooling_kwh,
            cooling_cost=cooling_cost,
            total_cost=total,
            heating_co2_kg=heating_co2,
            cooling_co2_kg=cooling_co2,
            co2_kg=co2,
            co2_biogenic_kg=biogenic,
            installed_cost=installed,
            rebates=rebate,
            net_cost=net,
            annual_savings=savings,
            co2_avoided_kg=avoided,
            present_value=present,
            npv=present - net,
            sir=np.where(net > 0, present / safe_net, np.nan),
        )

    @property
    def as_found(self) -> Figures:
        """The as-found house's figures (one element each)."""
        return self._as_found

    def evaluate_packages(self, packages: Sequence[Sequence[str]]) -> Figures:
        """Figures of each package (a list of upgrade ids), one element per package."""
        rows = [self.selection(p) for p in packages]
        if not rows:
            return self.evaluate(np.zeros((0, len(self.groups)), dtype=np.int64))
        return self.evaluate(np.stack(rows))
