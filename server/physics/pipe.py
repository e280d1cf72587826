"""Heat loss of an insulated pipe run: multi-layer cylindrical conduction + outer surface.

The pipe wall and the inner film are neglected (the insulation's inner face is at the fluid
temperature), as is usual for insulated building-services pipes ([2], method style of [3]).
Layers are listed inside to outside.

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
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass, replace

from server.physics.convection import (
    AIR_TABLE_MAX_C,
    AIR_TABLE_MIN_C,
    CHURCHILL_CHU_MAX_RAYLEIGH,
    KELVIN_OFFSET,
    cylinder_surface_coefficient,
)
from server.physics.units import (
    FOOT_M,
    HOUR_S,
    INCH_M,
    Q_LENGTH_IP_IN_SI,
    c_to_f,
    k_si_to_ip,
    u_si_to_ip,
)

# Accepted ranges (SI). They keep every result finite; none binds a real building pipe.
DIAMETER_RANGE_M = (1e-4, 5.0)  # 0.1 mm .. 5 m: larger is a vessel or duct (common practice)
THICKNESS_RANGE_M = (1e-5, 2.0)  # 0.01 mm .. 2 m (common practice)
# below vacuum panels (~0.004) and above every solid (diamond ~2000 W/(m·K)); from memory
CONDUCTIVITY_RANGE_W_MK = (1e-4, 1e4)
COEFFICIENT_RANGE_W_M2K = (1e-2, 1e5)  # common practice
LENGTH_RANGE_M = (1e-3, 1e6)  # common practice
TARGET_RANGE_W_M = (1e-6, 1e9)  # common practice
MAX_TEMPERATURE_C = 1000.0  # building-services pipes stay far below this (common practice)
MAX_TARGET_THICKNESS_M = 0.5  # search bound for the target thickness (common practice)
HOURS_PER_LEAP_YEAR = 8784.0  # 366 days x 24 h
_SOLVER_MAX_ITERATIONS = 200  # bisection halvings; 1000 K range -> 1e-12 K after ~50
_SOLVER_TOLERANCE_K = 1e-10
TOUCH_LIMIT_C = 60.0  # contact-burn guidance [4] (from memory)
THIN_LAYER_M = 0.006  # 1/4 in: thinner wraps are rarely practical (common practice)
PLAUSIBLE_H_W_M2K = (2.0, 100.0)  # still air to strong wind, pipes in air (common practice)


class PipeInputError(ValueError):
    """A value the pipe calculation cannot use; ``parameter`` names the input at fault."""

    def __init__(self, parameter: str, message: str) -> None:
        super().__init__(message)
        self.parameter = parameter


@dataclass(frozen=True, slots=True)
class PipeLayer:
    """One insulation layer: thickness [m] and conductivity [W/(m·K)]."""

    thickness_m: float
    conductivity_w_mk: float

    def __post_init__(self) -> None:
        _check("thickness_m", self.thickness_m, THICKNESS_RANGE_M, text_mm)
        _check("conductivity_w_mk", self.conductivity_w_mk, CONDUCTIVITY_RANGE_W_MK, _text_k)


@dataclass(frozen=True, slots=True)
class PipeRun:
    """A horizontal pipe run in still air. ``surface_coefficient_w_m2k`` None = computed."""

    pipe_outer_diameter_m: float
    layers: tuple[PipeLayer, ...]
    fluid_temperature_c: float
    ambient_temperature_c: float
    surface_coefficient_w_m2k: float | None = None
    emissivity: float = 0.9  # painted or jacketed surface (common practice, from memory)
    length_m: float = 1.0

    def __post_init__(self) -> None:
        _check("pipe_outer_diameter_m", self.pipe_outer_diameter_m, DIAMETER_RANGE_M, text_mm)
        for name in ("fluid_temperature_c", "ambient_temperature_c"):
            value = getattr(self, name)
            if not (math.isfinite(value) and -KELVIN_OFFSET < value <= MAX_TEMPERATURE_C):
                raise PipeInputError(
                    name,
                    "must be above absolute zero (-273.15 °C, -459.67 °F) and at most "
                    f"{_text_c(MAX_TEMPERATURE_C)}",
                )
        if self.surface_coefficient_w_m2k is not None:
            coefficient = self.surface_coefficient_w_m2k
            _check("surface_coefficient_w_m2k", coefficient, COEFFICIENT_RANGE_W_M2K, _text_h)
        if not (math.isfinite(self.emissivity) and 0 < self.emissivity <= 1):
            raise PipeInputError("emissivity", "must be greater than 0 and at most 1")
        _check("length_m", self.length_m, LENGTH_RANGE_M, _text_length)


@dataclass(frozen=True, slots=True)
class LayerResult:
    """One layer's share: outer diameter [m], R' [m·K/W], outer-face temperature [°C]."""

    outer_diameter_m: float
    r_per_length_mk_w: float
    outer_temperature_c: float


@dataclass(frozen=True, slots=True)
class PipeHeatLoss:
    """Result for one run; heat flows are positive out of the pipe (negative = heat gain)."""

    outer_diameter_m: float
    r_insulation_per_length_mk_w: float
    r_surface_per_length_mk_w: float
    heat_loss_per_length_w_m: float
    heat_loss_w: float
    bare_heat_loss_per_length_w_m: float
    surface_temperature_c: float
    surface_coefficient_w_m2k: float
    convection_w_m2k: float | None  # None when the coefficient was given
    radiation_w_m2k: float | None
    rayleigh: float | None
    r_equivalent_flat_m2k_w: float
    layers: tuple[LayerResult, ...]
    iterations: int
    warnings: tuple[str, ...]

    @property
    def r_per_length_mk_w(self) -> float:
        """R' = R'_insulation + R'_surface [m·K/W]."""
        return self.r_insulation_per_length_mk_w + self.r_surface_per_length_mk_w


