"""Internal and solar gains, and the balance point they set (variable-base degree-days).

SI inside: areas [m²], gains [W], temperatures [°C], UA [W/K].

The balance point of a house variant is the outdoor temperature at which its losses equal
its free gains ([1]):

    t_bal = t_set − (Q_int + Q_sol(t_bal)) / UA,

where Q_sol(t) = Σ_w SHGC_w · A_w · Ē_w(t) is the windows' solar gain averaged over the
heating days at base t (the days whose daily mean outdoor temperature is below t, the days
that count in HDD(t)), Ē_w(t) the mean irradiance on window w's plane over those days, read
from a table by base (linear between table bases). Q_sol rises with t (milder days are
sunnier), so the right side falls as t rises and the equation has one root. Between two table
bases Q_sol is linear in t (the table is read linearly, and a sum of linear interpolations on
the same bases is the linear interpolation of the summed table S_i = Σ_w SHGC_w·A_w·Ē_w,i),
so the excess e(t) = t − t_set + (Q_int + Q_sol(t)) / UA is piecewise linear: it is computed
at the table's bases, the first segment where it turns positive is found, and the root is
solved on that segment in closed form,

    t = b_i − e_i · (b_{i+1} − b_i) / (e_{i+1} − e_i).

Without windows' solar terms this is the closed form t_set − Q_int / UA of
:func:`server.physics.degree_days.balance_point_temperature_c`.

References
----------
[1] ASHRAE Handbook—Fundamentals (2017), ch. 19 "Energy Estimating and Modeling Methods",
    variable-base degree-day method (balance-point temperature).
[2] ANSI/RESNET/ICC 301-2019, Standard for the Calculation and Labeling of the Energy
    Performance of Dwelling and Sleeping Units using an Energy Rating Index, Table 4.2.2(1),
    reference home internal gains: 17,900 + 23.8 · CFA + 4,104 · N_br Btu/day (from memory).
"""

from __future__ import annotations

from bisect import bisect_left
from collections.abc import Sequence

import numpy as np
import numpy.typing as npt

from server.physics import degree_days as dd
from server.physics.units import BTU_PER_HOUR_W, SQFT_M2

__all__ = [
    "RESNET_BTU_PER_DAY",
    "balance_point_c",
    "balance_points_c",
    "solar_table",
    "resnet_internal_gains_w",
    "solar_gain_w",
]

#: Reference-home internal gains [2]: constant [Btu/day], per ft² of conditioned floor area
#: [Btu/(day·ft²)], per bedroom [Btu/day] (from memory).
RESNET_BTU_PER_DAY = (17_900.0, 23.8, 4_104.0)

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
    """Linear interpolation in a table by base, held at its ends (the segment and formula of
    :func:`server.physics.degree_days.interpolate_degree_days`, without its table checks)."""
    if t <= bases_c[0]:
        return float(values[0])
    if t >= bases_c[-1]:
        return float(values[-1])
    index = max(bisect_left(bases_c, t) - 1, 0)
    low, high = bases_c[index], bases_c[index + 1]
    share = (t - low) / (high - low)
    lower, upper = values[index], values[index + 1]
    return float(lower + share * (upper - lower))


def solar_table(bases_c: Sequence[float], terms: Sequence[SolarTerm]) -> tuple[float, ...]:
    """S_i = Σ_w SHGC_w·A_w·Ē_w(b_i) [W] at each table base (see the module)."""
    table = [0.0] * len(bases_c)
    for coefficient, plane in terms:
        if len(plane) != len(bases_c):
            raise ValueError("a window's irradiance table needs one value per base")
        for i, value in enumerate(plane):
            table[i] += coefficient * value
    return tuple(table)


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
    table = solar_table(bases_c, terms)
    # e_i = b_i − t_set + (Q_int + S_i) / UA: piecewise linear and rising (see the module)
    excess = [
        b - setpoint_c + (internal_gains_w + s) / ua_w_per_k
        for b, s in zip(bases_c, table, strict=True)
    ]
    if excess[0] >= 0:
        return float(low)
    if excess[-1] <= 0:
        return float(high)
    i = next(k for k in range(len(excess) - 1) if excess[k + 1] > 0)
    b0, b1 = bases_c[i], bases_c[i + 1]
    if excess[i] >= 0:  # a falling stretch ended at a root on base i (never for real data)
        return float(b0)
    return float(b0 - excess[i] * (b1 - b0) / (excess[i + 1] - excess[i]))


def balance_points_c(
    setpoint_c: float,
    internal_gains_w: float,
    ua_w_per_k: npt.NDArray[np.float64],
    bases_c: Sequence[float],
    table_w: npt.NDArray[np.float64] | None = None,
) -> npt.NDArray[np.float64]:
    """:func:`balance_point_c` of many variants at once [°C].

    Parameters
    ----------
    setpoint_c, internal_gains_w : float
        As for :func:`balance_point_c`.
    ua_w_per_k : ndarray, shape (n,)
        Each variant's UA [W/K], > 0.
    bases_c : sequence of float
        The table's bases [°C], ascending, K of them.
    table_w : ndarray, shape (n, K), optional
        Each variant's summed solar table S_i [W] (:func:`solar_table`); None: no solar gain.

    Returns
    -------
    ndarray
        The balance points, by the same segment and formula as :func:`balance_point_c`.
    """
    ua = np.asarray(ua_w_per_k, dtype=float)
    bases = np.asarray(bases_c, dtype=float)
    if table_w is None:
        return np.clip(setpoint_c - internal_gains_w / ua, bases[0], bases[-1])
    excess = bases[None, :] - setpoint_c + (internal_gains_w + table_w) / ua[:, None]
    n, k = excess.shape
    positive = excess[:, 1:] > 0
    # the first segment whose upper end is positive (k − 1 when none is)
    i = np.where(positive.any(axis=1), positive.argmax(axis=1), k - 2)
    rows = np.arange(n)
    e0, e1 = excess[rows, i], excess[rows, i + 1]
    b0, b1 = bases[i], bases[i + 1]
    denominator = np.where(e1 != e0, e1 - e0, 1.0)
    root = np.where(e0 >= 0, b0, b0 - e0 * (b1 - b0) / denominator)
    root = np.where(excess[:, -1] <= 0, bases[-1], root)
    return np.where(excess[:, 0] >= 0, bases[0], root)
