"""Assembly documents -> physics -> results, with unit conversion at this edge only."""

from __future__ import annotations

import math

from server.documents.assembly import (
    AssemblyInput,
    AssemblyResult,
    CavityInput,
    FilmsOut,
    FramingInput,
    LayerInput,
    LayerOut,
    ThicknessRequest,
    ThicknessResult,
)
from server.documents.common import Units
from server.errors import InputError
from server.physics import assembly as phys
from server.physics.batts import batt_in_cavity
from server.physics.films import surface_films
from server.physics.lumber import lumber_size
from server.physics.steel_framing import steel_stud_effective_r
from server.physics.units import INCH_M, format_inches, from_si, r_si_to_ip, to_si
from server.services import assembly_cache
from server.services.catalog import Catalog, MaterialSpec, builtin_catalog

#: framing conductivity above this [W/(m·K)] is metal: parallel path does not hold
METAL_CONDUCTIVITY_W_MK = 5.0
#: default framing when only lumber is named: softwood, k = 0.12 W/(m·K)
#: (ASHRAE Handbook—Fundamentals 2017 ch. 26 Table 1, softwood lumber, from memory)
SOFTWOOD_K_W_MK = 0.12


def _thickness_m(value: float, units: Units) -> float:
    return to_si(value, "thickness", units) * 1e-3


def _r_si(value: float, units: Units) -> float:
    return to_si(value, "r", units)


def _k_si(value: float, units: Units) -> float:
    return to_si(value, "conductivity", units)


def _material(slug: str, catalog: Catalog, field: str) -> MaterialSpec:
    spec = catalog.get(slug)
    if spec is None:
        raise InputError(field, f"there is no material '{slug}' in the library")
    return spec


class _Builder:
    """Turns one AssemblyInput into physics layers, collecting warnings as it goes."""

    def __init__(self, units: Units, catalog: Catalog, field: str) -> None:
        self.units = units
        self.catalog = catalog
        self.field = field
        self.warnings: list[str] = []
        self.steel: list[tuple[int, phys.FramedLayer, float | None]] = []

    def layer(self, index: int, doc: LayerInput) -> phys.AnyLayer:
        where = f"{self.field}.layers[{index}]".lstrip(".")
        label = doc.name or f"layer {index + 1}"
        if doc.cavity is not None and doc.framing is not None:
            return self._framed(index, where, label, doc, doc.cavity, doc.framing)
        thickness_m = _thickness_m(doc.thickness, self.units) if doc.thickness else None
        if doc.r is not None:
            return phys.Layer(label, _r_si(doc.r, self.units), thickness_m)
        if doc.conductivity is not None:
            assert thickness_m is not None  # checked by the document
            return phys.Layer(
                label, phys.layer_r(thickness_m, _k_si(doc.conductivity, self.units)), thickness_m
            )
        spec = _material(doc.material or "", self.catalog, f"{where}.material")
        if spec.kind == "fixed_r":
            return phys.Layer(label, spec.r_si or 0.0, thickness_m)
        if thickness_m is None:
            raise InputError(f"{where}.thickness", f"{spec.name} needs a thickness")
        return phys.Layer(
            label, phys.layer_r(thickness_m, spec.conductivity_w_mk or 0.0), thickness_m
        )

    def _framed(
        self,
        index: int,
        where: str,
        label: str,
        doc: LayerInput,
        cavity: CavityInput,
        framing: FramingInput,
    ) -> phys.FramedLayer:
        depth_m = _thickness_m(doc.thickness, self.units) if doc.thickness else None
        lumber_depth_m = None
        lumber_width_m = None
        if framing.lumber:
            try:
                size = lumber_size(framing.lumber)
            except ValueError as exc:
                raise InputError(f"{where}.framing.lumber", str(exc)) from None
            lumber_depth_m, lumber_width_m = size.depth_m, size.width_m
            if depth_m is None:
                depth_m = lumber_depth_m
            elif depth_m > lumber_depth_m + 0.125 * INCH_M:
                self.warnings.append(
                    f"{label}: the layer is {format_inches(depth_m)} deep but a {framing.lumber} is "
                    f"only {format_inches(lumber_depth_m)}; enter fill above the framing as a layer "
                    "of its own."
                )
            elif depth_m < lumber_depth_m - 0.125 * INCH_M:
                self.warnings.append(
                    f"{label}: the layer is {format_inches(depth_m)} deep, less than the "
                    f"{format_inches(lumber_depth_m)} depth of a {framing.lumber}."
                )
        assert depth_m is not None
        fraction = framing.fraction
        if fraction is None:
            assert lumber_width_m is not None and framing.spacing is not None
            spacing_m = _thickness_m(framing.spacing, self.units)
            if spacing_m <= lumber_width_m:
                raise InputError(
                    f"{where}.framing.spacing", "spacing must be wider than the lumber"
                )
            fraction = lumber_width_m / spacing_m
            self.warnings.append(
                f"{label}: framing fraction {fraction:.0%} counts studs or joists only; plates, "
                "headers and blocking usually bring a 16 in on-centre wall to about 25 %."
            )
        cavity_r = self._cavity_r(where, label, depth_m, cavity)
        if framing.conductivity is not None:
            k_frame = _k_si(framing.conductivity, self.units)
        elif framing.material is not None:
            spec = _material(framing.material, self.catalog, f"{where}.framing.material")
            if spec.kind != "conductivity" or not spec.conductivity_w_mk:
                raise InputError(f"{where}.framing.material", f"{spec.name} has no conductivity")
            k_frame = spec.conductivity_w_mk
        else:
            k_frame = SOFTWOOD_K_W_MK
        layer = phys.FramedLayer(label, depth_m, cavity_r, phys.layer_r(depth_m, k_frame), fraction)
        if k_frame > METAL_CONDUCTIVITY_W_MK:
            spacing_in = (
                _thickness_m(framing.spacing, self.units) / INCH_M if framing.spacing else 16.0
            )
            self.steel.append((index, layer, spacing_in))
            self.warnings.append(
                f"{label}: metal framing short-circuits the cavity; neither parallel path nor "
                "ISO 6946 holds. See r_steel_corrected (correction factors in the style of "
                "ASHRAE 90.1 Appendix A, from memory) and use method 'steel_correction'."
            )
        return layer

    def _cavity_r(self, where: str, label: str, depth_m: float, cavity: CavityInput) -> float:
        if cavity.r is not None:
            return _r_si(cavity.r, self.units)
        if cavity.conductivity is not None:
            return phys.layer_r(depth_m, _k_si(cavity.conductivity, self.units))
        if cavity.material is not None:
            spec = _material(cavity.material, self.catalog, f"{where}.cavity.material")
            if spec.kind != "conductivity" or not spec.conductivity_w_mk:
                raise InputError(f"{where}.cavity.material", f"{spec.name} cannot fill a cavity")
            return phys.layer_r(depth_m, spec.conductivity_w_mk)
        assert cavity.batt is not None
        fit = batt_in_cavity(
            _r_si(cavity.batt.r_nominal, self.units),
            _thickness_m(cavity.batt.thickness_nominal, self.units),
            depth_m,
        )
        self.warnings.extend(f"{label}: {w}" for w in fit.warnings)
        return fit.r_si


