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

import itertools
import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
import numpy.typing as npt

from server.physics import buffer_spaces as buffers
from server.physics import economics as money
from server.physics import energy
from server.physics import house_model as model
from server.physics.fuels import KWH_J
from server.physics.units import BTU_J, HOUR_S

#: most options one buffer-space group may hold as a product of its surfaces' options (a
#: memory bound, common practice); beyond it the surfaces stay separate coupled groups
GROUP_OPTION_CAP = 65_536

FloatArray = npt.NDArray[np.float64]
IntArray = npt.NDArray[np.int64]


@dataclass(frozen=True, slots=True)
class Option:
    """One state of a choice group.

    ``ua_w_per_k`` is the group's UA contribution [W/K] (after b; for a coupled group the
    plain U·A before b), ``pipe_loss_j`` its annual pipe loss [J]; money in the caller's
    currency. ``upgrade_ids`` is empty for the as-found state.
    """

    upgrade_ids: tuple[str, ...]
    ua_w_per_k: float = 0.0
    pipe_loss_j: float = 0.0
    installed_cost: float = 0.0
    rebate: float = 0.0

    @property
    def net_cost(self) -> float:
        """Installed cost − rebates [money]."""
        return self.installed_cost - self.rebate


@dataclass(frozen=True, slots=True)
class ChoiceGroup:
    """What one surface, buffer-space group, the air leakage or one pipe run can become.

    ``targets`` are the :func:`.house_model.upgrade_target` names it covers; ``space`` is set
    on a coupled group only (its U·A is summed with the space's other coupled groups and b is
    applied to the sum).
    """

    key: str
    targets: tuple[str, ...]
    options: tuple[Option, ...]
    space: str | None = None


@dataclass(frozen=True, slots=True)
class CoupledSpace:
    """A buffer space whose surfaces stay separate groups: H_ue [W/K] and the group indices."""

    id: str
    h_ue_w_per_k: float
    groups: tuple[int, ...]


@dataclass(frozen=True, slots=True)
class Figures:
    """Figures of many variants, one array element per selection (SI, money, kg)."""

    ua_w_per_k: FloatArray
    heating_degree_days_k_day: FloatArray
    heating_load_j: FloatArray
    pipe_loss_j: FloatArray
    heating_fuel_units: FloatArray
    heating_cost: FloatArray
    cooling_load_j: FloatArray
    cooling_electricity_kwh: FloatArray
    cooling_cost: FloatArray
    total_cost: FloatArray
    heating_co2_kg: FloatArray
    cooling_co2_kg: FloatArray
    co2_kg: FloatArray
    co2_biogenic_kg: FloatArray
    installed_cost: FloatArray
    rebates: FloatArray
    net_cost: FloatArray
    annual_savings: FloatArray
    co2_avoided_kg: FloatArray
    present_value: FloatArray
    npv: FloatArray
    #: NaN where the net cost is zero or less (no investment: the ratio has no meaning)
    sir: FloatArray


def unsupported(house: model.House, upgrades: Sequence[model.Upgrade] = ()) -> str | None:
    """What of ``house`` the array core does not model, in words, or None when it models all.

    The core covers the degree-day house of :func:`.house_model.evaluate` without the
    systems inputs (ducts, heat pump by bins, ventilation, altitude), with pipe runs counted
    in full at the heating system (no ``location`` and no water heater of their own), and
    assembly, air-sealing and pipe-insulation upgrades.
    """
    known = (model.AssemblyUpgrade, model.AirSealingUpgrade, model.PipeInsulationUpgrade)
    for upgrade in upgrades:
        if not isinstance(upgrade, known):
            return f"upgrade '{upgrade.id}' ({type(upgrade).__name__})"
    if house.systems is not None:
        return "the heating and ventilation systems' inputs (ducts, bins, ventilation, altitude)"
    if house.climate.variable_base is not None:
        for surface in house.surfaces:
            if surface.shgc > 0 and surface.solar_w_per_m2:
                return f"window '{surface.id}': solar gains that move the balance point"
    for upgrade in upgrades:
        if isinstance(upgrade, model.AssemblyUpgrade) and upgrade.shgc is not None:
            return f"upgrade '{upgrade.id}': a window's new solar heat gain coefficient"
    for run in house.pipe_runs:
        if run.location is not None or run.water_heater is not None:
            return f"pipe run '{run.id}': where it runs or its own water heater"
    return None


