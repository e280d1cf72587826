"""House document -> pure house model -> comparison -> result in the document's units.

Rules decided here (the contract was silent):

* Errors (HTTP 422, each naming its field): duplicate surface, upgrade or package ids; an
  upgrade naming an unknown surface, or the wrong kind of surface; a package naming an
  unknown upgrade, listing one twice, or holding two upgrades that change the same surface,
  pipe run or the air leakage; air sealing on a house without ``air_leakage``, or to a
  target above the as-found leakage.
* Warnings (computed anyway): an assembly upgrade that does not lower the surface's U; air
  sealing to exactly the as-found figure; an upgrade expected to last less than the study
  period; rebates above the cost; savings of zero or less; the default N-factor.
* Incremental savings of a package are in its listed order (see
  :func:`server.physics.house_model.evaluate_option`).
* Pipe-run losses are bought at the heating system's fuel, efficiency and price.
* A ``slab``, ``basement_floor`` or ``basement_wall`` with a ``ground`` object takes its U from
  ISO 13370 (:func:`server.services.ground.ground_surface`); the model then holds that U over
  the surface's area (UA / area), so packages and upgrades need nothing else. An upgrade's
  ``ground`` replaces the fields it gives (slab edge insulation, say).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace

from pydantic import ValidationError

from server.documents.assembly import AssemblyInput, AssemblyResult
from server.documents.ground import GroundIn
from server.documents.house import (
    GROUND_SURFACE_KINDS,
    CashFlowFigures,
    FuelFigures,
    HouseDocument,
    HouseFigures,
    HouseResult,
    OptionFigures,
    PipeFigures,
    PipeIn,
    SpaceFigures,
    StepFigures,
    SurfaceFigures,
    SurfaceIn,
    UpgradeIn,
)
from server.documents.pipe import PipeLayerIn, PipeRequest
from server.errors import FieldError, InputError
from server.physics import buffer_spaces as buffers
from server.physics import economics
from server.physics import house_model as model
from server.physics.energy import (
    CFM_M3_PER_S,
    air_changes_at_50_pa,
    capacity_ratio,
    design_heat_loss,
    flow_from_ach50,
)
from server.physics.fuels import (
    GRID_ELECTRICITY_CO2_KG_PER_KWH,
    GRID_ELECTRICITY_CO2_SOURCE,
    KWH_J,
    fuel_by_slug,
)
from server.physics.units import BTU_J, UnitSystem, from_si, temp_to_c, to_si
from server.services import gains as gains_svc
from server.services import systems as systems_svc
from server.services.assembly import evaluate_assembly
from server.services.calibration import calibrate
from server.services.catalog import Catalog
from server.services.ground import construction_r_from_total, ground_surface, merge_ground
from server.services.optimize import attach_optimum
from server.services.pipe import compute_pipe
from server.services.uncertainty import attach_ranges

STEP_ORDER = (
    "listed: step i is what upgrade i saves on the house that already has upgrades 1..i-1 of "
    "the package, so the steps add up to the package's savings"
)
ASSUMPTIONS = (
    "Degree-day method (ASHRAE Handbook—Fundamentals, energy estimating): heating = UA × HDD × "
    "24 h, cooling = UA × CDD × 24 h (sensible only), at fixed system efficiencies.",
    "Infiltration UA = 0.018 Btu/(ft³·°F) × (ACH50 / N) × volume (LBL N-factor, common practice).",
    "With this method savings of separate measures add up exactly; each package is still "
    "computed as one modified house.",
    "Pipe-run losses are bought at the heating system's fuel, efficiency and price.",
    "Economics per NIST Handbook 135: costs at year 0, savings at each year's end, escalated "
    "by the fuel escalation and discounted by the discount rate; no replacement or residual "
    "values.",
    "The cash-flow chart draws the discounted cumulative series (its last point is the NPV).",
    "All figures are estimates; the locally adopted code and licensed professionals decide.",
)


@dataclass
class _Build:
    """What the service learns while turning the document into the pure model."""

    units: UnitSystem
    catalog: Catalog | None
    warnings: list[str] = field(default_factory=list)
    assemblies: dict[str, AssemblyResult] = field(default_factory=dict)
    problems: list[FieldError] = field(default_factory=list)
    #: ids of the surfaces that face a buffer space: still-air films on that side
    still_air: frozenset[str] = frozenset()

    def problem(self, path: str, message: str) -> None:
        self.problems.append(FieldError(path, message))

    def raise_problems(self) -> None:
        if self.problems:
            first, *rest = self.problems
            raise InputError(first.field, first.message, rest)

    def u_si(self, item: SurfaceIn | UpgradeIn, path: str, label: str) -> float:
        """U-factor [W/(m²·K)] of a surface's or upgrade's assembly, ``r`` or ``u``."""
        if item.u is not None:
            return to_si(item.u, "u", self.units)
        if item.r is not None:
            return 1.0 / to_si(item.r, "r", self.units)
        assert item.assembly is not None  # the document checked exactly one is given
        result = self._assembly(self._facing(item, item.assembly), f"{path}.assembly")
        self.warnings.extend(f"{label}: {note}" for note in result.warnings)
        return 1.0 / result.rsi_total

    def _facing(self, item: SurfaceIn | UpgradeIn, assembly: AssemblyInput) -> AssemblyInput:
        """The assembly with still-air films outside when its surface faces a buffer space
        (unless the assembly says which outside film itself)."""
        surface = item.id if isinstance(item, SurfaceIn) else item.surface
        if surface in self.still_air and assembly.outside_film is None:
            return assembly.model_copy(update={"outside_film": "still_air"})
        return assembly

    def _assembly(self, assembly: AssemblyInput, path: str) -> AssemblyResult:
        key = assembly.model_dump_json()
        if key not in self.assemblies:
            try:
                result = evaluate_assembly(
                    assembly, units=self.units, catalog=self.catalog, field=path
                )
            except ValueError as exc:
                raise InputError(f"{path}.layers", str(exc)) from None
            if not (result.rsi_total > 0 and math.isfinite(result.rsi_total)):
                raise InputError(
                    f"{path}.layers", "the assembly's total R must be above zero and finite"
                )
            self.assemblies[key] = result
        return self.assemblies[key]

    def pipe(
        self,
        pipe: PipeIn,
        length: float,
        surface_path: str,
        upgrade_path: str | None = None,
        layers: list[PipeLayerIn] | None = None,
        jacket: float | None = None,
    ) -> tuple[float, float, list[str]]:
        """Per-length resistance [m·K/W], fluid − ambient [K] and warnings of a pipe run
        (``jacket``: an insulation upgrade's outer emissivity)."""
        spec = systems_svc.pipe_request_fields(pipe.model_dump(), jacket=jacket, resolve=True)
        if layers is not None:
            spec["layers"] = [layer.model_dump() for layer in layers]
        try:
            result = compute_pipe(PipeRequest(units=self.units, length=length, **spec))
        except InputError as exc:
            inner = exc.field
            if upgrade_path is not None and inner.startswith("layers"):
                where = f"{upgrade_path}.pipe_{inner}"
            elif inner == "length":
                where = f"{surface_path}.length"
            elif inner == "body":
                where = f"{surface_path}.pipe"
            else:
                where = f"{surface_path}.pipe.{inner}"
            raise InputError(where, exc.message) from None
        r_si = to_si(result.r_per_length, "r_per_length", self.units)
        delta_k = to_si(pipe.fluid_temperature - pipe.ambient_temperature, "delta_t", self.units)
        return r_si, delta_k, list(result.warnings)


def _check_ids(doc: HouseDocument, build: _Build) -> None:
    """Cross-references between surfaces, upgrades and packages, all problems at once."""
    for name, ids in (
        ("surfaces", [s.id for s in doc.surfaces]),
        ("upgrades", [u.id for u in doc.upgrades]),
        ("packages", [p.id for p in doc.packages]),
    ):
        for index, ident in enumerate(ids):
            if ident in ids[:index]:
                build.problem(f"{name}[{index}].id", f"'{ident}' is used twice")
    kinds = {s.id: s.kind for s in doc.surfaces}
    for index, upgrade in enumerate(doc.upgrades):
        path = f"upgrades[{index}].surface"
        if upgrade.kind == "air_sealing":
            if doc.air_leakage is None:
                build.problem(
                    f"upgrades[{index}]", "air sealing needs the house's air_leakage (CFM50 or n50)"
                )
            continue
        if upgrade.kind in ("duct_sealing", "duct_insulation"):
            if doc.heating.ducts is None:
                build.problem(
                    f"upgrades[{index}]", f"{upgrade.kind} needs the house's heating.ducts"
                )
            continue
        if upgrade.surface not in kinds:
            build.problem(path, f"there is no surface '{upgrade.surface}'")
        elif upgrade.kind == "assembly" and kinds[upgrade.surface] == "pipe_run":
            build.problem(path, f"'{upgrade.surface}' is a pipe run: use kind pipe_insulation")
        elif upgrade.kind == "window" and kinds[upgrade.surface] != "window":
            build.problem(path, f"'{upgrade.surface}' is a {kinds[upgrade.surface]}, not a window")
        elif upgrade.kind == "pipe_insulation" and kinds[upgrade.surface] != "pipe_run":
            build.problem(path, f"'{upgrade.surface}' is not a pipe run")
    upgrades = {u.id: u for u in doc.upgrades}
    for p_index, package in enumerate(doc.packages):
        targets: dict[str, str] = {}
        for u_index, name in enumerate(package.upgrades):
            path = f"packages[{p_index}].upgrades[{u_index}]"
            if name not in upgrades:
                build.problem(path, f"there is no upgrade '{name}'")
                continue
            upgrade = upgrades[name]
            target = {
                "air_sealing": "the air leakage",
                "duct_sealing": "the duct leakage",
                "duct_insulation": "the duct insulation",
            }.get(upgrade.kind or "", f"'{upgrade.surface}'")
            if name in package.upgrades[:u_index]:
                build.problem(path, f"'{name}' is listed twice")
            elif target in targets:
                build.problem(
                    path,
                    f"'{name}' and '{targets[target]}' both change {target}; a package can "
                    "change each surface, pipe run or the air leakage only once",
                )
            targets.setdefault(target, name)
    build.raise_problems()


def _energy(value_j: float, units: UnitSystem) -> float:
    """Energy [J] -> Btu (ip) or kWh (si)."""
    return value_j / BTU_J if units == "ip" else value_j / KWH_J


def _house(doc: HouseDocument, build: _Build) -> model.House:
    units = doc.units
    surfaces, pipes = [], []
    for index, surface in enumerate(doc.surfaces):
        path = f"surfaces[{index}]"
        if surface.kind == "pipe_run":
            assert surface.pipe and surface.length and surface.hours_per_year  # document checked
            r_si, delta_k, notes = build.pipe(surface.pipe, surface.length, path)
            build.warnings.extend(f"{surface.id}: {note}" for note in notes)
            if delta_k < 0:
                build.warnings.append(
                    f"{surface.id}: the pipe is colder than its surroundings; a heat gain is not "
                    "counted as a loss here"
                )
            pipes.append(
                model.PipeRunLoss(
                    surface.id,
                    to_si(surface.length, "length", units),
                    r_si,
                    delta_k,
                    surface.hours_per_year,
                    service=surface.pipe.service,
                    location=systems_svc.pipe_location(doc, surface.pipe, path),
                    heating_season_share=surface.pipe.heating_season_share,
                    water_heater=systems_svc.water_heater(surface.pipe),
                )
            )
            continue
        assert surface.area is not None  # document checked
        u_si = (
            build.u_si(surface, path, surface.id)
            if surface.ground is None
            else _ground_u_si(build, surface, path, surface, path, surface.ground, path, surface.id)
        )
        surfaces.append(
            model.Surface(surface.id, surface.kind, to_si(surface.area, "area", units), u_si)
        )
    leakage = None
    if doc.air_leakage is not None:
        air = doc.air_leakage
        volume_m3 = to_si(air.volume, "volume", units)
        flow = (
            air.cfm50 * CFM_M3_PER_S
            if air.cfm50 is not None
            else flow_from_ach50(air.n50 or 0.0, volume_m3)
        )
        found = systems_svc.n_factor(doc)
        leakage = model.AirLeakage(flow, air.n_factor if found is None else found[0], volume_m3)
        if "n_factor" not in air.model_fields_set and air.n_factor_table is None:
            build.warnings.append(
                "air_leakage: no n_factor given; N = 18 assumed (common practice)"
            )
    heating = doc.heating
    cooling = doc.cooling
    econ = doc.economics
    return model.House(
        surfaces=tuple(surfaces),
        climate=model.Climate(
            to_si(doc.climate.hdd, "degree_days", units),
            to_si(doc.climate.cdd, "degree_days", units),
            gains_svc.variable_base_si(doc),
        ),
        heating=model.Heating(
            fuel_by_slug(heating.fuel), heating.efficiency, heating.price, heating.co2_per_unit
        ),
        economics=model.Economics(
            discount_rate=econ.discount_rate,
            escalation_rate=econ.fuel_escalation,
            years=econ.years,
            loan_apr=None if econ.loan is None else econ.loan.apr,
            loan_months=None if econ.loan is None else econ.loan.years * 12,
        ),
        air_leakage=leakage,
        cooling=None
        if cooling is None
        else model.Cooling(cooling.electricity_price, seer=cooling.seer, cop=cooling.cop),
        pipe_runs=tuple(pipes),
        systems=systems_svc.build_systems(doc, build.warnings),
        electricity_co2_kg_per_kwh=GRID_ELECTRICITY_CO2_KG_PER_KWH
        if doc.electricity_co2_per_kwh is None
        else doc.electricity_co2_per_kwh,
    )


def _leakage_words(flow_m3_per_s: float, volume_m3: float) -> str:
    ach50 = air_changes_at_50_pa(flow_m3_per_s, volume_m3)
    return f"{flow_m3_per_s / CFM_M3_PER_S:.0f} CFM50, n50 {ach50:.2f}/h"


def _upgrade(
    doc: HouseDocument, index: int, upgrade: UpgradeIn, house: model.House, build: _Build
) -> model.Upgrade | None:
    """The pure upgrade, or None after recording a problem."""
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
    surface_index, surface = next(
        (i, s) for i, s in enumerate(doc.surfaces) if s.id == upgrade.surface
    )
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
    before = next(s.u_si for s in house.surfaces if s.id == surface.id)
    if u_si >= before * (1 - 1e-12):
        r_before, r_after = from_si(1 / before, "r", units), from_si(1 / u_si, "r", units)
        r_words = f"R {r_before:.3g} as found, {r_after:.3g} after"
        build.warnings.append(f"{upgrade.id}: does not improve '{surface.id}' ({r_words})")
    installed = cost.fixed + cost.per_area * surface.area
    shgc = upgrade.shgc if upgrade.kind == "window" else None
    return model.AssemblyUpgrade(upgrade.id, surface.id, u_si, installed, rebate, life, shgc)


def _ground_u_si(
    build: _Build,
    surface: SurfaceIn,
    surface_path: str,
    construction: SurfaceIn | UpgradeIn,
    construction_path: str,
    ground: GroundIn,
    path: str,
    label: str,
    changed: frozenset[str] | None = None,
) -> float:
    """U [W/(m²·K)] over ``surface``'s area of a slab, basement floor or basement wall by ISO
    13370 (:func:`server.services.ground.ground_surface`, the calculator's code path).

    ``construction`` (the surface, or an upgrade with a new assembly, ``r`` or ``u``) gives
    R_f / R_w: an assembly's R less its own films; ``r`` / ``u`` (films included) less ISO
    13370's surface resistances. ``path`` is the surface's or upgrade's document path; for an
    upgrade, ``changed`` lists its ground fields, and a problem with a ground field it did not
    change is named on the surface.
    """
    units = build.units
    kind = surface.kind
    if construction.assembly is not None:
        where = f"{construction_path}.assembly"
        result = build._assembly(build._facing(construction, construction.assembly), where)
        if construction_path == path:  # its warnings, once
            build.warnings.extend(f"{label}: {note}" for note in result.warnings)
        films = to_si(result.films.inside + result.films.outside, "r", units)
        total = result.rsi_total
        r_si = max(total - films, 0.0)
    else:
        name = "u" if construction.u is not None else "r"
        where = f"{construction_path}.{name}"
        total = (
            1.0 / to_si(construction.u, "u", units)
            if construction.u is not None
            else to_si(construction.r or 0.0, "r", units)
        )
        try:
            r_si = construction_r_from_total(total, kind)
        except ValueError as exc:
            raise InputError(where, str(exc)) from None
    assert surface.area is not None  # document checked
    try:
        found = ground_surface(
            kind=kind,
            area_m2=to_si(surface.area, "area", units),
            ground=ground,
            construction_r_si=r_si,
            air_u_si=1.0 / total,
            units=units,
            path=f"{path}.ground",
            construction_field=where,
        )
    except InputError as exc:
        inner = f"{path}.ground."
        rest = exc.field[len(inner) :]
        if (
            changed is not None
            and exc.field.startswith(inner)
            and rest.split(".")[0] not in changed
        ):
            raise InputError(f"{surface_path}.ground.{rest}", exc.message) from None
        raise
    build.warnings.extend(f"{label}: {note}" for note in found.warnings)
    return found.u_si


#: Indoor design temperature when the document gives none, by unit system [°C]: 70 °F
#: (21.11 °C) or 21 °C (the usual winter indoor design condition, common practice).
INDOOR_DESIGN_C = {"ip": (70.0 - 32.0) * 5.0 / 9.0, "si": 21.0}

#: Above this output capacity ÷ design heat loss the equipment is called oversized. From
#: memory: common sizing practice (ACCA Manual S) lets a furnace's output reach about 140 %
#: of the design load; a heat pump is sized much closer to the load.
OVERSIZED_RATIO = 1.4


def _design(
    doc: HouseDocument, ua_w_per_k: float, distribution_efficiency: float = 1.0
) -> tuple[float | None, float | None]:
    """Design heat loss [document units: Btu/h or W] and capacity ratio [-] of one variant.

    With ducts the loss at design is UA·ΔT / η_dist,design: the envelope's and the ducts'
    (ASHRAE Standard 152 design distribution efficiency, see :mod:`server.physics.ducts`).
    """
    design = doc.climate.heating_design_temperature
    if design is None:
        return None, None
    indoor = doc.climate.indoor_design_temperature
    indoor_c = INDOOR_DESIGN_C[doc.units] if indoor is None else temp_to_c(indoor, doc.units)
    loss_w = design_heat_loss(ua_w_per_k, indoor_c, temp_to_c(design, doc.units))
    if distribution_efficiency != 1.0:
        loss_w /= distribution_efficiency
    capacity = doc.heating.output_capacity
    ratio = (
        None if capacity is None else capacity_ratio(to_si(capacity, "power", doc.units), loss_w)
    )
    return from_si(loss_w, "power", doc.units), ratio


def _figures(doc: HouseDocument, house: model.House, energy: model.HouseEnergy) -> dict:
    """The HouseFigures fields of one evaluated house, in the document's units."""
    units = doc.units
    names = {s.id: s.name for s in doc.surfaces}
    total_ua = energy.ua_w_per_k

    def ua(value: float) -> float:
        return from_si(value, "ua", units)

    surfaces = [
        SurfaceFigures(
            id=s.id,
            kind=s.kind,
            name=names[s.id],
            area=from_si(s.area_m2, "area", units),
            r=from_si(1.0 / s.u_si, "r", units),
            u=from_si(s.u_si, "u", units),
            ua=ua(energy.ua_by_surface_w_per_k[s.id]),
            share_of_ua=energy.ua_by_surface_w_per_k[s.id] / total_ua if total_ua > 0 else 0.0,
            adjacent=s.adjacent,
            b=energy.spaces[s.adjacent].b if s.adjacent in energy.spaces else 1.0,
            **gains_svc.surface_gain_figures(doc, s, energy),
        )
        for s in house.surfaces
    ]
    pipes = [
        PipeFigures(
            id=p.id,
            name=names[p.id],
            length=from_si(p.length_m, "length", units),
            r_per_length=from_si(p.r_per_length_si, "r_per_length", units),
            heat_loss_per_length=from_si(p.delta_t_k / p.r_per_length_si, "q_per_length", units),
            annual_loss=_energy(energy.pipe_loss_by_run_j[p.id], units),
            service=p.service,
            location=p.location,
            counted_loss=_energy(energy.pipe_counted_by_run_j.get(p.id, 0.0), units),
            water_heating_fuel=energy.water_heating_fuel_by_run.get(p.id),
        )
        for p in house.pipe_runs
    ]
    leak = house.air_leakage
    ach50 = None if leak is None else air_changes_at_50_pa(leak.flow50_m3_per_s, leak.volume_m3)
    eta_design = systems_svc.design_distribution_efficiency(energy)
    design_loss, ratio = _design(doc, total_ua, eta_design)
    envelope_design = (
        None if design_loss is None else to_si(design_loss, "power", units) * eta_design
    )
    return {
        "ua": ua(total_ua),
        "ua_envelope": ua(energy.envelope_ua_w_per_k),
        "ua_infiltration": ua(energy.infiltration_ua_w_per_k),
        "ua_by_surface": {key: ua(value) for key, value in energy.ua_by_surface_w_per_k.items()},
        "surfaces": surfaces,
        "spaces": _space_figures(doc, house, energy),
        "cfm50": None if leak is None else leak.flow50_m3_per_s / CFM_M3_PER_S,
        "ach50": ach50,
        "ach_natural": None if leak is None or ach50 is None else ach50 / leak.n_factor,
        "heating_load": _energy(energy.heating_load_j, units),
        "pipe_loss": _energy(energy.pipe_loss_j, units),
        "pipes": pipes,
        "heating_fuel": energy.heating_fuel_units,
        "heating_fuel_unit": house.heating.fuel.unit,
        "heating_cost": energy.heating_cost,
        "cooling_load": _energy(energy.cooling_load_j, units),
        "cooling_electricity": energy.cooling_electricity_kwh,
        "cooling_cost": energy.cooling_cost,
        "total_cost": energy.total_cost,
        "heating_co2": energy.heating_co2_kg,
        "cooling_co2": energy.cooling_co2_kg,
        "co2": energy.co2_kg,
        "co2_biogenic": energy.co2_biogenic_kg,
        "design_heat_loss": design_loss,
        "capacity_ratio": ratio,
        **systems_svc.figures(doc, energy, envelope_design),
        **gains_svc.gain_figures(doc, house, energy),
    }


def _option(
    doc: HouseDocument,
    house: model.House,
    upgrades: dict[str, model.Upgrade],
    as_found: model.HouseEnergy,
    option: model.OptionResult,
    name: str,
) -> OptionFigures:
    money = option.appraisal
    modified = model.apply_upgrades(house, [upgrades[u] for u in option.upgrade_ids])
    warnings = list(option.warnings)
    if money.annual_savings <= 0:
        warnings.append("saves nothing at today's prices, so it never pays back")
    figures = _figures(doc, modified, option.energy)
    ratio = figures["capacity_ratio"]
    if ratio is not None and ratio > OVERSIZED_RATIO:
        warnings.append(
            f"after this package the heating equipment's output is {ratio:.1f} times the design "
            f"heat loss (more than {OVERSIZED_RATIO:.1f}): it is oversized for the house, and a "
            "smaller system (such as a heat pump) may qualify; have a licensed professional "
            "size it by a room-by-room load calculation"
        )
    flow = money.cash_flow
    return OptionFigures(
        **figures,
        id=option.id,
        name=name,
        upgrades=list(option.upgrade_ids),
        annual_savings=money.annual_savings,
        installed_cost=money.installed_cost,
        rebates=money.rebates,
        net_cost=money.net_cost,
        simple_payback_years=money.simple_payback_years,
        cash_flow_payback_years=money.payback_year,
        discounted_payback_years=money.discounted_payback_year,
        present_value=money.present_value,
        npv=money.npv,
        sir=money.sir,
        monthly_loan_payment=money.monthly_loan_payment,
        monthly_savings=money.monthly_savings,
        co2_avoided=option.co2_avoided_kg,
        heating_fuel_saved=as_found.heating_fuel_units - option.energy.heating_fuel_units,
        steps=[
            StepFigures(
                upgrade=step.upgrade_id,
                annual_savings=step.annual_savings,
                ua_reduction=from_si(step.ua_reduction_w_per_k, "ua", doc.units),
                co2_avoided=step.co2_avoided_kg,
            )
            for step in option.steps
        ],
        cash_flow=CashFlowFigures(
            years=list(flow.years),
            cumulative=list(flow.cumulative),
            cumulative_discounted=list(flow.cumulative_discounted),
        ),
        warnings=warnings,
    )


def _fuel(doc: HouseDocument, house: model.House) -> FuelFigures:
    fuel = house.heating.fuel
    own = doc.heating.co2_per_unit is not None
    return FuelFigures(
        fuel=fuel.slug,
        label=fuel.label,
        unit=fuel.unit,
        energy_per_unit=_energy(fuel.energy_per_unit_j, doc.units),
        energy_source=fuel.energy_source,
        co2_per_unit=model.heating_co2_per_unit(house),
        co2_source="given in the document" if own else fuel.co2_source,
        efficiency_meaning=fuel.efficiency_meaning,
        electricity_co2_per_kwh=house.electricity_co2_kg_per_kwh,
        electricity_co2_source="given in the document"
        if doc.electricity_co2_per_kwh is not None
        else GRID_ELECTRICITY_CO2_SOURCE,
    )


TOO_LARGE = "these inputs give numbers too large to compute; check areas, R and prices"


def compute_house(
    doc: HouseDocument, *, catalog: Catalog | None = None, upgrades_alone: bool = True
) -> HouseResult:
    """As-found house, each upgrade alone and each package, in ``doc.units``.

    Each distinct assembly is evaluated once by the assembly calculator. With
    ``upgrades_alone=False`` the result lists no single-upgrade options (``upgrades`` is
    empty; every upgrade is still checked): for pages that show only the packages. Raises
    :class:`InputError` (HTTP 422) naming the field of every problem found.
    """
    build = _Build(units=doc.units, catalog=catalog)
    _check_ids(doc, build)
    _check_spaces(doc, build)
    econ = doc.economics
    try:
        economics.present_value_of_savings(
            1.0, econ.discount_rate, econ.fuel_escalation, econ.years
        )
    except ValueError as exc:
        raise InputError("economics.discount_rate", str(exc)) from None
    house = gains_svc.with_windows(doc, _with_spaces(doc, _house(doc, build)), build.warnings)
    pure = [_upgrade(doc, i, u, house, build) for i, u in enumerate(doc.upgrades)]
    build.raise_problems()
    upgrades = [u for u in pure if u is not None]
    packages = [model.Package(p.id, tuple(p.upgrades)) for p in doc.packages]
    try:
        comparison = model.compare(house, upgrades, packages, upgrades_alone=upgrades_alone)
    except ValueError as exc:  # _check_ids covers these; a last guard against a 500
        raise InputError("upgrades", str(exc)) from None
    by_id = {u.id: u for u in upgrades}
    upgrade_names = {u.id: u.name for u in doc.upgrades}
    package_names = {p.id: p.name for p in doc.packages}
    try:
        result = HouseResult(
            units=doc.units,
            currency=doc.currency,
            as_found=HouseFigures(**_figures(doc, house, comparison.as_found)),
            packages=[
                _option(doc, house, by_id, comparison.as_found, option, package_names[option.id])
                for option in comparison.packages
            ],
            upgrades=[
                _option(doc, house, by_id, comparison.as_found, option, upgrade_names[option.id])
                for option in comparison.upgrades_alone
            ],
            fuel=_fuel(doc, house),
            analysis_years=doc.economics.years,
            step_order=STEP_ORDER,
            assumptions=list(ASSUMPTIONS) + _space_assumptions(doc) + systems_svc.assumptions(doc),
            degree_day_basis=gains_svc.degree_day_basis(doc),
            warnings=build.warnings,
        )
    except ValidationError as exc:  # the result parts refuse inf and NaN (FiniteOut)
        if any(error["type"] == "finite_number" for error in exc.errors()):
            raise InputError("body", TOO_LARGE) from None
        raise
    calibrate(doc, result)  # with bills: calibration and each option's calibrated figures
    attach_optimum(doc, house, upgrades, comparison.as_found, result)  # with optimize
    attach_ranges(doc, house, upgrades, result)  # with uncertainty
    return result


# --- buffer spaces (ISO 13789) -------------------------------------------------------------

SPACE_ASSUMPTION = (
    "Buffer spaces (ISO 13789): a surface facing an unconditioned space counts b · U · A, "
    "b = H_ue / (H_iu + H_ue) recomputed for every variant; H_ue counts the space's exposed "
    "parts and its air changes at 0.018 Btu/(ft³·°F); air moving between the house and the "
    "space is not counted. Such surfaces take still-air films on that side (ASHRAE "
    "Handbook—Fundamentals; ISO 6946 Rse = Rsi) unless their assembly says otherwise."
)


def _space_assumptions(doc: HouseDocument) -> list[str]:
    return [SPACE_ASSUMPTION] if doc.spaces else []


def _check_spaces(doc: HouseDocument, build: _Build) -> None:
    """Space ids and what each surface faces; records the surfaces that take still air."""
    ids = [space.id for space in doc.spaces]
    for index, space in enumerate(doc.spaces):
        path = f"spaces[{index}]"
        if space.id in (buffers.OUTDOORS, buffers.GROUND):
            build.problem(
                f"{path}.id", f"'{space.id}' names what lies behind a surface with no space"
            )
        elif space.id in ids[:index]:
            build.problem(f"{path}.id", f"'{space.id}' is used twice")
        parts = [n for n in ("exposed", "volume", "air_changes") if getattr(space, n) is not None]
        if space.b is not None and parts:
            build.problem(
                f"{path}.b",
                f"give either b or exposed, volume and air_changes, not both (got {', '.join(parts)})",
            )
        elif space.b is None:
            for name in ("volume", "air_changes"):
                if getattr(space, name) is None:
                    build.problem(f"{path}.{name}", "is required unless the space gives b")
    known = set(ids)
    facing: set[str] = set()
    for index, surface in enumerate(doc.surfaces):
        behind = surface.adjacent
        if behind == buffers.OUTDOORS:
            continue
        path = f"surfaces[{index}].adjacent"
        if surface.kind == "pipe_run":
            build.problem(path, "a pipe run's surroundings are its pipe's ambient_temperature")
        elif behind != buffers.GROUND and behind not in known:
            choices = ", ".join(["outdoors", "ground", *ids])
            build.problem(path, f"there is no space '{behind}' (choose one of: {choices})")
        elif behind in known:
            facing.add(surface.id)
    build.raise_problems()
    used = {s.adjacent for s in doc.surfaces}
    build.warnings.extend(
        f"space '{ident}': no surface faces it, so it changes nothing"
        for ident in ids
        if ident not in used
    )
    build.still_air = frozenset(facing)


def _with_spaces(doc: HouseDocument, house: model.House) -> model.House:
    """The pure house with what lies behind each surface and the buffer spaces in SI."""
    if not doc.spaces and all(s.adjacent == buffers.OUTDOORS for s in doc.surfaces):
        return house
    units = doc.units
    adjacent = {s.id: s.adjacent for s in doc.surfaces}
    spaces = tuple(
        buffers.BufferSpace(
            id=space.id,
            exposed=tuple(
                buffers.ExposedPart(to_si(part.area, "area", units), to_si(part.u, "u", units))
                for part in space.exposed or []
            ),
            volume_m3=0.0 if space.volume is None else to_si(space.volume, "volume", units),
            air_changes_per_h=space.air_changes or 0.0,
            b=space.b,
        )
        for space in doc.spaces
    )
    return replace(
        house,
        surfaces=tuple(replace(s, adjacent=adjacent.get(s.id, s.adjacent)) for s in house.surfaces),
        spaces=spaces,
    )


def _space_figures(
    doc: HouseDocument, house: model.House, energy: model.HouseEnergy
) -> list[SpaceFigures]:
    """Each buffer space's b, H_iu, H_ue in one evaluated house, in the document's units."""
    figures = []
    for space in doc.spaces:
        found = energy.spaces[space.id]
        figures.append(
            SpaceFigures(
                id=space.id,
                label=space.label,
                b=found.b,
                b_given=found.b_given,
                h_iu=from_si(found.h_iu_w_per_k, "ua", doc.units),
                h_ue=None
                if found.h_ue_w_per_k is None
                else from_si(found.h_ue_w_per_k, "ua", doc.units),
                ua=from_si(found.b * found.h_iu_w_per_k, "ua", doc.units),
                surfaces=[s.id for s in house.surfaces if s.adjacent == space.id],
            )
        )
    return figures
