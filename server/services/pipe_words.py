"""Plain words for the pipe calculation: its input errors and its cautions.

The physics (:mod:`server.physics.pipe`) returns kinds and SI figures; every sentence the
API and the pages show about a pipe run is built here, with each figure in both unit systems
(SI first, US customary in brackets), so a reader in either system can check it.
"""

from __future__ import annotations

from collections.abc import Callable

from server.physics import pipe as physics
from server.physics.pipe_types import (
    CautionKind,
    PipeCaution,
    PipeHeatLoss,
    PipeInputError,
    Problem,
)
from server.physics.units import FOOT_M, INCH_M, Q_LENGTH_IP_IN_SI, c_to_f, k_si_to_ip, u_si_to_ip


def text_c(value_c: float) -> str:
    """A temperature [°C] in both unit systems, e.g. ``60 °C (140 °F)``."""
    return f"{value_c:.0f} °C ({c_to_f(value_c):.0f} °F)"


def text_k(value_w_mk: float) -> str:
    """A conductivity [W/(m·K)] in both unit systems."""
    return f"{value_w_mk:.3g} W/(m·K) ({k_si_to_ip(value_w_mk):.3g} Btu·in/(h·ft²·°F))"


def text_h(value_w_m2k: float) -> str:
    """A surface coefficient [W/(m²·K)] in both unit systems."""
    return f"{value_w_m2k:.3g} W/(m²·K) ({u_si_to_ip(value_w_m2k):.3g} Btu/(h·ft²·°F))"


def text_length(value_m: float) -> str:
    """A run length [m] in both unit systems, e.g. ``1e+06 m (3.28084e+06 ft)``."""
    return f"{value_m:g} m ({value_m / FOOT_M:g} ft)"


def text_mm(value_m: float) -> str:
    """A length [m] as plain words in both unit systems, e.g. ``19.0 mm (0.75 in)``."""
    return f"{value_m * 1e3:.3g} mm ({value_m / INCH_M:.3g} in)"


def text_q(value_w_m: float) -> str:
    """A heat flow per length [W/m] in both unit systems."""
    return f"{value_w_m:.3g} W/m ({value_w_m / Q_LENGTH_IP_IN_SI:.3g} Btu/(h·ft))"


def _text_hours(value_h: float) -> str:
    return f"{value_h:g} hours"


#: physics parameter -> how a bound of it is said
_BOUND_WORDS: dict[str, Callable[[float], str]] = {
    "thickness_m": text_mm,
    "pipe_outer_diameter_m": text_mm,
    "conductivity_w_mk": text_k,
    "surface_coefficient_w_m2k": text_h,
    "length_m": text_length,
    "target_heat_loss_per_length_w_m": text_q,
    "hours_per_year": _text_hours,
}


def error_words(error: PipeInputError) -> str:
    """The message for a pipe input error (the field is named beside it, not in it)."""
    problem, figures = error.problem, error.figures
    if problem is Problem.NOT_FINITE:
        return "must be a finite number (not NaN or infinity)"
    if problem is Problem.NOT_POSITIVE:
        return "must be greater than zero"
    if problem is Problem.BELOW_MINIMUM:
        return f"must be at least {_BOUND_WORDS[error.parameter](figures[0])}"
    if problem is Problem.ABOVE_MAXIMUM:
        return f"must be at most {_BOUND_WORDS[error.parameter](figures[0])}"
    if problem is Problem.TEMPERATURE_RANGE:
        return (
            f"must be above absolute zero (-273.15 °C, -459.67 °F) and at most {text_c(figures[0])}"
        )
    if problem is Problem.EMISSIVITY_RANGE:
        return "must be greater than 0 and at most 1"
    if problem is Problem.OUTSIDE_AIR_TABLE:
        return (
            f"is outside {text_c(figures[0])} to {text_c(figures[1])}, the range of the "
            "computed surface coefficient; give a surface coefficient"
        )
    if problem is Problem.TARGET_UNREACHABLE:
        return (
            f"cannot be met: even {text_mm(figures[0])} of this insulation loses "
            f"{text_q(figures[1])}, more than the target; choose a higher target or an "
            "insulation with a lower conductivity"
        )
    return "the heat loss must be a finite number"  # Problem.RESULT_NOT_FINITE


def value_error_words(error: ValueError) -> str:
    """:func:`error_words` for a :class:`PipeInputError`, else the error's own message."""
    return error_words(error) if isinstance(error, PipeInputError) else str(error)


def caution_words(caution: PipeCaution, result: PipeHeatLoss) -> str:
    """One caution about ``result`` as a plain sentence (values in both unit systems)."""
    kind, value = caution.kind, caution.value
    if kind is CautionKind.HOT_SURFACE:
        return (
            f"The outer surface reaches {text_c(value)}, above about "
            f"{text_c(physics.TOUCH_LIMIT_C)}, where brief contact can burn skin (ASTM C1055 "
            "style guidance, from memory): add insulation or guard the pipe."
        )
    if kind is CautionKind.COLD_PIPE:
        return (
            "The pipe is colder than the air around it, so it gains heat (negative heat loss). "
            f"Its outer surface is at {text_c(value)}: if that is below the dew point of the "
            "air, water condenses on and inside the insulation, so cold pipes need a continuous "
            "vapour-retarding jacket (common practice)."
        )
    if kind is CautionKind.THIN_LAYER:
        number = 1 + (caution.layer_index or 0)
        return (
            f"Layer {number} is {text_mm(value)} thick, thinner than practical pipe insulation "
            f"(about {text_mm(physics.THIN_LAYER_M)} at least, common practice)."
        )
    if kind is CautionKind.UNUSUAL_COEFFICIENT:
        low, high = physics.PLAUSIBLE_H_W_M2K
        return (
            f"A surface coefficient of {text_h(value)} is outside the usual range for pipes "
            f"in air, about {text_h(low)} to {text_h(high)} (common practice): check the "
            "value and its units."
        )
    if kind is CautionKind.HIGH_RAYLEIGH:
        return (
            f"The Rayleigh number {value:.2g} is above 1e12, beyond the range the "
            "Churchill–Chu correlation was fitted to: treat the coefficient as an estimate."
        )
    bare = abs(result.bare_heat_loss_per_length_w_m)  # CautionKind.RAISES_HEAT_FLOW
    insulated = abs(result.heat_loss_per_length_w_m)
    return (
        f"This insulation raises the heat flow from {text_q(bare)} (bare) to "
        f"{text_q(insulated)}: the outer radius, {text_mm(result.outer_diameter_m / 2)}, is "
        f"below the critical radius k/h of about {text_mm(value)}, so the added outer "
        "surface sheds more heat than the layer holds back. Use a thicker layer or an "
        "insulation with a lower conductivity."
    )


def run_warnings(result: PipeHeatLoss) -> list[str]:
    """Every caution of ``result`` as a plain sentence, in the physics' order."""
    return [caution_words(caution, result) for caution in result.cautions]