def adjustment_factor(h_iu: FloatArray, h_ue: float) -> FloatArray:
    """b = H_ue / (H_iu + H_ue), at most 1, and 0 when both are zero [2] (arrays, [W/K])."""
    total = h_iu + h_ue
    safe = np.where(total == 0, 1.0, total)
    return np.where(total == 0, 0.0, np.minimum(1.0, h_ue / safe))


def _air_options(house: model.House, upgrades: Sequence[model.AirSealingUpgrade]) -> ChoiceGroup:
    leak = house.air_leakage
    assert leak is not None
    options = [
        Option((), energy.infiltration_ua(leak.flow50_m3_per_s, leak.n_factor, leak.volume_m3))
    ]
    for upgrade in upgrades:
        if upgrade.flow50_after_m3_per_s > leak.flow50_m3_per_s * (1 + 1e-12):
            raise ValueError(
                f"upgrade '{upgrade.id}': the air-sealing target is leakier than the house"
            )
        ua = energy.infiltration_ua(upgrade.flow50_after_m3_per_s, leak.n_factor, leak.volume_m3)
        options.append(Option((upgrade.id,), ua, 0.0, upgrade.installed_cost, upgrade.rebate))
    return ChoiceGroup("air", ("air",), tuple(options))


def _surface_options(
    surface: model.Surface, upgrades: Sequence[model.AssemblyUpgrade], b: float
) -> tuple[Option, ...]:
    found = Option((), b * surface.u_si * surface.area_m2)
    return (found,) + tuple(
        Option((u.id,), b * u.u_si * surface.area_m2, 0.0, u.installed_cost, u.rebate)
        for u in upgrades
    )


def _product(
    space: buffers.BufferSpace, members: Sequence[tuple[Option, ...]]
) -> tuple[Option, ...]:
    """Every combination of the members' options, with b(H_iu)·H_iu of that combination."""
    options = []
    for combo in itertools.product(*members):
        h_iu = sum(o.ua_w_per_k for o in combo)
        b = buffers.space_factors(space, h_iu).b
        options.append(
            Option(
                tuple(name for o in combo for name in o.upgrade_ids),
                b * h_iu,
                0.0,
                sum(o.installed_cost for o in combo),
                sum(o.rebate for o in combo),
            )
        )
    return tuple(options)


