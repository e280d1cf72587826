"""Pipe calculator service: request units -> SI physics -> request units.

The one code path for the JSON API and the pages. Physics errors (``ValueError``) come back
as :class:`server.errors.InputError` naming the request field (``layers[0].conductivity``).
"""

from __future__ import annotations

from server.documents.pipe import PipeLayerOut, PipeRequest, PipeResult
from server.errors import InputError
from server.physics import pipe as physics
from server.physics.units import (
    BTU_J,
    BTU_PER_HOUR_W,
    UnitSystem,
    from_si,
    temp_from_c,
    temp_to_c,
    to_si,
)
from server.services.pipe_words import run_warnings, value_error_words

_MM_M = 1e-3  # the API's SI thickness and diameter are in mm; physics takes m

#: physics parameter -> request field
_FIELDS = {
    "pipe_outer_diameter_m": "pipe_outer_diameter",
    "fluid_temperature_c": "fluid_temperature",
    "ambient_temperature_c": "ambient_temperature",
    "surface_coefficient_w_m2k": "surface_coefficient",
    "emissivity": "emissivity",
    "length_m": "length",
    "thickness_m": "thickness",
    "conductivity_w_mk": "conductivity",
    "hours_per_year": "hours_per_year",
    "target_heat_loss_per_length_w_m": "target_heat_loss_per_length",
}


def _field(error: ValueError, default: str, prefix: str = "") -> str:
    parameter = getattr(error, "parameter", None)
    return prefix + _FIELDS[parameter] if parameter in _FIELDS else default


def _mm_m(value: float, quantity: str, units: UnitSystem) -> float:
    return to_si(value, quantity, units) * _MM_M


def _build_run(request: PipeRequest) -> physics.PipeRun:
    units = request.units
    layers = []
    for index, layer in enumerate(request.layers):
        try:
            layers.append(
                physics.PipeLayer(
                    _mm_m(layer.thickness, "thickness", units),
                    to_si(layer.conductivity, "conductivity", units),
                )
            )
        except ValueError as error:
            field = _field(error, f"layers[{index}]", f"layers[{index}].")
            raise InputError(field, value_error_words(error)) from error
    coefficient = request.surface_coefficient
    try:
        return physics.PipeRun(
            pipe_outer_diameter_m=_mm_m(request.pipe_outer_diameter, "diameter", units),
            layers=tuple(layers),
            fluid_temperature_c=temp_to_c(request.fluid_temperature, units),
            ambient_temperature_c=temp_to_c(request.ambient_temperature, units),
            surface_coefficient_w_m2k=None
            if coefficient is None
            else to_si(coefficient, "h", units),
            emissivity=request.emissivity,
            length_m=to_si(request.length, "length", units),
        )
    except ValueError as error:
        raise InputError(_field(error, "body"), value_error_words(error)) from error


def _target_conductivity(request: PipeRequest) -> float | None:
    """The insulation the target thickness is for, in request units (None = no target)."""
    if request.target_heat_loss_per_length is None:
        if request.target_conductivity is not None:
            raise InputError("target_conductivity", "is only used with target_heat_loss_per_length")
        return None
    if request.target_conductivity is not None:
        return request.target_conductivity
    if len(request.layers) == 1:
        return request.layers[0].conductivity
    raise InputError(
        "target_conductivity",
        "is required with target_heat_loss_per_length unless the pipe has exactly one layer: "
        "say which insulation the target thickness is for",
    )


def compute_pipe(request: PipeRequest) -> PipeResult:
    """Heat loss, surface temperature and resistances of one pipe run, in the request's units."""
    units = request.units
    run = _build_run(request)
    target_k = _target_conductivity(request)
    try:
        result = physics.pipe_heat_loss(run)
    except ValueError as error:
        raise InputError(_field(error, "body"), value_error_words(error)) from error

    def out(value: float, quantity: str) -> float:
        return from_si(value, quantity, units)

    def out_mm(value_m: float, quantity: str) -> float:
        return from_si(value_m / _MM_M, quantity, units)

    def out_w(value_w: float) -> float:
        return value_w if units == "si" else value_w / BTU_PER_HOUR_W

    annual_kwh = annual = None
    if request.hours_per_year is not None:
        try:
            energy = physics.annual_heat_loss(result.heat_loss_w, request.hours_per_year)
        except ValueError as error:
            raise InputError("hours_per_year", value_error_words(error)) from error
        annual_kwh = energy.energy_kwh
        annual = energy.energy_kwh if units == "si" else energy.energy_j / BTU_J

    thickness = at_target = None
    if target_k is not None and request.target_heat_loss_per_length is not None:
        try:
            found = physics.thickness_for_target(
                run,
                to_si(target_k, "conductivity", units),
                to_si(request.target_heat_loss_per_length, "q_per_length", units),
            )
        except ValueError as error:
            field = "target_conductivity" if request.target_conductivity is not None else None
            if getattr(error, "parameter", None) != "conductivity_w_mk" or field is None:
                field = "target_heat_loss_per_length"
            raise InputError(field, value_error_words(error)) from error
        thickness = out_mm(found.thickness_m, "thickness")
        at_target = out(found.heat_loss_per_length_w_m, "q_per_length")

    layers = [
        PipeLayerOut(
            name=layer_in.name,
            thickness=layer_in.thickness,
            conductivity=layer_in.conductivity,
            outer_diameter=out_mm(layer.outer_diameter_m, "diameter"),
            r_per_length=out(layer.r_per_length_mk_w, "r_per_length"),
            outer_temperature=temp_from_c(layer.outer_temperature_c, units),
        )
        for layer_in, layer in zip(request.layers, result.layers, strict=True)
    ]
    warnings = run_warnings(result)
    if request.surface_coefficient is not None and "emissivity" in request.model_fields_set:
        warnings.append("The emissivity is not used when the surface coefficient is given.")
    return PipeResult(
        units=units,
        r_per_length=out(result.r_per_length_mk_w, "r_per_length"),
        r_insulation_per_length=out(result.r_insulation_per_length_mk_w, "r_per_length"),
        r_surface_per_length=out(result.r_surface_per_length_mk_w, "r_per_length"),
        heat_loss_per_length=out(result.heat_loss_per_length_w_m, "q_per_length"),
        heat_loss=out_w(result.heat_loss_w),
        length=request.length,
        bare_heat_loss_per_length=out(result.bare_heat_loss_per_length_w_m, "q_per_length"),
        surface_temperature=temp_from_c(result.surface_temperature_c, units),
        surface_coefficient=out(result.surface_coefficient_w_m2k, "h"),
        surface_coefficient_source="given"
        if request.surface_coefficient is not None
        else "computed",
        convection_coefficient=None
        if result.convection_w_m2k is None
        else out(result.convection_w_m2k, "h"),
        radiation_coefficient=None
        if result.radiation_w_m2k is None
        else out(result.radiation_w_m2k, "h"),
        r_equivalent_flat=out(result.r_equivalent_flat_m2k_w, "r"),
        pipe_outer_diameter=request.pipe_outer_diameter,
        outer_diameter=out_mm(result.outer_diameter_m, "diameter"),
        layers=layers,
        hours_per_year=request.hours_per_year,
        annual_loss_kwh=annual_kwh,
        annual_loss=annual,
        annual_loss_unit="kWh" if units == "si" else "Btu",
        target_heat_loss_per_length=request.target_heat_loss_per_length,
        target_conductivity=target_k,
        thickness_for_target=thickness,
        heat_loss_per_length_at_target=at_target,
        warnings=warnings,
    )
