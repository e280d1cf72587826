"""Surface film (air-film) resistances by heat-flow direction.

References
----------
[1] ASHRAE Handbook—Fundamentals (2017), ch. 26, Table 10 "Surface Film Coefficients/
    Resistances": still air, non-reflective surfaces (emittance 0.90); outside 15 mph wind.
    Values in h·ft²·°F/Btu (from memory, common practice in the trade).
[2] ISO 6946:2017, Building components and building elements — Thermal resistance and thermal
    transmittance — Calculation methods, Table 7 (conventional surface resistances, m²·K/W).
    A surface that faces an unconditioned space (or another building) rather than outdoor air
    takes the internal surface resistance Rsi of the same heat-flow direction on that side too
    (clause 6.8 and the notes to Table 7; from memory).

The side away from the conditioned space faces either outdoor air (``"wind"``: the 15 mph film
of [1], Rse of [2]) or a buffer space such as a vented attic or a crawlspace (``"still_air"``:
the still-air film of [1] for the heat-flow direction, Rsi of [2]), as the surface's films
follow what lies behind it (ISO 13789 buffer spaces, see :mod:`.buffer_spaces`).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Literal

from server.physics.units import r_ip_to_si

HeatFlow = Literal["horizontal", "up", "down"]
FilmSet = Literal["ashrae", "iso6946", "none"]
OutsideFilm = Literal["wind", "still_air"]


@dataclass(frozen=True, slots=True)
class Films:
    """Inside and outside film resistances [m²·K/W]."""

    inside_r_m2k_w: float
    outside_r_m2k_w: float

    @property
    def total_r_m2k_w(self) -> float:
        return self.inside_r_m2k_w + self.outside_r_m2k_w


# ASHRAE [1], IP values: inside still air by direction; outside 15 mph wind (any direction).
_ASHRAE_INSIDE_HFT2F_BTU = {"horizontal": 0.68, "up": 0.61, "down": 0.92}
_ASHRAE_OUTSIDE_HFT2F_BTU = 0.17
# ISO 6946 [2], SI values: Rsi by direction, Rse for all directions.
_ISO_INSIDE_M2K_W = {"horizontal": 0.13, "up": 0.10, "down": 0.17}
_ISO_OUTSIDE_M2K_W = 0.04


def surface_films(film_set: FilmSet, heat_flow: HeatFlow, outside: OutsideFilm = "wind") -> Films:
    """Film resistances for a film set, a heat-flow direction and what the outside faces.

    ``R_films = R_inside(direction) + R_outside``, with ``R_outside`` the 15 mph wind film [1]
    (Rse [2]) for outdoor air, or the still-air film of the same direction [1] (Rsi [2]) for
    a buffer space.

    Parameters
    ----------
    film_set : {"ashrae", "iso6946", "none"}
        Which convention: ASHRAE [1] still-air inside / 15 mph outside, ISO 6946 [2], or none.
    heat_flow : {"horizontal", "up", "down"}
        Direction of heat flow: walls are horizontal; an attic floor in winter is up; a floor
        over a crawlspace in winter is down.
    outside : {"wind", "still_air"}
        What the outer face meets: outdoor air (default) or the still air of an unconditioned
        space (vented attic, crawlspace, unheated basement, garage).

    Returns
    -------
    Films
        ``inside_r_m2k_w`` and ``outside_r_m2k_w`` [m²·K/W].
    """
    if heat_flow not in _ISO_INSIDE_M2K_W:
        raise ValueError("heat flow must be horizontal, up or down")
    if outside not in ("wind", "still_air"):
        raise ValueError("the outside film must be wind or still_air")
    still = outside == "still_air"
    if film_set == "ashrae":
        inside_ip_r = _ASHRAE_INSIDE_HFT2F_BTU[heat_flow]
        return Films(
            r_ip_to_si(inside_ip_r), r_ip_to_si(inside_ip_r if still else _ASHRAE_OUTSIDE_HFT2F_BTU)
        )
    if film_set == "iso6946":
        inside = _ISO_INSIDE_M2K_W[heat_flow]
        return Films(inside, inside if still else _ISO_OUTSIDE_M2K_W)
    if film_set == "none":
        return Films(0.0, 0.0)
    raise ValueError("films must be ashrae, iso6946 or none")
