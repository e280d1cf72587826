"""What the bills say: variable-base degree-day regression of metered use (PRISM-style).

Pure functions on plain arrays, SI inside: temperatures and bases in °C, degree-days in K·day.
Use is in whatever unit the meter reads (therm, kWh, gallon...): the fit is linear in use, so
its unit passes straight through to the baseload [unit/day] and the slopes [unit/(K·day)].

The model [1]
-------------
A meter-read period ``i`` of ``n_i`` days with use ``U_i`` and heating degree-days at base τ

    HDD_i(τ) = Σ_{days d in i} max(0, τ − T_d)                 [K·day]

is fitted per day, by least squares weighted by the days of each period:

    U_i / n_i = α + β · HDD_i(τ) / n_i,      weights w_i = n_i

with α the baseload [unit/day] and β the heating slope [unit/(K·day)]. τ is the base (the
house's balance point) that minimises the weighted squared error
``S(τ) = Σ n_i (U_i/n_i − α − β HDD_i/n_i)²`` over a range of bases; since the total weighted
sum of squares does not depend on τ, this is also the τ of highest R² [1]. S(τ) is not always
unimodal, so the search is a grid first (every 0.1 K), then a golden-section search between the
grid neighbours of the best grid point, to 0.005 K. A fit with β ≤ 0 at every base has no
heating signal: the baseload alone is then fitted (α = ΣU / Σn). With the weights n_i the
period residuals ``U_i − n_i (α + β HDD_i/n_i)`` sum to exactly zero (the normal equation of
α), so the fit has no bias on the bills' total.

An electric meter may also carry cooling: ``U_i/n_i = α + β HDD_i(τ_h)/n_i + γ CDD_i(τ_c)/n_i``
with ``CDD_i(τ) = Σ max(0, T_d − τ)``, τ_c ≥ τ_h, both slopes positive (PRISM's heating-and-
cooling model [1]). :func:`fit_bills` keeps it only when it lowers CV(RMSE), which counts the
two extra parameters.

Statistics [2]
--------------
On the periods' use (the measured data points ``y_i = U_i``; ``ŷ_i = n_i (α + β HDD_i/n_i)``),
with ``P`` periods, ``ȳ`` the mean period use and ``p`` the number of model parameters:

    CV(RMSE) = 100 · sqrt( Σ (y_i − ŷ_i)² / (P − p) ) / ȳ          [%]
    NMBE     = 100 · Σ (y_i − ŷ_i) / ((P − p) · ȳ)                  [%]

τ is estimated from the same data, so it counts as a parameter, as in the three-parameter
change-point model [3]: ``p = 3`` for heating (α, β, τ), 5 for heating and cooling, 3 for
cooling alone, 1 for the baseload alone, 2 when τ is not searched (two periods). R² is the
weighted R² of the per-day regression, ``1 − S / Σ n_i (U_i/n_i − ū)²`` with ū = ΣU / Σn.
The slope's standard error is the least-squares one at the chosen τ (τ held fixed),
``sqrt(S / (P − k) / S_xx)`` with k = 2 (or the diagonal of ``S/(P−3) (XᵀWX)⁻¹`` with
cooling).

References
----------
[1] Fels, M. F. (1986), "PRISM: An Introduction", Energy and Buildings 9, 5–18: the per-day
    regression on degree-days per day, weighted by the days of each period, with the reference
    temperature chosen for the best fit; normalised annual consumption
    NAC = 365 α + β HDD_0(τ) from long-term normal temperatures.
[2] ASHRAE Guideline 14-2014, Measurement of Energy, Demand, and Water Savings: CV(RMSE) and
    NMBE with ``n − p`` in the denominator (the definitions of the calibrated-simulation
    clause, 5.3.2.4 in the 2002 edition and kept in 2014; clause numbers from memory, to be
    checked against the text); criteria for monthly data: a calibrated model has CV(RMSE)
    ≤ 15 % and |NMBE| ≤ 5 % (same clause, from memory); a whole-building regression baseline
    has CV(RMSE) ≤ 20 % for energy use and a net determination bias ≤ 0.005 % (the
    whole-building clause, 5.2.2.4 in the 2002 edition, from memory).
[3] Kissock, J. K., Haberl, J. S. and Claridge, D. E. (2003), "Inverse Modeling Toolkit:
    Numerical Algorithms" (ASHRAE RP-1050), ASHRAE Transactions 109(2): change-point models
    whose change point is a fitted parameter (from memory).

The parts: :mod:`server.physics.bill_model` (periods, fits, search ranges),
:mod:`server.physics.bill_regression` (the base search and Guideline 14 statistics) and
:mod:`server.physics.bill_figures` (normalised use, apparent UA, the criteria).
"""

from __future__ import annotations

import math
from collections.abc import Sequence

import numpy as np

from server.physics.bill_model import (
    COOLING_BASE_RANGE_C,
    HEATING_BASE_RANGE_C,
    REFERENCE_BASE_C,
    BillsFit,
    FloatArray,
    ModelKind,
    Period,
)
from server.physics.bill_regression import (
    BaseSeries,
    best_line,
    best_pair,
    guideline14_statistics,
    line_at,
    weighted_line,
)