def _refuse_non_finite(
    assembly: AssemblyInput, layer_r: list[float], totals: list[float], prefix: str
) -> None:
    """InputError on the layer with the largest R when a total is not a finite number.

    Each layer can be finite while their sum (or its conversion to the request's units) is
    not: two layers of R 1e308 add up to infinity, which JSON cannot carry and no page can
    show, so such an assembly is refused rather than answered with ``r_total: null``.
    """
    if all(math.isfinite(value) for value in (*layer_r, *totals)):
        return
    index = max(range(len(layer_r)), key=lambda i: (not math.isfinite(layer_r[i]), layer_r[i]))
    doc = assembly.layers[index]
    if doc.r is not None:
        key = ".r"
    elif doc.cavity is not None:
        key = ".cavity.r" if doc.cavity.r is not None else ".cavity"
    else:
        key = ".thickness" if doc.thickness is not None else ""
    raise InputError(
        f"{prefix}.layers[{index}]{key}".lstrip("."),
        "the layers' R-values add up to a number too large to compute: check this layer's "
        "value for a typing slip",
    )


def evaluate_assembly(
    assembly: AssemblyInput,
    *,
    units: Units,
    catalog: Catalog | None = None,
    field: str = "",
    document_json: str | None = None,
) -> AssemblyResult:
    """R-values of an assembly in the request's units. Raises InputError with field paths.

    Results are kept between calls (:mod:`.assembly_cache`: same document, units, field and
    catalog rows give the same result); ``document_json``: ``assembly.model_dump_json()``
    when the caller has it already."""
    catalog = builtin_catalog() if catalog is None else catalog
    return assembly_cache.cached(
        _evaluate, assembly, units=units, catalog=catalog, field=field,
        document_json=document_json,
    )  # fmt: skip