@dataclass(frozen=True, slots=True)
class TargetThickness:
    """Thickness of one insulation layer on the bare pipe that meets a heat-loss target."""

    thickness_m: float
    heat_loss_per_length_w_m: float
    surface_temperature_c: float


@dataclass(frozen=True, slots=True)
class AnnualHeatLoss:
    """Heat lost over a year's operating hours, before any heating-system efficiency."""

    hours_per_year: float
    energy_j: float
    energy_kwh: float


def _check(
    parameter: str, value: float, bounds: tuple[float, float], describe: Callable[[float], str]
) -> None:
    """Raise PipeInputError unless 0 < low <= value <= high; ``describe`` words a bound."""
    low, high = bounds
    if not math.isfinite(value):
        raise PipeInputError(parameter, "must be a finite number (not NaN or infinity)")
    if value <= 0:
        raise PipeInputError(parameter, "must be greater than zero")
    if value < low:
        raise PipeInputError(parameter, f"must be at least {describe(low)}")
    if value > high:
        raise PipeInputError(parameter, f"must be at most {describe(high)}")


def layer_radii(pipe_outer_diameter_m: float, layers: tuple[PipeLayer, ...]) -> tuple[float, ...]:
    """Radii [m] of the pipe surface and each layer's outer face: r_0 = D/2, r_j+1 = r_j + t_j."""
    radii = [0.5 * pipe_outer_diameter_m]
    for layer in layers:
        radii.append(radii[-1] + layer.thickness_m)
    return tuple(radii)


def cylinder_resistance_per_length(
    inner_radius_m: float, outer_radius_m: float, conductivity_w_mk: float
) -> float:
    r"""Conduction resistance of a cylindrical shell per unit length.

    .. math:: R' = \frac{\ln(r_2 / r_1)}{2 \pi k}

    Parameters
    ----------
    inner_radius_m, outer_radius_m : float
        Inner and outer radius [m], 0 < inner <= outer.
    conductivity_w_mk : float
        Thermal conductivity [W/(m·K)], > 0.

    Returns
    -------
    float
        R' [m·K/W].

    References
    ----------
    [1] eq. 3.33 (per unit length L = 1).
    """
    if not (0 < inner_radius_m <= outer_radius_m and conductivity_w_mk > 0):
        raise ValueError("radii must satisfy 0 < inner <= outer and k must be positive")
    return math.log(outer_radius_m / inner_radius_m) / (2.0 * math.pi * conductivity_w_mk)