def _finish(
    series: BaseSeries,
    model: ModelKind,
    coef: tuple[float, float, float],
    base_h: float | None,
    base_c: float | None,
    parameters: int,
    base_searched: bool,
) -> BillsFit:
    """Predictions, statistics and standard errors of a chosen model."""
    alpha, beta, gamma = coef
    zeros = np.zeros_like(series.n)
    hdd = zeros if base_h is None else series.degree_days(np.array([base_h]), True)[:, 0]
    cdd = zeros if base_c is None else series.degree_days(np.array([base_c]), False)[:, 0]
    predicted = series.n * alpha + beta * hdd + gamma * cdd
    residual_per_day = series.y - predicted / series.n
    sse = float(series.n @ (residual_per_day * residual_per_day))
    count = len(series.n)
    cv, nmbe = guideline14_statistics(series.use, predicted, parameters)
    r2 = None if count < 2 or series.syy <= 0 else 1.0 - sse / series.syy
    columns = [np.ones_like(series.n)]
    if base_h is not None:
        columns.append(hdd / series.n)
    if base_c is not None:
        columns.append(cdd / series.n)
    k = len(columns)
    errors: list[float | None] = [None] * k
    if count > k and k > 1:
        x = np.column_stack(columns)
        try:
            cov = np.linalg.inv(x.T @ (x * series.n[:, None])) * (sse / (count - k))
            errors = [math.sqrt(max(float(v), 0.0)) for v in np.diag(cov)]
        except np.linalg.LinAlgError:
            pass
    h_err = errors[1] if base_h is not None else None
    c_err = errors[-1] if base_c is not None else None
    (hl, hh), (cl, ch) = HEATING_BASE_RANGE_C, COOLING_BASE_RANGE_C
    at_limit = base_searched and base_h is not None and min(base_h - hl, hh - base_h) < 0.05
    c_at_limit = base_c is not None and min(base_c - cl, ch - base_c) < 0.05
    return BillsFit(
        model=model,
        base_c=base_h,
        base_searched=base_searched,
        base_at_limit=at_limit,
        baseload_per_day=alpha,
        heating_slope=beta,
        heating_slope_std_error=h_err,
        cooling_base_c=base_c,
        cooling_slope=gamma if base_c is not None else None,
        cooling_slope_std_error=c_err,
        cooling_base_at_limit=c_at_limit,
        parameters=parameters,
        r_squared=r2,
        cv_rmse=cv,
        nmbe=nmbe,
        days=tuple(float(v) for v in series.n),
        use=tuple(float(v) for v in series.use),
        hdd=tuple(float(v) for v in hdd),
        cdd=tuple(float(v) for v in cdd),
        predicted=tuple(float(v) for v in predicted),
    )


def fit_bills(
    daily_mean_c: Sequence[float] | FloatArray,
    periods: Sequence[Period],
    *,
    cooling: bool = False,
) -> BillsFit:
    """Fit baseload, heating slope and base to metered periods (variable-base regression) [1].

    ``U_i/n_i = α + β HDD_i(τ)/n_i`` weighted by n_i, τ searched over
    :data:`HEATING_BASE_RANGE_C` (grid every 0.1 K, then golden section to 0.005 K). With
    ``cooling`` the heating-and-cooling and cooling-only models are also fitted and the one of
    lowest CV(RMSE) is kept. Statistics as in the module docstring [2].

    Limiting cases: one period gives the baseload alone (α = U/n, no statistics); two periods
    fix τ at :data:`REFERENCE_BASE_C`; no positive slope at any base gives the baseload alone
    (``model="baseload"``).

    Parameters
    ----------
    daily_mean_c : sequence of float
        Daily mean outdoor temperatures [°C], finite over every period.
    periods : sequence of Period
        The meter-read periods, each inside the daily series.
    cooling : bool
        Also try a cooling term (for electricity).

    Raises
    ------
    ValueError
        No periods, a period of no days or negative use, a period outside the series, or a
        temperature that is not finite.
    """
    if not periods:
        raise ValueError("there are no periods to fit")
    for period in periods:
        if period.days < 1 or period.first_day < 0:
            raise ValueError("every period needs at least one day inside the temperatures")
        if not (math.isfinite(period.use) and period.use >= 0):
            raise ValueError("every period's use must be a finite number, zero or more")
    series = BaseSeries(np.asarray(daily_mean_c, dtype=float), periods)
    if not series.finite:
        raise ValueError("the daily temperatures must be finite over every period")
    count = len(periods)
    baseload = (series.ybar, 0.0, 0.0)
    if count == 1:
        return _finish(series, "baseload", baseload, None, None, 1, False)
    if count == 2:
        line = line_at(series, REFERENCE_BASE_C, True)
        if line is None:
            return _finish(series, "baseload", baseload, None, None, 1, False)
        coef = (line.alpha, line.slope, 0.0)
        return _finish(series, "heating", coef, REFERENCE_BASE_C, None, 2, False)
    candidates: list[BillsFit] = []
    line = best_line(series, *HEATING_BASE_RANGE_C, heating=True)
    if line is not None:
        coef = (line.alpha, line.slope, 0.0)
        candidates.append(_finish(series, "heating", coef, line.base_c, None, 3, True))
    if cooling:
        pair = best_pair(series)
        if pair is not None:
            a, b, g = (float(v) for v in pair.coef)
            candidates.append(
                _finish(series, "heating_and_cooling", (a, b, g), pair.base_h, pair.base_c, 5, True)
            )
        cool = best_line(series, *COOLING_BASE_RANGE_C, heating=False)
        if cool is not None:
            coef = (cool.alpha, 0.0, cool.slope)
            candidates.append(_finish(series, "cooling", coef, None, cool.base_c, 3, False))
    if not candidates:
        return _finish(series, "baseload", baseload, None, None, 1, False)
    # the heating model first: another is kept only when its CV(RMSE) is strictly lower
    best = candidates[0]
    for other in candidates[1:]:
        if other.cv_rmse is not None and (best.cv_rmse is None or other.cv_rmse < best.cv_rmse):
            best = other
    return best


