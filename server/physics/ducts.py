"""Forced-air ducts: delivery effectiveness and distribution efficiency (ASHRAE Standard 152).

The equipment heats the air flow Q_e by ΔT_e. On the way to the rooms the supply duct leaks a
fraction of that air and loses heat by conduction to where it runs; the return duct draws in
air from where it runs and picks up (gives off) heat by conduction. Relative to the indoor
temperature, with ``a_s = 1 − supply leakage fraction``, ``a_r = 1 − return leakage
fraction`` and the conduction fractions ``B = exp(−A / (ρc · Q_e · R))`` of each side, the
share of the equipment's heat that reaches the rooms is [1] (§6, delivery effectiveness;
the equation is re-derived step by step in :func:`delivery_effectiveness`)::

    DE = a_s·B_s − a_s·B_s·(1 − B_r·a_r)·ΔT_r/ΔT_e − a_s·(1 − B_s)·ΔT_s/ΔT_e

``ΔT_s = T_in − T_supply duct`` and ``ΔT_r = T_in − T_return duct`` are the temperature
differences between the house and where each duct runs. The heat that does not reach the
rooms is released where the ducts run; a share ``F_regain`` of it comes back into the house
(thermal regain), so the distribution efficiency is [1] (§6, seasonal distribution system
efficiency; from memory, ΔQ_load taken as zero)::

    η_dist = F_equip · (DE + F_regain · (1 − DE))

Where a duct runs, and its temperature:

* ``conditioned``: T = T_in, everything lost there is regained (F_regain = 1): η_dist = 1.
* ``outdoors``: T = T_out, nothing is regained.
* a buffer space of the house with adjustment factor b (ISO 13789, see
  :mod:`.buffer_spaces`): ``T = T_in − b · (T_in − T_out)``, and heat released there reaches
  the house in the share ``1 − b`` (the space's node splits it between H_iu and H_ue:
  H_iu / (H_iu + H_ue) = 1 − b). This replaces the standard's table of regain factors by
  location with the house's own buffer-space figures (our choice, stated on every result).

Supply and return may run in different places: the loss is split into its supply part
``(1 − a_s) + a_s·(1 − B_s)·(1 + ΔT_s/ΔT_e)`` and its return part
``a_s·B_s·(1 − a_r·B_r)·ΔT_r/ΔT_e`` (they add up to 1 − DE) and each part is regained at its
own location's share.

Seasonal and design figures use the same equations with the heating-season mean outdoor
temperature or the design temperature [1] (§5: seasonal and design conditions; the
standard's own tables of seasonal duct-zone temperatures are replaced by the buffer-space
temperature above). Not counted: the change of the house's infiltration caused by unbalanced
duct leakage (ΔQ_load of [1]), the equipment's efficiency change with return temperature
(F_equip = 1 unless given) and the thermal mass of the ducts (cycling losses).

References
----------
[1] ANSI/ASHRAE Standard 152-2004, "Method of Test for Determining the Design and Seasonal
    Efficiencies of Residential Thermal Distribution Systems", §5–6 (equations and clause
    numbers from memory).
[2] ASHRAE Handbook—Fundamentals (2021), ch. 16: sensible heat of air
    ρc = 0.018 Btu/(ft³·°F) = 1207 J/(m³·K) (see :data:`server.physics.energy.AIR_HEAT_CAPACITY_SI`).
[3] ISO 13789:2017, clause 6.4: adjustment factor b of an unconditioned space.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass

import numpy as np
import numpy.typing as npt

from server.physics.energy import AIR_HEAT_CAPACITY_SI

#: a duct inside the heated envelope
CONDITIONED = "conditioned"
#: a duct in outdoor air (or a space whose temperature is the outdoor one)
OUTDOORS = "outdoors"


def _check(value: float, name: str, low: float, high: float | None = None) -> float:
    if not math.isfinite(value) or value < low or (high is not None and value > high):
        span = f"from {low:g} to {high:g}" if high is not None else f"{low:g} or more"
        raise ValueError(f"{name} must be a finite number {span}")
    return value


@dataclass(frozen=True, slots=True)
class DuctSide:
    """The supply or return ducts: where they run, leakage, insulation and area.

    ``location`` is ``"conditioned"``, ``"outdoors"`` or a buffer space's id;
    ``leakage_fraction`` [-] is the leak as a share of the air handler's flow; ``r_si``
    [m²·K/W] the duct wall's R with its surface films; ``area_m2`` [m²] its outer surface.
    """

    location: str
    leakage_fraction: float
    r_si: float
    area_m2: float


@dataclass(frozen=True, slots=True)
class DuctSystem:
    """Supply and return ducts, the air handler's flow [m³/s] and temperature rise [K].

    ``equipment_factor`` is F_equip of [1] [-] (1 = the equipment's efficiency does not change
    with the ducts).
    """

    supply: DuctSide
    returns: DuctSide
    air_flow_m3_per_s: float
    temperature_rise_k: float
    equipment_factor: float = 1.0


@dataclass(frozen=True, slots=True)
class Distribution:
    """Delivery effectiveness, regain and distribution efficiency at one condition.

    ``supply_loss`` and ``return_loss`` are the parts of ``1 − delivery_effectiveness``
    released where each duct runs [-]; ``regain`` the share of the loss that comes back [-];
    ``supply_temperature_c`` and ``return_temperature_c`` where the ducts run [°C].
    """

    delivery_effectiveness: float
    supply_loss: float
    return_loss: float
    regain: float
    efficiency: float
    supply_temperature_c: float
    return_temperature_c: float


def conduction_fraction(
    area_m2: float, r_si: float, air_flow_m3_per_s: float, rho_c: float = AIR_HEAT_CAPACITY_SI
) -> float:
    """Share of the air-to-surroundings temperature difference kept along a duct [-] [1].

    ``B = exp(−A / (ρc · Q · R))`` (in IP units ``exp(−A / (1.08 · cfm · R))``, with
    1.08 = 60 min/h · 0.018 Btu/(ft³·°F)).

    Parameters
    ----------
    area_m2 : float
        Outer surface of the duct [m²], 0 or more (0 gives B = 1).
    r_si : float
        Duct wall R with films [m²·K/W], greater than 0.
    air_flow_m3_per_s : float
        Air flow through the duct [m³/s], greater than 0.
    rho_c : float
        Volumetric heat capacity of the air [J/(m³·K)].
    """
    _check(area_m2, "the duct area", 0.0)
    if not (math.isfinite(r_si) and r_si > 0):
        raise ValueError("the duct R must be a finite number greater than zero")
    if not (math.isfinite(air_flow_m3_per_s) and air_flow_m3_per_s > 0):
        raise ValueError("the air handler's flow must be a finite number greater than zero")
    if not (math.isfinite(rho_c) and rho_c > 0):
        raise ValueError("the air's heat capacity must be greater than zero")
    return math.exp(-area_m2 / (rho_c * air_flow_m3_per_s * r_si))


def delivery_effectiveness(
    a_s: float, a_r: float, b_s: float, b_r: float, dt_s: float, dt_r: float, dt_e: float
) -> float:
    """Heating delivery effectiveness of a duct system [-] [1].

    ``DE = a_s·B_s − a_s·B_s·(1 − B_r·a_r)·ΔT_r/ΔT_e − a_s·(1 − B_s)·ΔT_s/ΔT_e``

    Derivation, temperatures x measured from indoors: house air entering the return leaves it
    at ``−ΔT_r·(1 − B_r)``; mixed with the return leak (share 1 − a_r, at −ΔT_r) the return
    plenum is at ``−ΔT_r·(1 − a_r·B_r)``; the supply plenum is ΔT_e warmer; the supply duct
    keeps B_s of its difference from −ΔT_s, and a_s of the flow reaches the registers. The
    delivered heat a_s·x_register over the equipment's ΔT_e is DE.

    Parameters
    ----------
    a_s, a_r : float
        1 − leakage fraction of the supply and return [-].
    b_s, b_r : float
        Conduction fractions of the supply and return (:func:`conduction_fraction`) [-].
    dt_s, dt_r : float
        Indoor minus supply-duct and return-duct surroundings [K].
    dt_e : float
        Temperature rise across the equipment [K], greater than 0.
    """
    if not (math.isfinite(dt_e) and dt_e > 0):
        raise ValueError("the equipment's temperature rise must be greater than zero")
    return a_s * b_s - a_s * b_s * (1 - b_r * a_r) * dt_r / dt_e - a_s * (1 - b_s) * dt_s / dt_e


def location_factor(location: str, space_b: Mapping[str, float]) -> float:
    """b of where a duct runs [-]: 0 conditioned, 1 outdoors, a buffer space's b [3]."""
    if location == CONDITIONED:
        return 0.0
    if location == OUTDOORS:
        return 1.0
    if location not in space_b:
        raise ValueError(f"there is no space '{location}' for the ducts to run in")
    return space_b[location]


