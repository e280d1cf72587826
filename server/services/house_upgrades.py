"""Each upgrade of a house document -> its pure upgrade (:mod:`server.physics.house_model`), with
the problems and warnings the rules of :mod:`server.services.comparison` name."""

from __future__ import annotations

from server.documents.house import (
    GROUND_SURFACE_KINDS,
    HouseDocument,
    SurfaceIn,
    UpgradeIn,
)
from server.physics import house_model as model
from server.physics.energy import (
    CFM_M3_PER_S,
    air_changes_at_50_pa,
    flow_from_ach50,
)
from server.physics.units import from_si
from server.services import systems as systems_svc
from server.services.ground import merge_ground
from server.services.house_input import _Build, _ground_u_si


def _leakage_words(flow_m3_per_s: float, volume_m3: float) -> str:
    ach50 = air_changes_at_50_pa(flow_m3_per_s, volume_m3)
    return f"{flow_m3_per_s / CFM_M3_PER_S:.0f} CFM50, n50 {ach50:.2f}/h"


class SurfaceLookup:
    """A document's surfaces by id (with their index) and the house's U by surface id, the
    first of each id, as the upgrades of one document ask for them again and again."""

    def __init__(self, doc: HouseDocument, house: model.House) -> None:
        self.surfaces: dict[str, tuple[int, SurfaceIn]] = {}
        for i, s in enumerate(doc.surfaces):
            self.surfaces.setdefault(s.id, (i, s))
        self.u_si: dict[str, float] = {}
        for surface in house.surfaces:
            self.u_si.setdefault(surface.id, surface.u_si)


def _upgrade(
    doc: HouseDocument,
    index: int,
    upgrade: UpgradeIn,
    house: model.House,
    build: _Build,
    lookup: SurfaceLookup | None = None,
) -> model.Upgrade | None:
    """The pure upgrade, or None after recording a problem (``lookup``: the document's
    :class:`SurfaceLookup`, made here when not given)."""
    units = doc.units
    path = f"upgrades[{index}]"
    cost = upgrade.cost
    rebate, life = upgrade.rebate, upgrade.life_years
    if upgrade.kind in ("duct_sealing", "duct_insulation"):
        build.warnings.extend(systems_svc.duct_upgrade_notes(doc, upgrade))
        return systems_svc.duct_upgrade(doc, index, upgrade)
    if upgrade.kind == "air_sealing":
        leak = house.air_leakage
        assert leak is not None  # _check_ids refused air sealing without air_leakage
        if upgrade.cfm50_after is not None:
            after, where = upgrade.cfm50_after * CFM_M3_PER_S, f"{path}.cfm50_after"
        else:
            after = flow_from_ach50(upgrade.n50_after or 0.0, leak.volume_m3)
            where = f"{path}.n50_after"
        words = _leakage_words(leak.flow50_m3_per_s, leak.volume_m3)
        if after > leak.flow50_m3_per_s * (1 + 1e-9):
            build.problem(where, f"must not be above the as-found leakage ({words})")
            return None
        if after >= leak.flow50_m3_per_s * (1 - 1e-9):
            build.warnings.append(f"{upgrade.id}: the target equals the as-found leakage ({words})")
        return model.AirSealingUpgrade(upgrade.id, after, cost.fixed, rebate, life)
    if lookup is None:
        lookup = SurfaceLookup(doc, house)
    assert upgrade.surface is not None  # the document asks it of every other kind
    surface_index, surface = lookup.surfaces[upgrade.surface]
    if upgrade.kind == "pipe_insulation":
        assert surface.pipe and surface.length  # a pipe run, checked by the document
        r_si, _delta, notes = build.pipe(
            surface.pipe,
            surface.length,
            f"surfaces[{surface_index}]",
            path,
            upgrade.pipe_layers,
            jacket=upgrade.emissivity
            if upgrade.emissivity is not None
            else systems_svc.pipe_runs.JACKET_EMISSIVITY,
        )
        build.warnings.extend(f"{upgrade.id}: {note}" for note in notes)
        installed = cost.fixed + cost.per_length * surface.length
        return model.PipeInsulationUpgrade(upgrade.id, surface.id, r_si, installed, rebate, life)
    assert surface.area is not None
    if upgrade.ground is not None and surface.kind not in GROUND_SURFACE_KINDS:
        build.problem(
            f"{path}.ground",
            f"'{surface.id}' is a {surface.kind}: a ground change needs a slab, basement_floor "
            "or basement_wall",
        )
        return None
    ground = merge_ground(surface.ground, upgrade.ground)
    if ground is None:
        u_si = build.u_si(upgrade, path, upgrade.id)
    else:
        new = any(x is not None for x in (upgrade.assembly, upgrade.r, upgrade.u))
        surface_path = f"surfaces[{surface_index}]"
        u_si = _ground_u_si(
            build,
            surface,
            surface_path,
            upgrade if new else surface,
            path if new else surface_path,
            ground,
            path,
            upgrade.id,
            changed=frozenset(
                upgrade.ground.model_dump(exclude_none=True) if upgrade.ground else ()
            ),
        )
    before = lookup.u_si[surface.id]
    if u_si >= before * (1 - 1e-12):
        r_before, r_after = from_si(1 / before, "r", units), from_si(1 / u_si, "r", units)
        r_words = f"R {r_before:.3g} as found, {r_after:.3g} after"
        build.warnings.append(f"{upgrade.id}: does not improve '{surface.id}' ({r_words})")
    installed = cost.fixed + cost.per_area * surface.area
    shgc = upgrade.shgc if upgrade.kind == "window" else None
    return model.AssemblyUpgrade(upgrade.id, surface.id, u_si, installed, rebate, life, shgc)