def fit_degree_days(
    days: Sequence[float] | FloatArray,
    use: Sequence[float] | FloatArray,
    hdd_k_day: Sequence[float] | FloatArray,
    base_c: float,
) -> BillsFit:
    """Fit baseload and heating slope to degree-days given per period, at a fixed base [1].

    ``U_i/n_i = α + β HDD_i/n_i`` weighted by n_i, the closed-form weighted line of
    :func:`weighted_line`, with ``HDD_i`` the degree-days of each period at the stated base
    τ (typed from a bill or a weather service, so τ cannot be searched). The base is then no
    parameter of the fit: ``p = 2`` (α, β) in CV(RMSE) and NMBE [2], ``base_searched`` is
    False. The slope's standard error is ``sqrt(S / (P − 2) / S_xx)``.

    Limiting cases as :func:`fit_bills`: one period, or a slope β ≤ 0 (no heating signal),
    gives the baseload alone (α = ΣU / Σn, ``model="baseload"``, p = 1).

    Parameters
    ----------
    days : sequence of float
        n_i, days of each period [day], each at least 1.
    use : sequence of float
        U_i, metered use of each period [fuel unit], zero or more.
    hdd_k_day : sequence of float
        HDD_i(τ), heating degree-days of each period at the base [K·day], zero or more.
    base_c : float
        τ, the base the degree-days were counted at [°C].

    Raises
    ------
    ValueError
        No periods, sequences of different lengths, a period of less than one day, a use or
        degree-day figure that is negative or not finite, or a base that is not finite.
    """
    n = np.asarray(days, dtype=float)
    u = np.asarray(use, dtype=float)
    hdd = np.asarray(hdd_k_day, dtype=float)
    if n.size == 0:
        raise ValueError("there are no periods to fit")
    if not (n.shape == u.shape == hdd.shape and n.ndim == 1):
        raise ValueError("give days, use and degree-days for every period")
    if not math.isfinite(base_c):
        raise ValueError("the base temperature must be a finite number")
    if not (np.isfinite(n).all() and (n >= 1).all()):
        raise ValueError("every period needs at least one day")
    if not (np.isfinite(u).all() and (u >= 0).all()):
        raise ValueError("every period's use must be a finite number, zero or more")
    if not (np.isfinite(hdd).all() and (hdd >= 0).all()):
        raise ValueError("every period's degree-days must be a finite number, zero or more")
    y = u / n
    total = float(n.sum())
    ybar = float(u.sum()) / total
    syy = float(n @ (y - ybar) ** 2)
    alpha, beta, sse, sxx = (ybar, 0.0, syy, 0.0)
    if n.size > 1:
        alpha, beta, sse, sxx = weighted_line(hdd / n, y, n)
    heating = n.size > 1 and beta > 0.0
    if not heating:
        alpha, beta, sse = ybar, 0.0, syy
    parameters = 2 if heating else 1
    predicted = n * alpha + beta * hdd
    cv, nmbe = guideline14_statistics(u, predicted, parameters)
    count = int(n.size)
    std_error = None
    if heating and count > 2 and sxx > 0.0:
        std_error = math.sqrt(max(sse, 0.0) / (count - 2) / sxx)
    return BillsFit(
        model="heating" if heating else "baseload",
        base_c=float(base_c) if heating else None,
        base_searched=False,
        base_at_limit=False,
        baseload_per_day=alpha,
        heating_slope=beta,
        heating_slope_std_error=std_error,
        cooling_base_c=None,
        cooling_slope=None,
        cooling_slope_std_error=None,
        cooling_base_at_limit=False,
        parameters=parameters,
        r_squared=None if count < 2 or syy <= 0 else 1.0 - sse / syy,
        cv_rmse=cv,
        nmbe=nmbe,
        days=tuple(float(v) for v in n),
        use=tuple(float(v) for v in u),
        hdd=tuple(float(v) for v in hdd) if heating else tuple(0.0 for _ in n),
        cdd=tuple(0.0 for _ in n),
        predicted=tuple(float(v) for v in predicted),
    )
