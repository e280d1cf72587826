"""What the array core adds to the degree-day sums: the sun, the ducts and the air systems.

:mod:`.variants` sums each variant's UA over its choice groups. Three things of a house make
its heating energy more than ``UA · HDD`` at a balance point of ``t_set − Q_int / UA``; each is
carried per variant on arrays here, by the same equations as the package path
(:func:`.house_model.evaluate`):

* the windows' sun with a variable base: each option of a group carries its summed solar
  table S_i = Σ SHGC·A·Ē(b_i) [W], the variant's table is the sum over groups, and the balance
  point is solved per variant by :func:`.gains.balance_points_c` (the segment and closed form
  of :func:`.gains.balance_point_c`); HDD is then read from the table (np.interp, the linear
  interpolation of :func:`.degree_days.interpolate_degree_days`);
* ducts (ASHRAE 152 [1]): the leakage and the insulation are two choice groups (each option
  a leakage pair or the conduction fractions of an R pair); the b of the buffer space each
  duct runs in comes from the variant (a space group's option, a coupled space's b(H_iu), or
  the given b); the season's outdoor temperature from the bins below the variant's balance
  point, else ``t_bal − HDD / 212``; η_dist from
  :func:`.ducts.distribution_efficiency_arrays`; fuel = (Q / η_dist + pipes) / η;
* ventilation and altitude: the air group's options hold the UA of
  :func:`.systems.air` of their infiltration (exact per option).

Temperature bins alone (no ducts, no heat pump) change nothing of a house's figures: they only
feed the ducts' season, a heat pump's COP and pipe runs' season shares.

References
----------
[1] ANSI/ASHRAE Standard 152-2004 (see :mod:`.ducts`).
[2] ASHRAE Handbook—Fundamentals (2017), ch. 19, variable base with solar gains (see
    :mod:`.gains`).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
import numpy.typing as npt

from server.physics import ducts as duct_physics
from server.physics import energy, gains
from server.physics import house_model as model
from server.physics import systems as sysm

FloatArray = npt.NDArray[np.float64]


@dataclass(frozen=True, slots=True)
class DuctOptions:
    """The ducts as found and their upgrades: leakage fractions and conduction fractions.

    ``leakage`` holds (supply, return) leakage fractions per option of the leakage group,
    ``conduction`` (B_s, B_r) per option of the insulation group; ``leakage_ids`` and
    ``insulation_ids`` the upgrade ids of each option (empty for the as-found one).
    """

    system: duct_physics.DuctSystem
    leakage: tuple[tuple[float, float], ...]
    conduction: tuple[tuple[float, float], ...]
    leakage_ids: tuple[tuple[str, ...], ...]
    insulation_ids: tuple[tuple[str, ...], ...]


@dataclass(frozen=True, slots=True)
class State:
    """Per-variant inputs beyond the sums: solar table (n, K) [W], duct option indices and
    the b of where the supply and return run (n,) [-]; None where the house has none."""

    solar: FloatArray | None = None
    leakage: npt.NDArray[np.int64] | None = None
    insulation: npt.NDArray[np.int64] | None = None
    b_supply: FloatArray | None = None
    b_return: FloatArray | None = None

    def take(self, index: npt.NDArray[np.int64]) -> State:
        """The state of the variants ``index`` (rows repeated or picked)."""

        def pick(a: npt.NDArray[np.generic] | None) -> npt.NDArray[np.generic] | None:
            return None if a is None else a[index]

        return State(
            pick(self.solar),  # type: ignore[arg-type]
            pick(self.leakage),  # type: ignore[arg-type]
            pick(self.insulation),  # type: ignore[arg-type]
            pick(self.b_supply),  # type: ignore[arg-type]
            pick(self.b_return),  # type: ignore[arg-type]
        )


def unsupported_systems(house: model.House, upgrades: Sequence[model.Upgrade]) -> str | None:
    """The systems' inputs the array core does not model, in words (None: it models them)."""
    systems = house.systems
    if systems is not None and systems.heat_pump is not None:
        return "a heat pump's seasonal COP from the temperature bins"
    for upgrade in upgrades:
        if isinstance(upgrade, sysm.DuctSealingUpgrade | sysm.DuctInsulationUpgrade) and (
            systems is None or systems.ducts is None
        ):
            return f"upgrade '{upgrade.id}' on a house without ducts"
    return None


def solar_vector(house: model.House, surface: model.Surface, shgc: float) -> FloatArray | None:
    """SHGC·A·Ē(b_i) [W] of a window at each base, or None (no variable base or no sun)."""
    vb = house.climate.variable_base
    if vb is None or not surface.solar_w_per_m2 or not shgc > 0:
        return None
    return shgc * surface.area_m2 * np.asarray(surface.solar_w_per_m2, dtype=float)