class Variants:
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
        surfaces = {s.id: s for s in house.surfaces}
        pipes = {p.id: p for p in house.pipe_runs}
        spaces = {s.id: s for s in house.spaces}
        on_surface: dict[str, list[model.AssemblyUpgrade]] = {s: [] for s in surfaces}
        on_pipe: dict[str, list[model.PipeInsulationUpgrade]] = {p: [] for p in pipes}
        sealing: list[model.AirSealingUpgrade] = []
        for upgrade in upgrades:
            if isinstance(upgrade, model.AssemblyUpgrade):
                if upgrade.surface_id not in surfaces:
                    raise ValueError(
                        f"upgrade '{upgrade.id}': there is no surface '{upgrade.surface_id}'"
                    )
                on_surface[upgrade.surface_id].append(upgrade)
            elif isinstance(upgrade, model.PipeInsulationUpgrade):
                if upgrade.pipe_id not in pipes:
                    raise ValueError(
                        f"upgrade '{upgrade.id}': there is no pipe run '{upgrade.pipe_id}'"
                    )
                on_pipe[upgrade.pipe_id].append(upgrade)
            elif isinstance(upgrade, model.AirSealingUpgrade):
                if house.air_leakage is None:
                    raise ValueError(f"upgrade '{upgrade.id}': the house has no air-leakage figure")
                sealing.append(upgrade)
        groups: list[ChoiceGroup] = []
        coupled: list[CoupledSpace] = []
        done: set[str] = set()
        for surface in house.surfaces:
            behind = surface.adjacent
            if behind in (buffers.OUTDOORS, buffers.GROUND):
                options = _surface_options(surface, on_surface[surface.id], 1.0)
                groups.append(
                    ChoiceGroup(f"surface:{surface.id}", (f"surface:{surface.id}",), options)
                )
                continue
            if behind not in spaces:
                raise ValueError(f"surface '{surface.id}': there is no space '{behind}'")
            space = spaces[behind]
            if space.b is not None:
                b = buffers.space_factors(space, 0.0).b  # checks 0 <= b <= 1
                options = _surface_options(surface, on_surface[surface.id], b)
                groups.append(
                    ChoiceGroup(f"surface:{surface.id}", (f"surface:{surface.id}",), options)
                )
                continue
            if behind in done:
                continue
            done.add(behind)
            members = [s for s in house.surfaces if s.adjacent == behind]
            member_options = [_surface_options(s, on_surface[s.id], 1.0) for s in members]
            targets = tuple(f"surface:{s.id}" for s in members)
            if math.prod(len(o) for o in member_options) <= group_cap:
                groups.append(
                    ChoiceGroup(f"space:{behind}", targets, _product(space, member_options))
                )
            else:
                first = len(groups)
                for s, options in zip(members, member_options, strict=True):
                    groups.append(
                        ChoiceGroup(f"surface:{s.id}", (f"surface:{s.id}",), options, behind)
                    )
                h_ue = buffers.space_to_outside_conductance(
                    space.exposed, space.volume_m3, space.air_changes_per_h
                )
                coupled.append(CoupledSpace(behind, h_ue, tuple(range(first, len(groups)))))
        if house.air_leakage is not None:
            groups.append(_air_options(house, sealing))
        for run in house.pipe_runs:
            options_list = [
                Option(
                    (),
                    pipe_loss_j=energy.pipe_annual_loss(
                        run.length_m, run.r_per_length_si, run.delta_t_k, run.hours_per_year
                    ),
                )
            ]
            for upgrade in on_pipe[run.id]:
                loss = energy.pipe_annual_loss(
                    run.length_m, upgrade.r_per_length_si, run.delta_t_k, run.hours_per_year
                )
                options_list.append(
                    Option((upgrade.id,), 0.0, loss, upgrade.installed_cost, upgrade.rebate)
                )
            groups.append(ChoiceGroup(f"pipe:{run.id}", (f"pipe:{run.id}",), tuple(options_list)))
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
        econ = house.economics
        #: NIST 135's UPV* = Σ_{t=1..N} ((1 + e) / (1 + d))^t [4]
        self.upv = money.present_value_of_savings(
            1.0, econ.discount_rate, econ.escalation_rate, econ.years
        )
        self._as_found = self.evaluate(np.zeros((1, len(self.groups)), dtype=np.int64), _base=True)

    # --- selections ---------------------------------------------------------------------------

    @property
    def sizes(self) -> tuple[int, ...]:
        """Number of options of each group."""
        return tuple(len(g.options) for g in self.groups)

    def count(self) -> int:
        """Number of allowed sets of upgrades (the product of the groups' option counts)."""
        return math.prod(self.sizes)

    def selection(self, upgrade_ids: Sequence[str]) -> IntArray:
        """The selection (option index per group) of a set of upgrades.

        Raises
        ------
        ValueError
            An unknown upgrade, or two upgrades that change the same surface, pipe run or
            the air leakage.
        """
        chosen: dict[int, set[str]] = {}
        targets: dict[str, str] = {}
        for name in upgrade_ids:
            if name not in self._group_of:
                raise ValueError(f"there is no upgrade '{name}'")
            target = model.upgrade_target(self.upgrades[name])
            if target in targets:
                raise ValueError(
                    f"upgrades '{targets[target]}' and '{name}' both change "
                    f"{target.replace(':', ' ')}; a package can change each surface, pipe run "
                    "or the air leakage only once"
                )
            targets[target] = name
            chosen.setdefault(self._group_of[name], set()).add(name)
        row = np.zeros(len(self.groups), dtype=np.int64)
        for g, names in chosen.items():
            row[g] = self._by_set[g][frozenset(names)]
        return row

    def upgrade_ids(self, selection: Sequence[int] | IntArray) -> tuple[str, ...]:
        """The upgrades of a selection, in the order the upgrades were given."""
        names = {
            name
            for g, o in enumerate(selection)
            for name in self.groups[g].options[int(o)].upgrade_ids
        }
        return tuple(name for name in self.upgrades if name in names)

    def all_selections(self) -> IntArray:
        """Every allowed selection, one row each (the cartesian product; mind its size)."""
        sizes = self.sizes
        if not sizes:
            return np.zeros((1, 0), dtype=np.int64)
        grid = np.indices(sizes, dtype=np.int64)
        return grid.reshape(len(sizes), -1).T.copy()

    # --- evaluation ---------------------------------------------------------------------------

    def group_sums(
        self, selections: IntArray
    ) -> tuple[FloatArray, FloatArray, FloatArray, FloatArray]:
        """UA [W/K] (b applied), pipe loss [J], installed cost and rebates of each selection."""
        sel = np.asarray(selections, dtype=np.int64)
        if sel.ndim == 1:
            sel = sel[None, :]
        n = sel.shape[0]
        ua = np.zeros(n)
        pipe = np.zeros(n)
        installed = np.zeros(n)
        rebate = np.zeros(n)
        for g in range(len(self.groups)):
            column = sel[:, g]
            if g not in self._coupled_groups:
                ua += self.ua[g][column]
            pipe += self.pipe[g][column]
            installed += self.installed[g][column]
            rebate += self.rebate[g][column]
        for space in self.coupled:
            h_iu = np.zeros(n)
            for g in space.groups:
                h_iu += self.ua[g][sel[:, g]]
            ua += adjustment_factor(h_iu, space.h_ue_w_per_k) * h_iu
        return ua, pipe, installed, rebate

    def heating_degree_days(self, ua: FloatArray) -> FloatArray:
        """HDD [K·day] at each UA [W/K]: fixed, or at the clamped balance point (as
        :meth:`.house_model.Climate.heating_degree_days`)."""
        climate = self.house.climate
        vb = climate.variable_base
        ua = np.asarray(ua, dtype=float)
        if vb is None:
            return np.full(ua.shape, climate.hdd_k_day)
        positive = ua > 0
        safe = np.where(positive, ua, 1.0)
        balance = np.clip(vb.setpoint_c - vb.internal_gains_w / safe, vb.bases_c[0], vb.bases_c[-1])
        hdd = np.interp(balance, np.array(vb.bases_c), np.array(vb.hdd_k_day))
        return np.where(positive, hdd, climate.hdd_k_day)

    def heating_load_j(self, ua: FloatArray) -> FloatArray:
        """Annual heating load Q = UA · HDD(UA) · 86 400 s/day [J] [1]."""
        ua = np.asarray(ua, dtype=float)
        return ua * self.heating_degree_days(ua) * energy.DAY_S

    def evaluate(self, selections: IntArray, *, _base: bool = False) -> Figures:
        """Every figure of each selection (rows of option indices), as arrays [1], [4]."""
        ua, pipe, installed, rebate = self.group_sums(selections)
        return self.figures_from_sums(ua, pipe, installed, rebate, _base=_base)

    def figures_from_sums(
        self,
        ua: FloatArray,
        pipe: FloatArray,
        installed: FloatArray,
        rebate: FloatArray,
        *,
        _base: bool = False,
    ) -> Figures:
        """Every figure from the group sums: UA [W/K], pipe loss [J], installed cost, rebates."""
        house = self.house
        ua = np.asarray(ua, dtype=float)
        hdd = self.heating_degree_days(ua)
        load = ua * hdd * energy.DAY_S
        heating = house.heating
        fuel = (load + pipe) / (heating.efficiency * heating.fuel.energy_per_unit_j)
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
