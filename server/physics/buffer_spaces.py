"""Unconditioned (buffer) spaces between the house and the outdoors: the adjustment factor b.

A vented attic, a crawlspace, an unheated basement or a garage sits between the conditioned
space (i) and the outdoors (e). Its steady-state temperature lies between the two, so a
surface of the house facing it loses ``b · U · A`` per degree of the indoor-outdoor
difference, with b from the conductances on either side of the space [1]::

    b    = H_ue / (H_iu + H_ue)
    H_iu = Σ U·A   of the house's surfaces facing the space                 [W/K]
    H_ue = Σ U·A   of the space's own parts facing outdoors or the ground
           + ρc · n · V / 3600   (its air changes with the outdoors)           [W/K]

The air flow between the conditioned space and the buffer space (V_iu of [1]) is not counted
(the house's own infiltration is counted once, from its blower-door figure). ρc is the one
volumetric heat capacity of air of :mod:`.energy` (0.018 Btu/(ft³·°F) = 1207 J/(m³·K)).

Limiting cases: H_ue → ∞ gives b → 1 (the surface faces outdoor air); a space with no
exposed parts and no air change has H_ue = 0 and b = 0 (it reaches the indoor temperature).

Since H_iu depends on the U of the house's surfaces, b changes when a surface facing the
space is upgraded: b is recomputed for every evaluated house.

References
----------
[1] ISO 13789:2017 Thermal performance of buildings — Transmission and ventilation heat
    transfer coefficients — Calculation method, clause 6.4 "Heat transfer through
    unconditioned spaces" (the adjustment factor b = H_ue / (H_iu + H_ue)) and Annex C
    (temperature of an unconditioned space); clause numbers from memory.
[2] ASHRAE Handbook—Fundamentals (2021), ch. 16: sensible heat of air, 0.018 Btu/(ft³·°F)
    (see :data:`server.physics.energy.AIR_HEAT_CAPACITY_SI`).
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass

from server.physics.energy import AIR_HEAT_CAPACITY_SI
from server.physics.units import HOUR_S

#: what lies behind a surface when nothing is said: outdoor air
OUTDOORS = "outdoors"
#: the ground (ISO 13370 surfaces); not a buffer space, b = 1
GROUND = "ground"


def _finite(value: float, name: str, *, positive: bool = False) -> float:
    if not math.isfinite(value) or value < 0 or (positive and value == 0):
        more = "greater than zero" if positive else "zero or more"
        raise ValueError(f"{name} must be a finite number, {more}")
    return value


@dataclass(frozen=True, slots=True)
class ExposedPart:
    """A part of the buffer space's enclosure facing outdoors or the ground.

    ``area_m2`` [m²] and ``u_si`` [W/(m²·K)], films included.
    """

    area_m2: float
    u_si: float


@dataclass(frozen=True, slots=True)
class BufferSpace:
    """An unconditioned space: its exposed parts, air volume [m³] and air changes [1/h].

    ``b`` given directly [-] replaces the calculation (the other fields are then unused).
    """

    id: str
    exposed: tuple[ExposedPart, ...] = ()
    volume_m3: float = 0.0
    air_changes_per_h: float = 0.0
    b: float | None = None


@dataclass(frozen=True, slots=True)
class SpaceFactors:
    """A buffer space in one evaluated house: b [-], H_iu and H_ue [W/K].

    ``h_ue_w_per_k`` is ``None`` when b was given directly (H_ue is then not known).
    """

    id: str
    b: float
    h_iu_w_per_k: float
    h_ue_w_per_k: float | None
    b_given: bool


def ventilation_conductance(volume_m3: float, air_changes_per_h: float) -> float:
    """Heat carried by the air a buffer space exchanges with the outdoors [W/K] [1], [2].

    ``H_v = ρc · n · V / 3600`` with ρc = 1207 J/(m³·K) (0.018 Btu/(ft³·°F)).

    Parameters
    ----------
    volume_m3 : float
        Air volume of the space [m³].
    air_changes_per_h : float
        Air changes with the outdoors [1/h].

    Returns
    -------
    float
        Conductance [W/K].
    """
    _finite(volume_m3, "the space's volume")
    _finite(air_changes_per_h, "the space's air changes")
    return AIR_HEAT_CAPACITY_SI * air_changes_per_h * volume_m3 / HOUR_S


def space_to_outside_conductance(
    exposed: Sequence[ExposedPart], volume_m3: float, air_changes_per_h: float
) -> float:
    """H_ue: buffer space to outdoors and ground [W/K] [1].

    ``H_ue = Σ U·A + ρc · n · V / 3600``

    Parameters
    ----------
    exposed : sequence of ExposedPart
        The space's walls, roof, floor facing outdoors or the ground [m², W/(m²·K)].
    volume_m3 : float
        Air volume of the space [m³].
    air_changes_per_h : float
        Air changes with the outdoors [1/h].

    Returns
    -------
    float
        H_ue [W/K].
    """
    total = 0.0
    for part in exposed:
        total += _finite(part.area_m2, "an exposed part's area") * _finite(
            part.u_si, "an exposed part's U-factor"
        )
    return total + ventilation_conductance(volume_m3, air_changes_per_h)


def adjustment_factor(h_iu_w_per_k: float, h_ue_w_per_k: float) -> float:
    """The adjustment factor b of a buffer space [-] [1].

    ``b = H_ue / (H_iu + H_ue)``, 0 ≤ b ≤ 1.

    Parameters
    ----------
    h_iu_w_per_k : float
        Conditioned space to buffer space [W/K].
    h_ue_w_per_k : float
        Buffer space to outdoors (and ground) [W/K].

    Returns
    -------
    float
        b [-]. When both conductances are zero no heat passes and b is taken as 0.
    """
    _finite(h_iu_w_per_k, "H_iu")
    _finite(h_ue_w_per_k, "H_ue")
    total = h_iu_w_per_k + h_ue_w_per_k
    if total == 0:
        return 0.0
    return min(1.0, h_ue_w_per_k / total)


def space_factors(space: BufferSpace, h_iu_w_per_k: float) -> SpaceFactors:
    """b, H_iu and H_ue of ``space`` for a house whose surfaces facing it add to H_iu [1].

    Parameters
    ----------
    space : BufferSpace
        The space, with b given or its exposed parts, volume [m³] and air changes [1/h].
    h_iu_w_per_k : float
        Σ U·A of the house's surfaces facing the space [W/K].

    Returns
    -------
    SpaceFactors
    """
    _finite(h_iu_w_per_k, "H_iu")
    if space.b is not None:
        if not (0.0 <= space.b <= 1.0):
            raise ValueError(f"space '{space.id}': b must be between 0 and 1")
        return SpaceFactors(space.id, space.b, h_iu_w_per_k, None, True)
    h_ue = space_to_outside_conductance(space.exposed, space.volume_m3, space.air_changes_per_h)
    return SpaceFactors(space.id, adjustment_factor(h_iu_w_per_k, h_ue), h_iu_w_per_k, h_ue, False)


def space_temperature(b: float, indoor_c: float, outdoor_c: float) -> float:
    """Steady-state temperature of a buffer space [°C] from its b [1].

    b is defined by the temperatures it stands for, ``b = (θ_i − θ_u) / (θ_i − θ_e)``, so
    ``θ_u = θ_i − b · (θ_i − θ_e)``.

    Parameters
    ----------
    b : float
        Adjustment factor of the space [-], 0..1.
    indoor_c, outdoor_c : float
        Indoor and outdoor temperatures [°C].

    Returns
    -------
    float
        θ_u [°C].

    Examples
    --------
    >>> space_temperature(0.5, 20.0, 0.0)
    10.0
    """
    if not (0.0 <= b <= 1.0):
        raise ValueError("b must be between 0 and 1")
    return indoor_c - b * (indoor_c - outdoor_c)


def buffered_conductances(
    ua_by_surface: Mapping[str, float],
    adjacent: Mapping[str, str],
    spaces: Sequence[BufferSpace],
) -> tuple[dict[str, float], dict[str, SpaceFactors]]:
    """Each surface's conductance to the outdoors after its buffer space's b [W/K] [1].

    ``H_i = b_s · U_i · A_i`` for a surface i facing space s (H_iu of s is Σ U·A of those
    surfaces); ``H_i = U_i · A_i`` for a surface facing the outdoors or the ground.

    Parameters
    ----------
    ua_by_surface : mapping of str to float
        U·A of each surface as if it faced outdoor air [W/K].
    adjacent : mapping of str to str
        What lies behind each surface: ``"outdoors"``, ``"ground"`` or a space id (a surface
        not listed faces the outdoors).
    spaces : sequence of BufferSpace
        The house's buffer spaces.

    Returns
    -------
    tuple of (dict of str to float, dict of str to SpaceFactors)
        Conductance of each surface after b [W/K], and each space's factors.

    Raises
    ------
    ValueError
        A surface names a space the house does not have; two spaces share an id.
    """
    by_id: dict[str, BufferSpace] = {}
    for space in spaces:
        if space.id in by_id or space.id in (OUTDOORS, GROUND):
            raise ValueError(f"the space id '{space.id}' is used twice or reserved")
        by_id[space.id] = space
    h_iu = dict.fromkeys(by_id, 0.0)
    for surface_id, ua in ua_by_surface.items():
        behind = adjacent.get(surface_id, OUTDOORS)
        if behind in (OUTDOORS, GROUND):
            continue
        if behind not in by_id:
            raise ValueError(f"surface '{surface_id}': there is no space '{behind}'")
        h_iu[behind] += ua
    factors = {sid: space_factors(by_id[sid], h_iu[sid]) for sid in by_id}
    result = {}
    for surface_id, ua in ua_by_surface.items():
        behind = adjacent.get(surface_id, OUTDOORS)
        result[surface_id] = ua * factors[behind].b if behind in factors else ua
    return result, factors
