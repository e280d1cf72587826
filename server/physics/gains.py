"""Internal and solar gains, and the balance point they set (variable-base degree-days).

SI inside: areas [m²], gains [W], temperatures [°C], UA [W/K].

The balance point of a house variant is the outdoor temperature at which its losses equal
its free gains ([1]):

    t_bal = t_set − (Q_int + Q_sol(t_bal)) / UA,

where Q_sol(t) = Σ_w SHGC_w · A_w · Ē_w(t) is the windows' solar gain averaged over the
heating days at base t (the days whose daily mean outdoor temperature is below t, the days
that count in HDD(t)), Ē_w(t) the mean irradiance on window w's plane over those days, read
from a table by base (linear between table bases). Q_sol rises with t (milder days are
sunnier), so the right side falls as t rises and the equation has one root; it is found by
bisection on the table's range. Without windows' solar terms this is the closed form
t_set − Q_int / UA of :func:`server.physics.degree_days.balance_point_temperature_c`.

References
----------
[1] ASHRAE Handbook—Fundamentals (2017), ch. 19 "Energy Estimating and Modeling Methods",
    variable-base degree-day method (balance-point temperature).
[2] ANSI/RESNET/ICC 301-2019, Standard for the Calculation and Labeling of the Energy
    Performance of Dwelling and Sleeping Units using an Energy Rating Index, Table 4.2.2(1),
    reference home internal gains: 17,900 + 23.8 · CFA + 4,104 · N_br Btu/day (from memory).
"""

from __future__ import annotations

from collections.abc import Sequence

from server.physics import degree_days as dd
from server.physics.units import BTU_PER_HOUR_W, SQFT_M2

__all__ = [
    "RESNET_BTU_PER_DAY",
    "balance_point_c",
    "resnet_internal_gains_w",
    "solar_gain_w",
]

#: Reference-home internal gains [2]: constant [Btu/day], per ft² of conditioned floor area
#: [Btu/(day·ft²)], per bedroom [Btu/day] (from memory).
RESNET_BTU_PER_DAY = (17_900.0, 23.8, 4_104.0)
#: Bisection steps: the table spans at most 200 K, 60 halvings leave < 1e-15 K.
_STEPS = 60

#: One window's solar term: (SHGC · area [m²], mean plane irradiance at each base [W/m²]).
SolarTerm = tuple[float, Sequence[float]]


def resnet_internal_gains_w(floor_area_m2: float, bedrooms: float) -> float:
    """Average internal gains of the reference home [W] ([2], from memory).

    Parameters
    ----------
    floor_area_m2 : float
        Conditioned floor area CFA [m²].
    bedrooms : float
        Number of bedrooms N_br [-].

    Returns
    -------
    float
        Q_int = (17,900 + 23.8 CFA[ft²] + 4,104 N_br) [Btu/day] / 24 [h/day] · 0.29307 [W per
        Btu/h].
    """
    if not floor_area_m2 >= 0 or not bedrooms >= 0:
        raise ValueError("the floor area and the number of bedrooms must be 0 or more")
    constant, per_ft2, per_bedroom = RESNET_BTU_PER_DAY
    btu_per_day = constant + per_ft2 * floor_area_m2 / SQFT_M2 + per_bedroom * bedrooms
    return btu_per_day / 24.0 * BTU_PER_HOUR_W


def _at(bases_c: Sequence[float], values: Sequence[float], t: float) -> float:
    """Linear interpolation in a table by base, held at its ends."""
    if t <= bases_c[0]:
        return float(values[0])
    if t >= bases_c[-1]:
        return float(values[-1])
    return dd.interpolate_degree_days(bases_c, values, t)


def solar_gain_w(bases_c: Sequence[float], terms: Sequence[SolarTerm], t: float) -> float:
    """Q_sol(t) = Σ SHGC · A · Ē(t) [W] over the windows' solar terms (see the module)."""
    return sum(coefficient * _at(bases_c, plane, t) for coefficient, plane in terms)


def balance_point_c(
    setpoint_c: float,
    internal_gains_w: float,
    ua_w_per_k: float,
    bases_c: Sequence[float],
    terms: Sequence[SolarTerm] = (),
) -> float:
    """Balance point [°C] of a house variant, held within the table's bases ([1]).

    Parameters
    ----------
    setpoint_c : float
        Thermostat set-point t_set [°C].
    internal_gains_w : float
        Average internal gains Q_int [W] (or the typed total of internal and solar gains).
    ua_w_per_k : float
        The variant's whole-house UA [W/K], > 0.
    bases_c : sequence of float
        The degree-day table's bases, ascending [°C].
    terms : sequence of (float, sequence of float)
        Each window's SHGC·A [m²] and mean plane irradiance at each base [W/m²].

    Returns
    -------
    float
        The root of t = t_set − (Q_int + Q_sol(t)) / UA within [b_0, b_n] (an end of the table
        when the root lies beyond it).
    """
    low, high = bases_c[0], bases_c[-1]
    closed = dd.balance_point_temperature_c(setpoint_c, internal_gains_w, ua_w_per_k)
    if not terms:
        return min(max(closed, low), high)

    def excess(t: float) -> float:  # rises with t: t − (t_set − gains(t)/UA)
        return t - setpoint_c + (internal_gains_w + solar_gain_w(bases_c, terms, t)) / ua_w_per_k

    if excess(low) >= 0:
        return low
    if excess(high) <= 0:
        return high
    for _ in range(_STEPS):
        middle = 0.5 * (low + high)
        if excess(middle) > 0:
            high = middle
        else:
            low = middle
    return 0.5 * (low + high)
