"""The pipe calculation's inputs, results, errors and cautions, with the accepted ranges.

Results and input errors carry figures and kinds, not words: :mod:`server.services.pipe_words`
says them in both unit systems. The calculation is in :mod:`.pipe`.

References
----------
[4] ASTM C1055, Standard Guide for Heated System Surface Conditions that Produce Contact Burn
    Injuries: about 60 °C (140 °F) for a few seconds of contact (from memory); the numbering
    is that of :mod:`.pipe`.
"""

from __future__ import annotations

import enum
import math
from dataclasses import dataclass

from server.physics.convection import KELVIN_OFFSET

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


TOUCH_LIMIT_C = 60.0  # contact-burn guidance [4] (from memory)
THIN_LAYER_M = 0.006  # 1/4 in: thinner wraps are rarely practical (common practice)
PLAUSIBLE_H_W_M2K = (2.0, 100.0)  # still air to strong wind, pipes in air (common practice)


class Problem(enum.Enum):
    """What is wrong with an input; :class:`PipeInputError` ``figures`` carry its numbers (SI)."""

    NOT_FINITE = "not a finite number"
    NOT_POSITIVE = "not greater than zero"
    BELOW_MINIMUM = "below the minimum"  # figures: (minimum,)
    ABOVE_MAXIMUM = "above the maximum"  # figures: (maximum,)
    TEMPERATURE_RANGE = "not above absolute zero and at most the maximum"  # (maximum [°C],)
    EMISSIVITY_RANGE = "not in (0, 1]"
    OUTSIDE_AIR_TABLE = "outside the computed coefficient's range"  # (low [°C], high [°C])
    TARGET_UNREACHABLE = "target cannot be met"  # (thickness tried [m], its |q'| [W/m])
    RESULT_NOT_FINITE = "the heat loss is not a finite number"


class PipeInputError(ValueError):
    """A value the pipe calculation cannot use.

    ``parameter`` names the input at fault, ``problem`` says what is wrong and ``figures``
    holds the SI numbers a message needs (see :class:`Problem`).
    """

    def __init__(self, parameter: str, problem: Problem, *figures: float) -> None:
        super().__init__(f"{parameter}: {problem.value}")
        self.parameter = parameter
        self.problem = problem
        self.figures = figures


class CautionKind(enum.Enum):
    """A caution about a computed run; :class:`PipeCaution` ``value`` is its figure (SI)."""

    HOT_SURFACE = "outer surface above the touch limit"  # value: surface temperature [°C]
    COLD_PIPE = "pipe colder than the air"  # value: surface temperature [°C]
    THIN_LAYER = "layer thinner than practical"  # value: thickness [m]; layer_index
    UNUSUAL_COEFFICIENT = "given coefficient outside the usual range"  # value: h [W/(m²·K)]
    HIGH_RAYLEIGH = "Rayleigh number above the correlation's range"  # value: Ra [-]
    RAISES_HEAT_FLOW = "insulation below the critical radius"  # value: r_cr = k/h [m]


@dataclass(frozen=True, slots=True)
class PipeCaution:
    """One caution: its kind, its figure (SI, see :class:`CautionKind`), the layer (0-based)."""

    kind: CautionKind
    value: float
    layer_index: int | None = None


@dataclass(frozen=True, slots=True)
class PipeLayer:
    """One insulation layer: thickness [m] and conductivity [W/(m·K)]."""

    thickness_m: float
    conductivity_w_mk: float

    def __post_init__(self) -> None:
        check_range("thickness_m", self.thickness_m, THICKNESS_RANGE_M)
        check_range("conductivity_w_mk", self.conductivity_w_mk, CONDUCTIVITY_RANGE_W_MK)


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
        check_range("pipe_outer_diameter_m", self.pipe_outer_diameter_m, DIAMETER_RANGE_M)
        for name in ("fluid_temperature_c", "ambient_temperature_c"):
            value = getattr(self, name)
            if not (math.isfinite(value) and -KELVIN_OFFSET < value <= MAX_TEMPERATURE_C):
                raise PipeInputError(name, Problem.TEMPERATURE_RANGE, MAX_TEMPERATURE_C)
        if self.surface_coefficient_w_m2k is not None:
            coefficient = self.surface_coefficient_w_m2k
            check_range("surface_coefficient_w_m2k", coefficient, COEFFICIENT_RANGE_W_M2K)
        if not (math.isfinite(self.emissivity) and 0 < self.emissivity <= 1):
            raise PipeInputError("emissivity", Problem.EMISSIVITY_RANGE)
        check_range("length_m", self.length_m, LENGTH_RANGE_M)


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
    cautions: tuple[PipeCaution, ...]

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


def check_range(parameter: str, value: float, bounds: tuple[float, float]) -> None:
    """Raise PipeInputError unless 0 < low <= value <= high."""
    low, high = bounds
    if not math.isfinite(value):
        raise PipeInputError(parameter, Problem.NOT_FINITE)
    if value <= 0:
        raise PipeInputError(parameter, Problem.NOT_POSITIVE)
    if value < low:
        raise PipeInputError(parameter, Problem.BELOW_MINIMUM, low)
    if value > high:
        raise PipeInputError(parameter, Problem.ABOVE_MAXIMUM, high)
