"""Plain words for the dew-point (Glaser) check: what an auditor can repeat about a result.

:mod:`server.physics.condensation` returns planes, pressures and rates; the sentences the API,
the pages and the chart's description show are built here, in °C or °F (and sd with US perms
in "ip").
"""

from __future__ import annotations

from server.physics.condensation import CondensationResult, permeance_from_sd
from server.physics.psychrometrics import dew_point_from_vapour_pressure_c
from server.physics.units import (
    HOUR_S,
    SQFT_M2,
    UnitSystem,
    delta_k_to_f,
    permeance_to_us_perms,
    temp_from_c,
)

#: Always shown with the result.
SCREENING_NOTE = (
    "This is a screening check (ISO 13788 Glaser method): one steady condition, water vapour "
    "moving by diffusion only; it ignores liquid water moving through materials, air leaking "
    "through the assembly, rain, sun and moisture stored in the materials. A flag means look "
    "closer, not a verdict."
)


def _notes(result: CondensationResult) -> list[str]:
    """The layers floored to still air, then the several-planes note."""
    notes = []
    floored = [
        f"the {result.layers[k].name.strip() or f'layer {k + 1}'}"
        for k in result.still_air_floored_layers
    ]
    if floored:
        notes.append(
            "Taken as resisting vapour like still air of the same thickness (sd = thickness): "
            + ", ".join(floored)
            + "."
        )
    if len(result.condensation_planes) > 1:
        notes.append(
            f"Water would collect at {len(result.condensation_planes)} planes at once, not one; "
            "each plane's rate comes from the same Glaser construction."
        )
    return notes


def _temp(value_c: float, units: UnitSystem) -> str:
    return f"{temp_from_c(value_c, units):.1f} °{'C' if units == 'si' else 'F'}"


def _difference(value_k: float, units: UnitSystem) -> str:
    return f"{value_k:.1f} K" if units == "si" else f"{delta_k_to_f(value_k):.1f} °F"


def _sd(value_m: float, units: UnitSystem) -> str:
    if units == "si" or value_m <= 0.0:
        return f"sd {value_m:.3g} m"
    perms = permeance_to_us_perms(permeance_from_sd(value_m))
    return f"sd {value_m:.3g} m, about {perms:.3g} perms"


def _rate(rate_kg_m2_s: float, units: UnitSystem) -> str:
    grams_m2_day = rate_kg_m2_s * 1000.0 * 24.0 * HOUR_S
    if units == "si":
        return f"about {grams_m2_day:.3g} g of water per square metre per day"
    return f"about {grams_m2_day * SQFT_M2:.3g} g of water per square foot per day"


def summary_words(result: CondensationResult, *, units: UnitSystem = "si") -> list[str]:
    """Sentences an auditor can repeat about a :class:`CondensationResult`.

    Parameters
    ----------
    result : CondensationResult
        The output of :func:`glaser_check`.
    units : {"si", "ip"}
        Temperatures in °C or °F; "ip" also gives sd as US perms.

    Returns
    -------
    list of str
        The condition, each finding, then the notes (:data:`SCREENING_NOTE` last).
    """
    words: list[str] = []
    indoor_dew = dew_point_from_vapour_pressure_c(result.indoor_vapour_pressure_pa)
    dew_text = "perfectly dry" if indoor_dew is None else f"dew point {_temp(indoor_dew, units)}"
    words.append(
        f"Condition checked: indoors {_temp(result.indoor_temp_c, units)} at "
        f"{result.indoor_rh:.0%} relative humidity ({dew_text}), outdoors "
        f"{_temp(result.outdoor_temp_c, units)} at {result.outdoor_rh:.0%}."
    )
    from_room = result.indoor_vapour_pressure_pa >= result.outdoor_vapour_pressure_pa
    for found in result.condensation_planes:
        plane = result.planes[found.plane_index]
        toward_room = result.total_sd_m - plane.cumulative_sd_m
        near, far = (
            (toward_room, plane.cumulative_sd_m)
            if from_room
            else (plane.cumulative_sd_m, toward_room)
        )
        source, side = ("the room", "room") if from_room else ("outdoors", "outdoor")
        dew = "" if plane.dew_point_c is None else f" (dew point {_temp(plane.dew_point_c, units)})"
        words.append(
            f"At the {plane.label} the temperature is {_temp(plane.temperature_c, units)}; "
            f"water vapour from {source} would condense there{dew} because nothing on the "
            f"{side} side of it slows vapour down enough ({_sd(near, units)} on that side, "
            f"against {_sd(far, units)} beyond it). It would collect "
            f"{_rate(found.rate_kg_m2_s, units)} while this condition lasts."
        )
    rated = {found.plane_index for found in result.condensation_planes}
    surfaces = {0, len(result.planes) - 1}
    others = [p for p in result.flagged if p.index not in rated and p.index not in surfaces]
    if others and rated:
        span = (
            others[0].label if len(others) == 1 else f"{others[0].label} to the {others[-1].label}"
        )
        words.append(
            f"Without condensation the vapour pressure would also be above saturation at "
            f"{len(others)} more plane(s) (the {span}); that shows how far the wet zone reaches."
        )
    elif others:
        words.append(
            f"The vapour pressure is at or just above saturation at {len(others)} plane(s) "
            f"(the {others[0].label}) with no condensation rate worth stating: the plane meets "
            "the air with no vapour resistance between, or the excess is negligible."
        )
    for plane, face, where in (
        (result.planes[-1], result.inside_surface_condensation, "room"),
        (result.planes[0], result.outside_surface_condensation, "outdoor air"),
    ):
        if face and plane.dew_point_c is not None:
            words.append(
                f"The {plane.label} is at {_temp(plane.temperature_c, units)}, at or below the "
                f"{where}'s dew point of {_temp(plane.dew_point_c, units)}: water would form on "
                "that surface itself (surface condensation)."
            )
    if not result.flagged:
        margins = [
            (p.margin_k, p.index, p.dew_point_c)
            for p in result.planes
            if p.margin_k is not None and p.dew_point_c is not None
        ]
        if not margins:
            words.append("The air is perfectly dry on both sides, so nothing can condense.")
        else:
            margin, index, dew_point = min(margins)
            low = result.planes[index]
            words.append(
                f"No plane reaches the dew point at this condition; the closest is the "
                f"{low.label} at {_temp(low.temperature_c, units)}, with a dew point of "
                f"{_temp(dew_point, units)} there ({_difference(margin, units)} to spare)."
            )
    words.extend(_notes(result))
    words.append(SCREENING_NOTE)
    return words