def surface_resistance_per_length(outer_radius_m: float, surface_coefficient_w_m2k: float) -> float:
    r"""Outer-surface resistance per unit length, :math:`R'_s = 1 / (2 \pi r_o h)` [m·K/W].

    Parameters
    ----------
    outer_radius_m : float
        Outermost radius [m], > 0.
    surface_coefficient_w_m2k : float
        Combined outer coefficient h [W/(m²·K)], > 0.

    References
    ----------
    [1] eq. 3.35 (convection term of the composite cylinder).
    """
    if not (outer_radius_m > 0 and surface_coefficient_w_m2k > 0):
        raise ValueError("the radius and the surface coefficient must be positive")
    return 1.0 / (2.0 * math.pi * outer_radius_m * surface_coefficient_w_m2k)


def equivalent_flat_resistance(
    pipe_outer_diameter_m: float, layers: tuple[PipeLayer, ...]
) -> float:
    r"""Insulation R referred to the outer surface area (equivalent flat R).

    .. math:: R_{flat} = r_o \sum_j \frac{\ln(r_{j+1} / r_j)}{k_j}
              = 2 \pi r_o R'_{insulation}

    Parameters
    ----------
    pipe_outer_diameter_m : float
        Bare pipe outer diameter [m].
    layers : tuple of PipeLayer
        Inside to outside.

    Returns
    -------
    float
        R [m²·K/W] per m² of outer insulation surface (0 for a bare pipe).

    References
    ----------
    [3] (equivalent thickness / outer-surface basis, method style).
    """
    radii = layer_radii(pipe_outer_diameter_m, layers)
    return radii[-1] * sum(
        math.log(outer / inner) / layer.conductivity_w_mk
        for inner, outer, layer in zip(radii[:-1], radii[1:], layers, strict=True)
    )


def critical_radius(conductivity_w_mk: float, surface_coefficient_w_m2k: float) -> float:
    """Critical insulation radius r_cr = k / h [m]; below it more insulation loses more heat [1]."""
    if not (conductivity_w_mk > 0 and surface_coefficient_w_m2k > 0):
        raise ValueError("the conductivity and the surface coefficient must be positive")
    return conductivity_w_mk / surface_coefficient_w_m2k


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
                    name,
                    f"is outside {_text_c(AIR_TABLE_MIN_C)} to {_text_c(AIR_TABLE_MAX_C)}, the "
                    "range of the computed surface coefficient; give a surface coefficient",
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
        results and warnings (plain sentences).

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
        warnings=(),
    )
    return replace(result, warnings=run_warnings(run, result))


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
    _check("conductivity_w_mk", conductivity_w_mk, CONDUCTIVITY_RANGE_W_MK, _text_k)
    target = target_heat_loss_per_length_w_m
    _check("target_heat_loss_per_length_w_m", target, TARGET_RANGE_W_M, text_q)
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
            f"cannot be met: even {text_mm(max_thickness_m)} of this insulation loses "
            f"{text_q(abs(solution.heat_loss_per_length))}, more than the target; choose a "
            "higher target or an insulation with a lower conductivity",
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
        raise PipeInputError("heat_loss_w", "the heat loss must be a finite number")
    _check("hours_per_year", hours_per_year, (0.0, HOURS_PER_LEAP_YEAR), "{:g} hours".format)
    return AnnualHeatLoss(
        hours_per_year, heat_loss_w * hours_per_year * HOUR_S, heat_loss_w * hours_per_year / 1e3
    )