def _evaluate(
    assembly: AssemblyInput, *, units: Units, catalog: Catalog, field: str
) -> AssemblyResult:
    prefix = field
    builder = _Builder(units, catalog, prefix)
    layers = []
    for i, doc in enumerate(assembly.layers):
        try:
            layers.append(builder.layer(i, doc))
        except ValueError as exc:
            raise InputError(f"{prefix}.layers[{i}]".lstrip("."), str(exc)) from None
    outside_film = assembly.outside_film or "wind"
    films = surface_films(assembly.films, assembly.heat_flow, outside_film)
    try:
        result = phys.assembly_resistance(layers, films)
    except ValueError as exc:
        raise InputError(f"{prefix}.layers".lstrip("."), str(exc)) from None

    r_steel = None
    if builder.steel:
        r_steel = result.r_isothermal_planes_si
        for _index, layer, spacing_in in builder.steel:
            r_steel += steel_stud_effective_r(
                layer.cavity_r_si, layer.thickness_m, spacing_in or 16
            )
            r_steel -= phys.isothermal_layer_r(layer)
    if assembly.method == "iso6946":
        r_total = result.r_iso6946_si
    elif assembly.method == "steel_correction":
        if r_steel is None:
            raise InputError(
                f"{prefix}.method".lstrip("."), "steel_correction needs a metal-framed layer"
            )
        r_total = r_steel
    else:
        r_total = result.r_parallel_path_si
    if result.iso6946_max_error > 0.2:
        builder.warnings.append(
            f"ISO 6946's error estimate is {result.iso6946_max_error:.0%}: the framed layers "
            "differ so much that a two- or three-dimensional calculation is advised."
        )

    def r_out(value: float) -> float:
        return from_si(value, "r", units)

    def t_out(value_m: float | None) -> float | None:
        return None if value_m is None else from_si(value_m * 1e3, "thickness", units)

    _refuse_non_finite(assembly, [r_out(lr.r_si) for lr in result.layers],
                       [r_out(r_total), r_si_to_ip(r_total), r_out(result.r_parallel_path_si),
                        r_out(result.r_isothermal_planes_si), r_out(result.r_iso6946_si)], prefix)  # fmt: skip
    layer_out = []
    for physical, lr in zip(layers, result.layers, strict=True):
        layer_out.append(
            LayerOut(
                name=lr.name,
                r=r_out(lr.r_si),
                thickness=t_out(physical.thickness_m),
                r_cavity_path=None if lr.r_cavity_path_si is None else r_out(lr.r_cavity_path_si),
                r_framing_path=None
                if lr.r_framing_path_si is None
                else r_out(lr.r_framing_path_si),
            )
        )
    return AssemblyResult(
        units=units,
        films=FilmsOut(inside=r_out(films.inside_r_m2k_w), outside=r_out(films.outside_r_m2k_w)),
        outside_film=outside_film,
        r_parallel_path=r_out(result.r_parallel_path_si),
        r_isothermal_planes=r_out(result.r_isothermal_planes_si),
        r_iso6946=r_out(result.r_iso6946_si),
        iso6946_max_error=result.iso6946_max_error,
        r_steel_corrected=None if r_steel is None else r_out(r_steel),
        method=assembly.method,
        r_total=r_out(r_total),
        u_factor=1.0 / r_out(r_total),
        rsi_total=r_total,
        r_ip_total=r_si_to_ip(r_total),
        layers=layer_out,
        warnings=builder.warnings,
    )


def thickness_needed(
    request: ThicknessRequest, *, catalog: Catalog | None = None
) -> ThicknessResult:
    """Thickness of one material to bring ``existing_r`` up to ``target_r`` (L = ΔR × k)."""
    catalog = builtin_catalog() if catalog is None else catalog
    units = request.units
    if request.material is not None:
        spec = _material(request.material, catalog, "material")
        if spec.kind != "conductivity" or not spec.conductivity_w_mk:
            raise InputError("material", f"{spec.name} has a fixed R, not a conductivity")
        k_si = spec.conductivity_w_mk
        name = spec.name
    else:
        k_si = _k_si(request.conductivity or 0.0, units)
        name = "the material"
    if request.existing_r >= request.target_r:
        raise InputError("target_r", "the assembly already meets this R; nothing to add")
    r_needed_si = _r_si(request.target_r - request.existing_r, units)
    try:
        thickness_m = phys.thickness_for_r(r_needed_si, k_si)
    except ValueError as exc:
        raise InputError("target_r", str(exc)) from None
    if not (thickness_m < 1e3):  # also catches inf: no layer is a kilometre thick
        raise InputError("target_r", "the thickness needed is beyond any real layer; check R and k")
    thickness = from_si(thickness_m * 1e3, "thickness", units)
    label = format_inches(thickness_m, 8) if units == "ip" else f"{thickness_m * 1e3:.0f} mm"
    unit_r = "h·ft²·°F/Btu" if units == "ip" else "m²·K/W"
    return ThicknessResult(
        units=units,
        r_needed=request.target_r - request.existing_r,
        thickness=thickness,
        thickness_label=label,
        conductivity=from_si(k_si, "conductivity", units),
        note=(
            f"L = R × k: {request.target_r - request.existing_r:.3g} {unit_r} of {name} at "
            f"k = {from_si(k_si, 'conductivity', units):.4g} needs {label}."
        ),
    )