def duct_options(
    house: model.House,
    sealing: Sequence[sysm.DuctSealingUpgrade],
    insulation: Sequence[sysm.DuctInsulationUpgrade],
) -> DuctOptions | None:
    """The duct choice groups' values (each checked by :func:`.ducts.distribution`)."""
    systems = house.systems
    if systems is None or systems.ducts is None:
        return None
    ducts = systems.ducts
    rho_c = systems.air_heat_capacity
    probe = {space.id: 0.5 for space in house.spaces}
    leak = [(ducts.supply.leakage_fraction, ducts.returns.leakage_fraction)]
    cond = []
    variants: list[sysm.Systems] = [systems]
    for upgrade in sealing:
        changed = sysm.apply_duct_upgrade(systems, upgrade)
        assert changed.ducts is not None
        variants.append(changed)
        leak.append((changed.ducts.supply.leakage_fraction, changed.ducts.returns.leakage_fraction))
    for wrap in [None, *insulation]:
        changed = systems if wrap is None else sysm.apply_duct_upgrade(systems, wrap)
        assert changed.ducts is not None
        variants.append(changed)
        flow = changed.ducts.air_flow_m3_per_s
        cond.append(
            (
                duct_physics.conduction_fraction(
                    changed.ducts.supply.area_m2, changed.ducts.supply.r_si, flow, rho_c
                ),
                duct_physics.conduction_fraction(
                    changed.ducts.returns.area_m2, changed.ducts.returns.r_si, flow, rho_c
                ),
            )
        )
    for changed in variants:  # the package path's checks: leakage range, spaces, R, flow
        assert changed.ducts is not None
        duct_physics.distribution(
            changed.ducts, systems.indoor_c, systems.indoor_c - 10.0, probe, rho_c
        )
    return DuctOptions(
        ducts,
        tuple(leak),
        tuple(cond),
        ((),) + tuple((u.id,) for u in sealing),
        ((),) + tuple((u.id,) for u in insulation),
    )


def heating_energy(
    house: model.House,
    ua: FloatArray,
    state: State,
    ducts: DuctOptions | None,
) -> tuple[FloatArray, FloatArray, FloatArray]:
    """HDD [K·day], the heating load Q = UA·HDD·86 400 [J] and Q / η_dist [J] per variant."""
    climate = house.climate
    vb = climate.variable_base
    ua = np.asarray(ua, dtype=float)
    positive = ua > 0
    safe = np.where(positive, ua, 1.0)
    balance: FloatArray | None = None
    if vb is None:
        hdd = np.full(ua.shape, climate.hdd_k_day)
    else:
        balance = gains.balance_points_c(
            vb.setpoint_c, vb.internal_gains_w, safe, vb.bases_c, state.solar
        )
        hdd = np.interp(balance, np.array(vb.bases_c), np.array(vb.hdd_k_day))
        hdd = np.where(positive, hdd, climate.hdd_k_day)
    load = ua * hdd * energy.DAY_S
    systems = house.systems
    if ducts is None or systems is None:
        return hdd, load, load
    base = np.full(ua.shape, systems.heating_base_c)
    if balance is not None:
        base = np.where(positive, balance, base)
    season = season_outdoor_c(systems, hdd, base)
    assert state.leakage is not None and state.insulation is not None
    assert state.b_supply is not None and state.b_return is not None
    leak = np.asarray(ducts.leakage)[state.leakage]
    cond = np.asarray(ducts.conduction)[state.insulation]
    de, eta = duct_physics.distribution_efficiency_arrays(
        a_s=1.0 - leak[:, 0],
        a_r=1.0 - leak[:, 1],
        cond_s=cond[:, 0],
        cond_r=cond[:, 1],
        b_sup=state.b_supply,
        b_ret=state.b_return,
        indoor_c=systems.indoor_c,
        outdoor_c=season,
        temperature_rise_k=ducts.system.temperature_rise_k,
        equipment_factor=ducts.system.equipment_factor,
    )
    if np.any(de <= 0):
        raise ValueError("the ducts lose all the heat: check their leakage, R and area")
    return hdd, load, load / np.maximum(eta, 1e-9)


def season_outdoor_c(system: sysm.Systems, hdd: FloatArray, balance: FloatArray) -> FloatArray:
    """:func:`.systems.season_outdoor_c` per variant [°C]."""
    if system.season_outdoor_c is not None:
        return np.full(balance.shape, system.season_outdoor_c)
    estimate = balance - hdd / sysm.HEATING_SEASON_DAYS
    if not system.bins:
        return estimate
    t = np.array([b[0] for b in system.bins])
    n = np.array([b[1] for b in system.bins])
    cold = (t[None, :] < balance[:, None]) & (n[None, :] > 0)
    hours = np.where(cold, n[None, :], 0.0).sum(axis=1)
    weighted = np.where(cold, (t * n)[None, :], 0.0).sum(axis=1)
    return np.where(hours > 0, weighted / np.where(hours > 0, hours, 1.0), estimate)