def _text_c(value_c: float) -> str:
    return f"{value_c:.0f} °C ({c_to_f(value_c):.0f} °F)"


def _text_k(value_w_mk: float) -> str:
    return f"{value_w_mk:.3g} W/(m·K) ({k_si_to_ip(value_w_mk):.3g} Btu·in/(h·ft²·°F))"


def _text_h(value_w_m2k: float) -> str:
    return f"{value_w_m2k:.3g} W/(m²·K) ({u_si_to_ip(value_w_m2k):.3g} Btu/(h·ft²·°F))"


def _text_length(value_m: float) -> str:
    return f"{value_m:g} m ({value_m / FOOT_M:g} ft)"


def text_mm(value_m: float) -> str:
    """A length [m] as plain words in both unit systems, e.g. ``19.0 mm (0.75 in)``."""
    return f"{value_m * 1e3:.3g} mm ({value_m / INCH_M:.3g} in)"


def text_q(value_w_m: float) -> str:
    """A heat flow per length [W/m] in both unit systems."""
    return f"{value_w_m:.3g} W/m ({value_w_m / Q_LENGTH_IP_IN_SI:.3g} Btu/(h·ft))"


def run_warnings(run: PipeRun, result: PipeHeatLoss) -> tuple[str, ...]:
    """Plain-sentence cautions about a computed run (values in both unit systems)."""
    notes = []
    if result.surface_temperature_c > TOUCH_LIMIT_C:
        notes.append(
            f"The outer surface reaches {_text_c(result.surface_temperature_c)}, above about "
            f"{_text_c(TOUCH_LIMIT_C)}, where brief contact can burn skin (ASTM C1055 style "
            "guidance, from memory): add insulation or guard the pipe."
        )
    if run.fluid_temperature_c < run.ambient_temperature_c:
        notes.append(
            "The pipe is colder than the air around it, so it gains heat (negative heat loss). "
            f"Its outer surface is at {_text_c(result.surface_temperature_c)}: if that is below "
            "the dew point of the air, water condenses on and inside the insulation, so cold "
            "pipes need a continuous vapour-retarding jacket (common practice)."
        )
    for index, layer in enumerate(run.layers):
        if layer.thickness_m < THIN_LAYER_M:
            notes.append(
                f"Layer {index + 1} is {text_mm(layer.thickness_m)} thick, thinner than "
                f"practical pipe insulation (about {text_mm(THIN_LAYER_M)} at least, common "
                "practice)."
            )
    low, high = PLAUSIBLE_H_W_M2K
    given = run.surface_coefficient_w_m2k
    if given is not None and not low <= given <= high:
        notes.append(
            f"A surface coefficient of {_text_h(given)} is outside the usual range for pipes "
            f"in air, about {_text_h(low)} to {_text_h(high)} (common practice): check the "
            "value and its units."
        )
    if result.rayleigh is not None and result.rayleigh > CHURCHILL_CHU_MAX_RAYLEIGH:
        notes.append(
            f"The Rayleigh number {result.rayleigh:.2g} is above 1e12, beyond the range the "
            "Churchill–Chu correlation was fitted to: treat the coefficient as an estimate."
        )
    bare, insulated = (
        abs(result.bare_heat_loss_per_length_w_m),
        abs(result.heat_loss_per_length_w_m),
    )
    if run.layers and insulated > bare * (1 + 1e-9):
        outer_k = run.layers[-1].conductivity_w_mk
        radius = critical_radius(outer_k, result.surface_coefficient_w_m2k)
        notes.append(
            f"This insulation raises the heat flow from {text_q(bare)} (bare) to "
            f"{text_q(insulated)}: the outer radius, {text_mm(result.outer_diameter_m / 2)}, is "
            f"below the critical radius k/h of about {text_mm(radius)}, so the added outer "
            "surface sheds more heat than the layer holds back. Use a thicker layer or an "
            "insulation with a lower conductivity."
        )
    return tuple(notes)
