"""What a pipe run's heat loss costs: what it carries, where it runs, its surface.

A pipe run carries heating water (from the heating system) or domestic hot water (from a
water heater with its own fuel, efficiency and price). Its steady loss (see :mod:`.pipe` and
:func:`server.physics.energy.pipe_annual_loss`) is counted by where it runs, with b the
adjustment factor of that place (0 in the conditioned space, 1 outdoors or in an
unconditioned space taken as outdoor air, a buffer space's b, ISO 13789 [1]):

* heating water is hot only while the house is heated, and the heat it gives off in the
  house (share 1 − b) heats the house then: counted share ``b``;
* domestic hot water: in the heating season (share s of its hot hours) the heat it gives off
  into the house replaces heat the heating system would have supplied, so that part is no
  loss then; outside the heating season it is a full loss: counted share ``1 − s · (1 − b)``.
  (The exchange counts the heat at face value: the heating system's fuel is not priced
  against the water heater's.)
* a pipe that does not say where it runs is counted in full and bought at the heating
  system unless it says it carries domestic hot water (the rule before these inputs).

Surface emissivity: the radiation part of the outer coefficient depends on it (see
:mod:`.convection`). A bare copper pipe has ε ≈ 0.1 [2]; an insulated pipe's jacket (or a
painted surface) ε ≈ 0.9 [2] (common practice).

References
----------
[1] ISO 13789:2017, clause 6.4 (b of an unconditioned space).
[2] ASHRAE Handbook—Fundamentals (2021), ch. 4 "Heat Transfer", table of surface
    emissivities: copper, commercial or tarnished finish about 0.1 (polished lower, heavily
    oxidised higher); paints and non-metallic jackets about 0.9 (values from memory).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from server.physics.fuels import Fuel

#: emissivity of a bare copper pipe [-] (from memory, see [2])
BARE_COPPER_EMISSIVITY = 0.1
#: emissivity of an insulation jacket or a painted pipe [-] (common practice, see [2])
JACKET_EMISSIVITY = 0.9
#: share of a year's hours in the heating season when nothing better is known [-]:
#: October to April, 7 of 12 months (common practice)
DEFAULT_HEATING_SEASON_SHARE = 7.0 / 12.0

HEATING_WATER = "heating_water"
DOMESTIC_HOT_WATER = "domestic_hot_water"


@dataclass(frozen=True, slots=True)
class WaterHeater:
    """A water heater: fuel row, efficiency [-], price [money/fuel unit], CO2 [kg/unit]."""

    fuel: Fuel
    efficiency: float
    price_per_unit: float
    co2_kg_per_unit: float | None = None


def counted_share(service: str | None, b: float | None, heating_season_share: float) -> float:
    """Share of a pipe run's loss that is a loss to the house [-].

    Parameters
    ----------
    service : {"heating_water", "domestic_hot_water"} or None
        What the pipe carries (None: not said, taken as heating water).
    b : float or None
        Adjustment factor of where it runs [-]: 0 conditioned, 1 unconditioned, a buffer
        space's b; None: not said (counted in full).
    heating_season_share : float
        Share of the pipe's hot hours that fall in the heating season [-] (domestic hot water).

    Returns
    -------
    float
        ``b`` for heating water, ``1 − s·(1 − b)`` for domestic hot water, 1 when where it
        runs is not said.
    """
    if b is None:
        return 1.0
    if not (math.isfinite(b) and 0 <= b <= 1):
        raise ValueError("b must be from 0 to 1")
    if not (math.isfinite(heating_season_share) and 0 <= heating_season_share <= 1):
        raise ValueError("the heating-season share must be from 0 to 1")
    if service == DOMESTIC_HOT_WATER:
        return 1.0 - heating_season_share * (1.0 - b)
    return b


def outer_emissivity(given: float | None, has_insulation: bool, material: str | None) -> float:
    """Emissivity of a pipe run's outer surface [-]: given, else 0.1 for bare copper and 0.9
    for a jacket, paint or anything else (see [2])."""
    if given is not None:
        return given
    if not has_insulation and material == "copper":
        return BARE_COPPER_EMISSIVITY
    return JACKET_EMISSIVITY