def duct_surroundings_c(b: float, indoor_c: float, outdoor_c: float) -> float:
    """Temperature where a duct runs [°C]: ``T = T_in − b · (T_in − T_out)`` [3]."""
    return indoor_c - b * (indoor_c - outdoor_c)


def distribution(
    system: DuctSystem,
    indoor_c: float,
    outdoor_c: float,
    space_b: Mapping[str, float],
    rho_c: float = AIR_HEAT_CAPACITY_SI,
) -> Distribution:
    """Delivery effectiveness and distribution efficiency at one outdoor temperature [1].

    Parameters
    ----------
    system : DuctSystem
        Ducts [m², m²·K/W, -], air flow [m³/s], temperature rise [K].
    indoor_c, outdoor_c : float
        Indoor and outdoor temperature [°C] (the heating-season mean for a seasonal figure,
        the design temperature for a design figure).
    space_b : mapping of str to float
        b of each buffer space of the house variant [-].
    rho_c : float
        Volumetric heat capacity of the air [J/(m³·K)].

    Returns
    -------
    Distribution
        ``η_dist = F_equip · (DE + F_regain · (1 − DE))``, clipped to [0, 1].

    Raises
    ------
    ValueError
        A leakage fraction outside [0, 1), a non-positive R, flow or rise, an unknown space.
    """
    for side, name in ((system.supply, "supply"), (system.returns, "return")):
        _check(side.leakage_fraction, f"the {name} leakage fraction", 0.0, 0.99)
    _check(system.equipment_factor, "the equipment factor", 0.0, 2.0)
    b_sup = location_factor(system.supply.location, space_b)
    b_ret = location_factor(system.returns.location, space_b)
    t_sup = duct_surroundings_c(b_sup, indoor_c, outdoor_c)
    t_ret = duct_surroundings_c(b_ret, indoor_c, outdoor_c)
    flow = system.air_flow_m3_per_s
    cond_s = conduction_fraction(system.supply.area_m2, system.supply.r_si, flow, rho_c)
    cond_r = conduction_fraction(system.returns.area_m2, system.returns.r_si, flow, rho_c)
    a_s = 1.0 - system.supply.leakage_fraction
    a_r = 1.0 - system.returns.leakage_fraction
    dt_e = system.temperature_rise_k
    dt_s, dt_r = indoor_c - t_sup, indoor_c - t_ret
    de = delivery_effectiveness(a_s, a_r, cond_s, cond_r, dt_s, dt_r, dt_e)
    supply_loss = (1 - a_s) + a_s * (1 - cond_s) * (1 + dt_s / dt_e)
    return_loss = a_s * cond_s * (1 - a_r * cond_r) * dt_r / dt_e
    loss = supply_loss + return_loss  # = 1 − DE
    regain = (supply_loss * (1 - b_sup) + return_loss * (1 - b_ret)) / loss if loss > 0 else 1.0
    efficiency = system.equipment_factor * (de + regain * (1 - de))
    return Distribution(
        delivery_effectiveness=de,
        supply_loss=supply_loss,
        return_loss=return_loss,
        regain=regain,
        efficiency=min(max(efficiency, 0.0), 1.0),
        supply_temperature_c=t_sup,
        return_temperature_c=t_ret,
    )


