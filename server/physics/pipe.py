"""Heat loss of an insulated pipe run: multi-layer cylindrical conduction + outer surface.

The pipe wall and the inner film are neglected (the insulation's inner face is at the fluid
temperature), as is usual for insulated building-services pipes ([2], method style of [3]).
Layers are listed inside to outside. Results and input errors carry figures and kinds, not
words: :mod:`server.services.pipe_words` says them in both unit systems.

References
----------
[1] T. L. Bergman, A. S. Lavine, F. P. Incropera, D. P. DeWitt, Fundamentals of Heat and Mass
    Transfer, 7th ed., Wiley (2011): §3.3.1 eq. 3.33 (cylindrical wall resistance), eq. 3.35
    (composite wall), Example 3.6 (critical insulation radius r_cr = k/h).
[2] ASHRAE Handbook—Fundamentals (2021), ch. 4 "Heat Transfer", steady conduction through
    cylindrical shells (from memory).
[3] ASTM C680, Standard Practice for Estimate of the Heat Gain or Loss and the Surface
    Temperatures of Insulated Flat, Cylindrical, and Spherical Systems (method style; from
    memory).
[4] ASTM C1055, Standard Guide for Heated System Surface Conditions that Produce Contact Burn
    Injuries: about 60 °C (140 °F) for a few seconds of contact (from memory).

The inputs, results and ranges are in :mod:`.pipe_types` and the resistance formulas in
:mod:`.pipe_resistance`; this module solves a run and re-exports those names (importers use
``pipe.<name>``).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

from server.physics.convection import (
    AIR_TABLE_MAX_C,
    AIR_TABLE_MIN_C,
    CHURCHILL_CHU_MAX_RAYLEIGH,
    cylinder_surface_coefficient,
)
from server.physics.pipe_resistance import (
    critical_radius,
    cylinder_resistance_per_length,
    equivalent_flat_resistance,
    layer_radii,
    surface_resistance_per_length,
)
from server.physics.pipe_types import (
    CONDUCTIVITY_RANGE_W_MK,
    HOURS_PER_LEAP_YEAR,
    MAX_TARGET_THICKNESS_M,
    PLAUSIBLE_H_W_M2K,
    TARGET_RANGE_W_M,
    THIN_LAYER_M,
    TOUCH_LIMIT_C,
    AnnualHeatLoss,
    CautionKind,
    LayerResult,
    PipeCaution,
    PipeHeatLoss,
    PipeInputError,
    PipeLayer,
    PipeRun,
    Problem,
    TargetThickness,
    check_range,
)
from server.physics.units import HOUR_S

#: names importers read as ``pipe.<name>``, wherever they are defined
__all__ = [
    "PLAUSIBLE_H_W_M2K",
    "THIN_LAYER_M",
    "TOUCH_LIMIT_C",
    "PipeLayer",
    "PipeRun",
    "annual_heat_loss",
    "pipe_heat_loss",
    "run_cautions",
    "thickness_for_target",
]


_SOLVER_MAX_ITERATIONS = 200  # bisection halvings; 1000 K range -> 1e-12 K after ~50
_SOLVER_TOLERANCE_K = 1e-10


@dataclass(frozen=True, slots=True)
class _Solution:
    r_layers: tuple[float, ...]
    r_surface: float
    heat_loss_per_length: float
    surface_temperature_c: float
    coefficient: float
    parts: tuple[float, float, float] | None  # convection, radiation, Rayleigh
    iterations: int


def _solve(run: PipeRun) -> _Solution:
    """Heat flow per length, iterating on the surface temperature when h is computed."""
    radii = layer_radii(run.pipe_outer_diameter_m, run.layers)
    r_layers = tuple(
        cylinder_resistance_per_length(inner, outer, layer.conductivity_w_mk)
        for inner, outer, layer in zip(radii[:-1], radii[1:], run.layers, strict=True)
    )
    r_ins, r_out = sum(r_layers), radii[-1]
    fluid, ambient = run.fluid_temperature_c, run.ambient_temperature_c
    parts, iterations = None, 0
    if run.surface_coefficient_w_m2k is not None:
        coefficient = run.surface_coefficient_w_m2k
    else:
        for name, value in (("fluid_temperature_c", fluid), ("ambient_temperature_c", ambient)):
            if not AIR_TABLE_MIN_C <= value <= AIR_TABLE_MAX_C:
                raise PipeInputError(
                    name, Problem.OUTSIDE_AIR_TABLE, AIR_TABLE_MIN_C, AIR_TABLE_MAX_C
                )

        def coefficient_at(surface_c: float) -> float:
            return cylinder_surface_coefficient(
                2 * r_out, surface_c, ambient, run.emissivity
            ).total_w_m2k

        # Energy balance on the outer face: (T_f - T_s)/R'_ins = 2 pi r_o h(T_s) (T_s - T_a).
        # The residual is positive at `low` and negative at `high`: bisection always converges.
        low, high = min(fluid, ambient), max(fluid, ambient)
        surface = fluid
        if r_ins > 0 and high > low:
            while high - low > _SOLVER_TOLERANCE_K and iterations < _SOLVER_MAX_ITERATIONS:
                iterations += 1
                surface = 0.5 * (low + high)
                residual = (fluid - surface) / r_ins - (
                    (surface - ambient) * 2 * math.pi * r_out * coefficient_at(surface)
                )
                if residual > 0:
                    low = surface
                else:
                    high = surface
            surface = 0.5 * (low + high)
        found = cylinder_surface_coefficient(2 * r_out, surface, ambient, run.emissivity)
        coefficient = found.total_w_m2k
        parts = (found.convection_w_m2k, found.radiation_w_m2k, found.rayleigh)
    r_surface = surface_resistance_per_length(r_out, coefficient)
    heat_loss = (fluid - ambient) / (r_ins + r_surface)
    return _Solution(
        r_layers,
        r_surface,
        heat_loss,
        ambient + heat_loss * r_surface,
        coefficient,
        parts,
        iterations,
    )


def pipe_heat_loss(run: PipeRun) -> PipeHeatLoss:
    r"""Heat loss and surface temperature of an insulated horizontal pipe run.

    .. math:: q' = \frac{T_f - T_a}{\sum_j \frac{\ln(r_{j+1}/r_j)}{2\pi k_j}
              + \frac{1}{2\pi r_o h}}, \qquad Q = q' L, \qquad T_s = T_a + \frac{q'}{2\pi r_o h}

    When h is not given it is h_c + h_r of :mod:`server.physics.convection` at the surface
    temperature, found by bisection on the outer-face energy balance (bounded iterations).

    Parameters
    ----------
    run : PipeRun
        Pipe outer diameter [m], layers inside to outside, fluid and ambient temperature [°C],
        optional surface coefficient [W/(m²·K)], emissivity [-], length [m].

    Returns
    -------
    PipeHeatLoss
        Per-length resistances [m·K/W], q' [W/m] and Q [W] (positive = loss), bare-pipe q'
        [W/m], surface temperature [°C], h [W/(m²·K)], equivalent flat R [m²·K/W], per-layer
        results and cautions (kinds and figures, see :func:`run_cautions`).

    References
    ----------
    [1] eq. 3.33, 3.35; [2]; [3] (method style).
    """
    solution = _solve(run)
    bare = _solve(replace(run, layers=())) if run.layers else solution
    radii = layer_radii(run.pipe_outer_diameter_m, run.layers)
    layer_results, temperature = [], run.fluid_temperature_c
    for outer, r_layer in zip(radii[1:], solution.r_layers, strict=True):
        temperature -= solution.heat_loss_per_length * r_layer
        layer_results.append(LayerResult(2 * outer, r_layer, temperature))
    parts = solution.parts
    result = PipeHeatLoss(
        outer_diameter_m=2 * radii[-1],
        r_insulation_per_length_mk_w=sum(solution.r_layers),
        r_surface_per_length_mk_w=solution.r_surface,
        heat_loss_per_length_w_m=solution.heat_loss_per_length,
        heat_loss_w=solution.heat_loss_per_length * run.length_m,
        bare_heat_loss_per_length_w_m=bare.heat_loss_per_length,
        surface_temperature_c=solution.surface_temperature_c,
        surface_coefficient_w_m2k=solution.coefficient,
        convection_w_m2k=parts[0] if parts else None,
        radiation_w_m2k=parts[1] if parts else None,
        rayleigh=parts[2] if parts else None,
        r_equivalent_flat_m2k_w=equivalent_flat_resistance(run.pipe_outer_diameter_m, run.layers),
        layers=tuple(layer_results),
        iterations=solution.iterations,
        cautions=(),
    )
    return replace(result, cautions=run_cautions(run, result))


def thickness_for_target(
    run: PipeRun,
    conductivity_w_mk: float,
    target_heat_loss_per_length_w_m: float,
    max_thickness_m: float = MAX_TARGET_THICKNESS_M,
) -> TargetThickness:
    """Smallest thickness of one insulation on the bare pipe with |q'| <= the target.

    ``run.layers`` is ignored: the layer replaces them. Below the critical radius (k/h) a thin
    layer raises the loss, so the answer lies past the loss peak; the search scans a geometric
    grid of thicknesses up to ``max_thickness_m`` for the first one meeting the target, then
    bisects between it and the grid point before it.

    Parameters
    ----------
    run : PipeRun
        Pipe, temperatures and surface settings.
    conductivity_w_mk : float
        Conductivity of the insulation [W/(m·K)].
    target_heat_loss_per_length_w_m : float
        Largest acceptable |q'| [W/m], > 0.
    max_thickness_m : float
        Search bound [m].

    Returns
    -------
    TargetThickness
        Thickness [m] (0 when the bare pipe already meets the target), q' [W/m] and surface
        temperature [°C] at that thickness.

    Raises
    ------
    PipeInputError
        When even ``max_thickness_m`` of the insulation cannot meet the target.
    """
    check_range("conductivity_w_mk", conductivity_w_mk, CONDUCTIVITY_RANGE_W_MK)
    target = target_heat_loss_per_length_w_m
    check_range("target_heat_loss_per_length_w_m", target, TARGET_RANGE_W_M)
    bare = replace(run, layers=())

    def solve_at(thickness_m: float) -> _Solution:
        if thickness_m <= 0:
            return _solve(bare)
        return _solve(replace(bare, layers=(PipeLayer(thickness_m, conductivity_w_mk),)))

    def meets(solution: _Solution) -> bool:
        return abs(solution.heat_loss_per_length) <= target

    grid = [0.0] + [max_thickness_m * (1e-4 ** (1 - i / 80)) for i in range(81)]
    previous = grid[0]
    for thickness in grid:
        solution = solve_at(thickness)
        if meets(solution):
            break
        previous = thickness
    else:
        raise PipeInputError(
            "target_heat_loss_per_length_w_m",
            Problem.TARGET_UNREACHABLE,
            max_thickness_m,
            abs(solution.heat_loss_per_length),
        )
    low, high = previous, thickness
    for _ in range(_SOLVER_MAX_ITERATIONS):
        if high - low <= 1e-7:  # 0.1 µm
            break
        middle = 0.5 * (low + high)
        trial = solve_at(middle)
        if meets(trial):
            high, solution = middle, trial
        else:
            low = middle
    return TargetThickness(high, solution.heat_loss_per_length, solution.surface_temperature_c)


def annual_heat_loss(heat_loss_w: float, hours_per_year: float) -> AnnualHeatLoss:
    r"""Heat lost over a year's operating hours (fuel-neutral, before system efficiency).

    .. math:: E = Q\, t, \qquad E_{kWh} = Q [W]\, t [h] / 1000

    Parameters
    ----------
    heat_loss_w : float
        Steady heat loss of the run [W] (negative = heat gain).
    hours_per_year : float
        Hours the pipe is hot per year [h], 0 < hours <= 8784.

    Returns
    -------
    AnnualHeatLoss
        Energy [J] and [kWh].
    """
    if not math.isfinite(heat_loss_w):
        raise PipeInputError("heat_loss_w", Problem.RESULT_NOT_FINITE)
    check_range("hours_per_year", hours_per_year, (0.0, HOURS_PER_LEAP_YEAR))
    return AnnualHeatLoss(
        hours_per_year, heat_loss_w * hours_per_year * HOUR_S, heat_loss_w * hours_per_year / 1e3
    )


def run_cautions(run: PipeRun, result: PipeHeatLoss) -> tuple[PipeCaution, ...]:
    """Cautions about a computed run, in this order: hot surface (above ``TOUCH_LIMIT_C`` [4]),
    cold pipe (fluid below ambient), each layer under ``THIN_LAYER_M``, a given coefficient
    outside ``PLAUSIBLE_H_W_M2K``, a Rayleigh number beyond the Churchill–Chu range, and
    insulation that raises the heat flow (outer radius below r_cr = k/h [1], Example 3.6).
    """
    cautions = []
    if result.surface_temperature_c > TOUCH_LIMIT_C:
        cautions.append(PipeCaution(CautionKind.HOT_SURFACE, result.surface_temperature_c))
    if run.fluid_temperature_c < run.ambient_temperature_c:
        cautions.append(PipeCaution(CautionKind.COLD_PIPE, result.surface_temperature_c))
    for index, layer in enumerate(run.layers):
        if layer.thickness_m < THIN_LAYER_M:
            cautions.append(PipeCaution(CautionKind.THIN_LAYER, layer.thickness_m, index))
    low, high = PLAUSIBLE_H_W_M2K
    given = run.surface_coefficient_w_m2k
    if given is not None and not low <= given <= high:
        cautions.append(PipeCaution(CautionKind.UNUSUAL_COEFFICIENT, given))
    if result.rayleigh is not None and result.rayleigh > CHURCHILL_CHU_MAX_RAYLEIGH:
        cautions.append(PipeCaution(CautionKind.HIGH_RAYLEIGH, result.rayleigh))
    bare, insulated = (
        abs(result.bare_heat_loss_per_length_w_m),
        abs(result.heat_loss_per_length_w_m),
    )
    if run.layers and insulated > bare * (1 + 1e-9):
        outer_k = run.layers[-1].conductivity_w_mk
        radius = critical_radius(outer_k, result.surface_coefficient_w_m2k)
        cautions.append(PipeCaution(CautionKind.RAISES_HEAT_FLOW, radius, len(run.layers) - 1))
    return tuple(cautions)
