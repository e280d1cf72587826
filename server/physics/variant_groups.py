"""The choice groups of a house's variants: what each surface, buffer space, the air, each
pipe run and the ducts can become, and the figures the array core returns (see
:mod:`.variants`, which evaluates them)."""

from __future__ import annotations

import itertools
import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
import numpy.typing as npt

from server.physics import buffer_spaces as buffers
from server.physics import energy
from server.physics import house_model as model
from server.physics import systems as sysm
from server.physics import variant_systems as vsys

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
    #: the windows' summed solar table S_i [W] (empty: none; see :mod:`.variant_systems`)
    solar_w: tuple[float, ...] = ()
    #: a buffer-space group's b in this option [-] (None: not a space group)
    space_b: float | None = None

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

    The core covers the degree-day house of :func:`.house_model.evaluate`: buffer spaces, the
    variable base with the windows' sun, temperature bins, ducts (ASHRAE 152), ventilation and
    altitude (:mod:`.variant_systems`); assembly (window SHGC included), air-sealing,
    pipe-insulation and duct upgrades. Not: a heat pump's COP by bins, and pipe runs with a
    ``location`` or a water heater of their own.
    """
    known = (
        model.AssemblyUpgrade,
        model.AirSealingUpgrade,
        model.PipeInsulationUpgrade,
        sysm.DuctSealingUpgrade,
        sysm.DuctInsulationUpgrade,
    )
    for upgrade in upgrades:
        if not isinstance(upgrade, known):
            return f"upgrade '{upgrade.id}' ({type(upgrade).__name__})"
    reason = vsys.unsupported_systems(house, upgrades)
    if reason is not None:
        return reason
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

    def air_ua(infiltration: float) -> float:  # with ventilation and altitude (systems.air)
        found, ventilation = sysm.air(house.systems, infiltration)
        return found + ventilation

    if leak is None:  # no blower-door figure: the ventilation's UA alone
        return ChoiceGroup("air", ("air",), (Option((), air_ua(0.0)),))
    options = [
        Option(
            (),
            air_ua(energy.infiltration_ua(leak.flow50_m3_per_s, leak.n_factor, leak.volume_m3)),
        )
    ]
    for upgrade in upgrades:
        if upgrade.flow50_after_m3_per_s > leak.flow50_m3_per_s * (1 + 1e-12):
            raise ValueError(
                f"upgrade '{upgrade.id}': the air-sealing target is leakier than the house"
            )
        ua = energy.infiltration_ua(upgrade.flow50_after_m3_per_s, leak.n_factor, leak.volume_m3)
        options.append(
            Option((upgrade.id,), air_ua(ua), 0.0, upgrade.installed_cost, upgrade.rebate)
        )
    return ChoiceGroup("air", ("air",), tuple(options))


def _solar(house: model.House, surface: model.Surface, shgc: float) -> tuple[float, ...]:
    vector = vsys.solar_vector(house, surface, shgc)
    return () if vector is None else tuple(float(v) for v in vector)


def _surface_options(
    house: model.House,
    surface: model.Surface,
    upgrades: Sequence[model.AssemblyUpgrade],
    b: float,
) -> tuple[Option, ...]:
    found = Option(
        (), b * surface.u_si * surface.area_m2, solar_w=_solar(house, surface, surface.shgc)
    )
    return (found,) + tuple(
        Option(
            (u.id,),
            b * u.u_si * surface.area_m2,
            0.0,
            u.installed_cost,
            u.rebate,
            _solar(house, surface, surface.shgc if u.shgc is None else u.shgc),
        )
        for u in upgrades
    )


def _sum_solar(options: Sequence[Option]) -> tuple[float, ...]:
    tables = [np.asarray(o.solar_w) for o in options if o.solar_w]
    return tuple(float(v) for v in np.sum(tables, axis=0)) if tables else ()


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
                _sum_solar(combo),
                b,
            )
        )
    return tuple(options)


def build_groups(
    house: model.House, upgrades: Sequence[model.Upgrade], group_cap: int = GROUP_OPTION_CAP
) -> tuple[list[ChoiceGroup], list[CoupledSpace], vsys.DuctOptions | None]:
    """The choice groups of ``house`` and its upgrades (see :mod:`.variants`), the buffer
    spaces left as coupled groups, and the ducts' options (None: no ducts)."""
    surfaces = {s.id: s for s in house.surfaces}
    pipes = {p.id: p for p in house.pipe_runs}
    spaces = {s.id: s for s in house.spaces}
    on_surface: dict[str, list[model.AssemblyUpgrade]] = {s: [] for s in surfaces}
    on_pipe: dict[str, list[model.PipeInsulationUpgrade]] = {p: [] for p in pipes}
    sealing: list[model.AirSealingUpgrade] = []
    duct_sealing: list[sysm.DuctSealingUpgrade] = []
    duct_insulation: list[sysm.DuctInsulationUpgrade] = []
    for upgrade in upgrades:
        if isinstance(upgrade, sysm.DuctSealingUpgrade):
            duct_sealing.append(upgrade)
        elif isinstance(upgrade, sysm.DuctInsulationUpgrade):
            duct_insulation.append(upgrade)
        elif isinstance(upgrade, model.AssemblyUpgrade):
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
            options = _surface_options(house, surface, on_surface[surface.id], 1.0)
            groups.append(ChoiceGroup(f"surface:{surface.id}", (f"surface:{surface.id}",), options))
            continue
        if behind not in spaces:
            raise ValueError(f"surface '{surface.id}': there is no space '{behind}'")
        space = spaces[behind]
        if space.b is not None:
            b = buffers.space_factors(space, 0.0).b  # checks 0 <= b <= 1
            options = _surface_options(house, surface, on_surface[surface.id], b)
            groups.append(ChoiceGroup(f"surface:{surface.id}", (f"surface:{surface.id}",), options))
            continue
        if behind in done:
            continue
        done.add(behind)
        members = [s for s in house.surfaces if s.adjacent == behind]
        member_options = [_surface_options(house, s, on_surface[s.id], 1.0) for s in members]
        targets = tuple(f"surface:{s.id}" for s in members)
        if math.prod(len(o) for o in member_options) <= group_cap:
            groups.append(ChoiceGroup(f"space:{behind}", targets, _product(space, member_options)))
        else:
            first = len(groups)
            for s, options in zip(members, member_options, strict=True):
                groups.append(ChoiceGroup(f"surface:{s.id}", (f"surface:{s.id}",), options, behind))
            h_ue = buffers.space_to_outside_conductance(
                space.exposed, space.volume_m3, space.air_changes_per_h
            )
            coupled.append(CoupledSpace(behind, h_ue, tuple(range(first, len(groups)))))
    if house.air_leakage is not None or sysm.air(house.systems, 0.0)[1] > 0:
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
    ducts = vsys.duct_options(house, duct_sealing, duct_insulation)
    if ducts is not None:
        for key, ids_of, chosen in (
            ("ducts:leakage", ducts.leakage_ids, duct_sealing),
            ("ducts:insulation", ducts.insulation_ids, duct_insulation),
        ):
            options = tuple(
                Option(ids, installed_cost=u.installed_cost, rebate=u.rebate)
                if u is not None
                else Option(ids)
                for ids, u in zip(ids_of, [None, *chosen], strict=True)
            )
            groups.append(ChoiceGroup(key, (key,), options))
    return groups, coupled, ducts