def air_flow_from_capacity(
    capacity_w: float, temperature_rise_k: float, rho_c: float = AIR_HEAT_CAPACITY_SI
) -> float:
    """Air handler flow [m³/s] from the output capacity [W] and rise [K]: ``Q = P / (ρc·ΔT_e)``."""
    if not (math.isfinite(capacity_w) and capacity_w > 0):
        raise ValueError("the output capacity must be greater than zero")
    if not (math.isfinite(temperature_rise_k) and temperature_rise_k > 0):
        raise ValueError("the temperature rise must be greater than zero")
    return capacity_w / (rho_c * temperature_rise_k)


def distribution_efficiency_arrays(
    *,
    a_s: npt.NDArray[np.float64],
    a_r: npt.NDArray[np.float64],
    cond_s: npt.NDArray[np.float64],
    cond_r: npt.NDArray[np.float64],
    b_sup: npt.NDArray[np.float64],
    b_ret: npt.NDArray[np.float64],
    indoor_c: float,
    outdoor_c: npt.NDArray[np.float64],
    temperature_rise_k: float,
    equipment_factor: float = 1.0,
) -> tuple[npt.NDArray[np.float64], npt.NDArray[np.float64]]:
    """Delivery effectiveness and distribution efficiency of many variants at once [1].

    The equations of :func:`distribution` element by element (a_s, a_r = 1 − leakage
    fractions, B_s, B_r from :func:`conduction_fraction`, the b of where each duct runs),
    written in the same order so the figures are the same floating-point numbers.

    Returns
    -------
    (ndarray, ndarray)
        DE [-] and η_dist = F_equip · (DE + F_regain · (1 − DE)) clipped to [0, 1].
    """
    t_sup = indoor_c - b_sup * (indoor_c - outdoor_c)
    t_ret = indoor_c - b_ret * (indoor_c - outdoor_c)
    dt_e = temperature_rise_k
    dt_s, dt_r = indoor_c - t_sup, indoor_c - t_ret
    de = (
        a_s * cond_s
        - a_s * cond_s * (1 - cond_r * a_r) * dt_r / dt_e
        - a_s * (1 - cond_s) * dt_s / dt_e
    )
    supply_loss = (1 - a_s) + a_s * (1 - cond_s) * (1 + dt_s / dt_e)
    return_loss = a_s * cond_s * (1 - a_r * cond_r) * dt_r / dt_e
    loss = supply_loss + return_loss
    safe = np.where(loss > 0, loss, 1.0)
    regain = np.where(loss > 0, (supply_loss * (1 - b_sup) + return_loss * (1 - b_ret)) / safe, 1.0)
    efficiency = equipment_factor * (de + regain * (1 - de))
    return de, np.minimum(np.maximum(efficiency, 0.0), 1.0)
