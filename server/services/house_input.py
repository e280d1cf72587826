"""House document -> the pure house model (:mod:`server.physics.house_model`): the checks of
cross-references, each surface's U (assembly calculator, ISO 13370 ground), the air leakage and
the systems, in SI. Rules: see :mod:`server.services.comparison`."""

from __future__ import annotations

import math
from dataclasses import dataclass, field

from server.documents.assembly import AssemblyInput, AssemblyResult
from server.documents.ground import GroundIn
from server.documents.house import (
    HouseDocument,
    PipeIn,
    SurfaceIn,
    UpgradeIn,
)
from server.documents.pipe import PipeLayerIn, PipeRequest
from server.errors import FieldError, InputError
from server.physics import house_model as model
from server.physics.energy import (
    CFM_M3_PER_S,
    flow_from_ach50,
)
from server.physics.fuels import (
    GRID_ELECTRICITY_CO2_KG_PER_KWH,
    fuel_by_slug,
)
from server.physics.units import UnitSystem, to_si
from server.services import gains as gains_svc
from server.services import systems as systems_svc
from server.services.assembly import evaluate_assembly
from server.services.catalog import Catalog
from server.services.ground import construction_r_from_total, ground_surface
from server.services.pipe import compute_pipe


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
                    assembly, units=self.units, catalog=self.catalog, field=path,
                    document_json=key,
                )  # fmt: skip
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
