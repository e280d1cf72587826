"""Upgrades as changes to the house: their kinds, what each one targets, and applying them.

A package applies its upgrades to a copy of the house (:func:`apply_upgrades`); each target
(a surface, a pipe run, the air barrier, the ducts' leakage or insulation) changes at most once.
Units are SI, as in :mod:`.house_data`.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, replace

from server.physics import systems as sysm
from server.physics.house_data import House


@dataclass(frozen=True, slots=True)
class AssemblyUpgrade:
    """A new assembly on one surface: its U-factor [W/(m²·K)]; money in the caller's currency.

    ``shgc`` [-] is a window upgrade's new solar heat gain coefficient (None: unchanged).
    """

    id: str
    surface_id: str
    u_si: float
    installed_cost: float = 0.0
    rebate: float = 0.0
    life_years: float | None = None
    shgc: float | None = None


@dataclass(frozen=True, slots=True)
class AirSealingUpgrade:
    """Air sealing to a target flow at 50 Pa [m³/s]."""

    id: str
    flow50_after_m3_per_s: float
    installed_cost: float = 0.0
    rebate: float = 0.0
    life_years: float | None = None


@dataclass(frozen=True, slots=True)
class PipeInsulationUpgrade:
    """New insulation on one pipe run: its per-length resistance [m·K/W]."""

    id: str
    pipe_id: str
    r_per_length_si: float
    installed_cost: float = 0.0
    rebate: float = 0.0
    life_years: float | None = None


Upgrade = (
    AssemblyUpgrade
    | AirSealingUpgrade
    | PipeInsulationUpgrade
    | sysm.DuctSealingUpgrade
    | sysm.DuctInsulationUpgrade
)


@dataclass(frozen=True, slots=True)
class Package:
    """Upgrades done together, in the order their incremental savings are reported."""

    id: str
    upgrade_ids: tuple[str, ...]


def upgrade_target(upgrade: Upgrade) -> str:
    """What an upgrade changes: ``surface:<id>``, ``air``, ``pipe:<id>``, ``ducts:leakage`` or
    ``ducts:insulation`` (one per package)."""
    if isinstance(upgrade, sysm.DuctSealingUpgrade):
        return "ducts:leakage"
    if isinstance(upgrade, sysm.DuctInsulationUpgrade):
        return "ducts:insulation"
    if isinstance(upgrade, AssemblyUpgrade):
        return f"surface:{upgrade.surface_id}"
    if isinstance(upgrade, PipeInsulationUpgrade):
        return f"pipe:{upgrade.pipe_id}"
    return "air"


def apply_upgrades(house: House, upgrades: Sequence[Upgrade]) -> House:
    """A copy of ``house`` with every upgrade applied (the original is left as it was).

    Parameters
    ----------
    house : House
        The as-found house.
    upgrades : sequence of Upgrade
        New U [W/(m²·K)], leakage [m³/s] or pipe resistance [m·K/W], one per target.

    Returns
    -------
    House
        The modified house.

    Raises
    ------
    ValueError
        Two upgrades change the same surface, pipe run or air barrier; an upgrade names a
        surface or pipe run the house does not have; air sealing on a house without a
        blower-door figure, or to a flow above the as-found one.
    """
    seen: dict[str, str] = {}
    for upgrade in upgrades:
        target = upgrade_target(upgrade)
        if target in seen:
            raise ValueError(
                f"upgrades '{seen[target]}' and '{upgrade.id}' both change "
                f"{target.replace(':', ' ')}; a package can change each surface, pipe run "
                "or the air leakage only once"
            )
        seen[target] = upgrade.id
    surfaces = {s.id: s for s in house.surfaces}
    pipes = {p.id: p for p in house.pipe_runs}
    leakage = house.air_leakage
    systems = house.systems
    for upgrade in upgrades:
        if isinstance(upgrade, sysm.DuctSealingUpgrade | sysm.DuctInsulationUpgrade):
            if systems is None:
                raise ValueError(f"upgrade '{upgrade.id}': the house has no ducts described")
            systems = sysm.apply_duct_upgrade(systems, upgrade)
        elif isinstance(upgrade, AssemblyUpgrade):
            if upgrade.surface_id not in surfaces:
                raise ValueError(
                    f"upgrade '{upgrade.id}': there is no surface '{upgrade.surface_id}'"
                )
            found = surfaces[upgrade.surface_id]
            surfaces[upgrade.surface_id] = replace(
                found,
                u_si=upgrade.u_si,
                shgc=found.shgc if upgrade.shgc is None else upgrade.shgc,
            )
        elif isinstance(upgrade, PipeInsulationUpgrade):
            if upgrade.pipe_id not in pipes:
                raise ValueError(
                    f"upgrade '{upgrade.id}': there is no pipe run '{upgrade.pipe_id}'"
                )
            pipes[upgrade.pipe_id] = replace(
                pipes[upgrade.pipe_id], r_per_length_si=upgrade.r_per_length_si
            )
        else:
            if leakage is None:
                raise ValueError(f"upgrade '{upgrade.id}': the house has no air-leakage figure")
            if upgrade.flow50_after_m3_per_s > leakage.flow50_m3_per_s * (1 + 1e-12):
                raise ValueError(
                    f"upgrade '{upgrade.id}': the air-sealing target is leakier than the house"
                )
            leakage = replace(leakage, flow50_m3_per_s=upgrade.flow50_after_m3_per_s)
    return replace(
        house,
        surfaces=tuple(surfaces.values()),
        pipe_runs=tuple(pipes.values()),
        air_leakage=leakage,
        systems=systems,
    )
