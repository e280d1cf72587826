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
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Literal

import numpy as np
from numpy.typing import NDArray

from server.physics.units import f_to_c

FloatArray = NDArray[np.float64]
ModelKind = Literal["heating", "heating_and_cooling", "cooling", "baseload"]

#: Heating base search range [°C]: 40–75 °F, as PRISM-style fits search it [1].
HEATING_BASE_RANGE_C = (f_to_c(40.0), f_to_c(75.0))
#: Cooling base search range [°C]: 50–85 °F (common practice).
COOLING_BASE_RANGE_C = (f_to_c(50.0), f_to_c(85.0))
#: The base used when it cannot be searched (two periods) [°C]: 65 °F (common practice).
REFERENCE_BASE_C = f_to_c(65.0)
#: Grid step of the first pass [K] and tolerance of the golden-section pass [K].
GRID_STEP_K = 0.1
BASE_TOLERANCE_K = 0.005
#: Grid steps of the heating-and-cooling search [K]: coarse, then fine around the best pair.
PAIR_COARSE_STEP_K = 0.25
PAIR_FINE_STEP_K = 0.01

_GOLDEN = (math.sqrt(5.0) - 1.0) / 2.0


@dataclass(frozen=True, slots=True)
class Period:
    """One meter-read period.

    Attributes
    ----------
    first_day : int
        Index of its first day in the daily temperature series [-].
    days : int
        Number of days n_i, the read dates' difference (end exclusive) [day].
    use : float
        Metered use U_i [fuel unit].
    """

    first_day: int
    days: int
    use: float


@dataclass(frozen=True, slots=True)
class Criterion:
    """One published criterion applied to the fit, and whether the fit meets it.

    ``value`` and ``met`` are ``None`` when the statistic cannot be computed (too few
    periods for the parameters).
    """

    name: str
    source: str
    statistic: Literal["cv_rmse", "nmbe"]
    limit_percent: float
    value: float | None
    met: bool | None


@dataclass(frozen=True, slots=True)
class BillsFit:
    """The fitted model and its statistics (SI: °C, K·day; use in the meter's unit).

    Attributes
    ----------
    model : str
        ``heating``, ``heating_and_cooling``, ``cooling`` or ``baseload``.
    base_c : float or None
        Heating base τ [°C]; ``None`` without a heating term.
    base_searched : bool
        False when τ was fixed at :data:`REFERENCE_BASE_C` (two periods) or there is no term.
    base_at_limit : bool
        The best base lies at an end of the search range.
    baseload_per_day : float
        α [unit/day].
    heating_slope : float
        β [unit/(K·day)]; 0 without a heating term.
    heating_slope_std_error : float or None
        Standard error of β at the chosen base [unit/(K·day)].
    cooling_base_c, cooling_slope, cooling_slope_std_error : float or None
        τ_c [°C], γ [unit/(K·day)] and its standard error, with a cooling term.
    parameters : int
        p, the parameters counted in CV(RMSE) and NMBE (τ included when searched).
    r_squared, cv_rmse, nmbe : float or None
        Weighted R² [-]; CV(RMSE) and NMBE [%] as Guideline 14 defines them [2].
    days, use, hdd, cdd, predicted : tuple of float
        Per period: n_i [day], U_i, HDD_i(τ) and CDD_i(τ_c) [K·day] (zeros without the term),
        and the fitted use n_i (α + β HDD_i/n_i + γ CDD_i/n_i).
    """

    model: ModelKind
    base_c: float | None
    base_searched: bool
    base_at_limit: bool
    baseload_per_day: float
    heating_slope: float
    heating_slope_std_error: float | None
    cooling_base_c: float | None
    cooling_slope: float | None
    cooling_slope_std_error: float | None
    cooling_base_at_limit: bool
    parameters: int
    r_squared: float | None
    cv_rmse: float | None
    nmbe: float | None
    days: tuple[float, ...]
    use: tuple[float, ...]
    hdd: tuple[float, ...]
    cdd: tuple[float, ...]
    predicted: tuple[float, ...]

    @property
    def periods(self) -> int:
        """Number of periods used, P."""
        return len(self.days)


@dataclass(frozen=True, slots=True)
class Normalized:
    """Use in a typical year from the fit [1].

    ``annual_use = N α + β HDD_0(τ) + γ CDD_0(τ_c)`` with N the normal year's days (365);
    ``heating_use = β HDD_0(τ)``; degree-days in [K·day].
    """

    days: int
    hdd_k_day: float
    cdd_k_day: float
    annual_use: float
    heating_use: float
    cooling_use: float


class _Series:
    """Each period's daily temperatures sorted, with running sums, for degree-days at any base.

    With the k temperatures of a period below τ summing to C_k, HDD(τ) = k τ − C_k and
    CDD(τ) = (C_n − C_k) − (n − k) τ. The periods' sorted temperatures are laid end to end,
    each shifted by its period's number times a span wider than the data, so one sorted
    search finds k for every period and base at once: memory of order days + periods × bases.
    """

    def __init__(self, daily_c: FloatArray, periods: Sequence[Period]) -> None:
        slices = [daily_c[p.first_day : p.first_day + p.days] for p in periods]
        if any(len(s) != p.days for s, p in zip(slices, periods, strict=True)):
            raise ValueError("the daily temperatures do not cover every period")
        temps = np.concatenate([np.sort(s) for s in slices])
        self.finite = bool(np.isfinite(temps).all())
        self.n = np.array([float(p.days) for p in periods])
        counts = np.array([p.days for p in periods])
        self.starts = np.concatenate(([0], np.cumsum(counts)[:-1]))
        self.ends = self.starts + counts
        reach = float(np.max(np.abs(temps))) if self.finite else 0.0
        self.span = 2.0 * (reach + 100.0)  # bases lie within ±100 °C of zero
        self.keys = np.repeat(np.arange(len(periods)) * self.span, counts) + temps
        self.sums = np.concatenate(([0.0], np.cumsum(temps)))
        self.use = np.array([float(p.use) for p in periods])
        self.y = self.use / self.n
        self.total_days = float(self.n.sum())
        self.ybar = float(self.use.sum() / self.total_days)
        self.syy = float(self.n @ (self.y - self.ybar) ** 2)

    def degree_days(self, bases_c: FloatArray, heating: bool) -> FloatArray:
        """Per-period degree-days at each base [K·day], shape (periods, bases)."""
        shift = np.arange(len(self.n))[:, None] * self.span
        at = np.searchsorted(self.keys, shift + bases_c[None, :], side="left")
        below = at - self.starts[:, None]
        if heating:
            out = below * bases_c[None, :] - (self.sums[at] - self.sums[self.starts][:, None])
        else:
            above = self.n[:, None] - below
            out = (self.sums[self.ends][:, None] - self.sums[at]) - above * bases_c[None, :]
        return np.maximum(out, 0.0)


@dataclass(frozen=True, slots=True)
class _Line:
    """A straight-line weighted fit at one base."""

    base_c: float
    alpha: float
    slope: float
    sse: float
    sxx: float


def weighted_line(x: FloatArray, y: FloatArray, w: FloatArray) -> tuple[float, float, float, float]:
    """Weighted least-squares line ``y = α + β x`` (closed form).

    ``x̄ = Σwx/Σw``, ``S_xx = Σ w (x − x̄)²``, ``S_xy = Σ w (x − x̄)(y − ȳ)``,
    ``β = S_xy / S_xx``, ``α = ȳ − β x̄``, ``S = Σ w (y − α − β x)²``.

    Returns
    -------
    tuple of float
        α, β, the weighted squared error S and S_xx (``β = 0`` and ``S = S_yy`` when
        ``S_xx`` is zero).
    """
    total = float(w.sum())
    xbar = float(w @ x) / total
    ybar = float(w @ y) / total
    dx, dy = x - xbar, y - ybar
    sxx = float(w @ (dx * dx))
    sxy = float(w @ (dx * dy))
    syy = float(w @ (dy * dy))
    if sxx <= _tiny(x, w):
        return ybar, 0.0, syy, 0.0
    beta = sxy / sxx
    return ybar - beta * xbar, beta, max(syy - sxy * beta, 0.0), sxx


def _tiny(x: FloatArray, w: FloatArray) -> float:
    scale = float(np.max(np.abs(x))) if x.size else 0.0
    return 1e-12 * float(w.sum()) * max(scale * scale, 1e-300)


def _grid(low: float, high: float, step: float) -> FloatArray:
    count = max(int(math.ceil((high - low) / step - 1e-9)), 1) + 1
    return np.linspace(low, high, count)


def _line_at(series: _Series, base_c: float, heating: bool) -> _Line | None:
    """The fit at one base, or None when its slope is not positive."""
    dd = series.degree_days(np.array([base_c]), heating)[:, 0]
    alpha, slope, sse, sxx = weighted_line(dd / series.n, series.y, series.n)
    if slope <= 0.0:
        return None
    return _Line(base_c, alpha, slope, sse, sxx)


def _best_line(series: _Series, low: float, high: float, heating: bool) -> _Line | None:
    """The base of least weighted squared error in [low, high], slope > 0; None if none."""
    bases = _grid(low, high, GRID_STEP_K)
    x = series.degree_days(bases, heating) / series.n[:, None]
    w = series.n
    xbar = (w @ x) / series.total_days
    dx = x - xbar
    sxx = w @ (dx * dx)
    sxy = w @ (dx * (series.y - series.ybar)[:, None])
    scale = np.max(np.abs(x), axis=0)
    valid = (sxx > 1e-12 * series.total_days * np.maximum(scale * scale, 1e-300)) & (sxy > 0.0)
    if not valid.any():
        return None
    sse = np.where(valid, series.syy - sxy**2 / np.where(valid, sxx, 1.0), np.inf)
    best = int(np.argmin(sse))  # ties: the lowest base
    found = _line_at(series, float(bases[best]), heating)
    # golden-section search between the grid neighbours of the best grid point
    a = float(bases[max(best - 1, 0)])
    b = float(bases[min(best + 1, len(bases) - 1)])

    def error(base: float) -> float:
        line = _line_at(series, base, heating)
        return math.inf if line is None else line.sse

    c, d = b - _GOLDEN * (b - a), a + _GOLDEN * (b - a)
    fc, fd = error(c), error(d)
    while b - a > BASE_TOLERANCE_K:
        if fc <= fd:
            b, d, fd = d, c, fc
            c = b - _GOLDEN * (b - a)
            fc = error(c)
        else:
            a, c, fc = c, d, fd
            d = a + _GOLDEN * (b - a)
            fd = error(d)
    refined = _line_at(series, (a + b) / 2.0, heating)
    if found is None or (refined is not None and refined.sse < found.sse):
        found = refined
    return found


@dataclass(frozen=True, slots=True)
class _Pair:
    base_h: float
    base_c: float
    coef: FloatArray  # α, β, γ
    sse: float


def _pair_grid(series: _Series, bases_h: FloatArray, bases_c: FloatArray) -> _Pair | None:
    """Best (τ_h, τ_c) on a grid: 2-regressor weighted least squares for every pair."""
    w = series.n
    xh = series.degree_days(bases_h, True) / w[:, None]
    xc = series.degree_days(bases_c, False) / w[:, None]
    dh = xh - (w @ xh) / series.total_days
    dc = xc - (w @ xc) / series.total_days
    dy = series.y - series.ybar
    shh, scc = w @ (dh * dh), w @ (dc * dc)
    shc = (dh * w[:, None]).T @ dc
    shy, scy = w @ (dh * dy[:, None]), w @ (dc * dy[:, None])
    det = shh[:, None] * scc[None, :] - shc * shc
    scale = np.maximum(shh[:, None] * scc[None, :], 1e-300)
    ok = det > 1e-10 * scale
    safe = np.where(ok, det, 1.0)
    beta = (scc[None, :] * shy[:, None] - shc * scy[None, :]) / safe
    gamma = (shh[:, None] * scy[None, :] - shc * shy[:, None]) / safe
    valid = ok & (beta > 0) & (gamma > 0) & (bases_c[None, :] >= bases_h[:, None])
    if not valid.any():
        return None
    sse = np.where(valid, series.syy - beta * shy[:, None] - gamma * scy[None, :], np.inf)
    i, j = np.unravel_index(int(np.argmin(sse)), sse.shape)
    base_h, base_c = float(bases_h[i]), float(bases_c[j])
    coef = _solve_pair(series, base_h, base_c)
    if coef is None:
        return None
    return _Pair(base_h, base_c, coef, _pair_sse(series, base_h, base_c, coef))


def _pair_design(series: _Series, base_h: float, base_c: float) -> FloatArray:
    hdd = series.degree_days(np.array([base_h]), True)[:, 0]
    cdd = series.degree_days(np.array([base_c]), False)[:, 0]
    return np.column_stack([np.ones_like(hdd), hdd / series.n, cdd / series.n])


def _solve_pair(series: _Series, base_h: float, base_c: float) -> FloatArray | None:
    x = _pair_design(series, base_h, base_c)
    xtwx = x.T @ (x * series.n[:, None])
    try:
        coef = np.linalg.solve(xtwx, x.T @ (series.n * series.y))
    except np.linalg.LinAlgError:
        return None
    return coef if coef[1] > 0 and coef[2] > 0 else None


def _pair_sse(series: _Series, base_h: float, base_c: float, coef: FloatArray) -> float:
    residual = series.y - _pair_design(series, base_h, base_c) @ coef
    return float(series.n @ (residual * residual))


def _best_pair(series: _Series) -> _Pair | None:
    """Heating-and-cooling bases: a coarse grid, then a fine grid around the best pair."""
    (hl, hh), (cl, ch) = HEATING_BASE_RANGE_C, COOLING_BASE_RANGE_C
    coarse = _pair_grid(
        series, _grid(hl, hh, PAIR_COARSE_STEP_K), _grid(cl, ch, PAIR_COARSE_STEP_K)
    )
    if coarse is None:
        return None
    span = PAIR_COARSE_STEP_K
    fine_h = _grid(max(hl, coarse.base_h - span), min(hh, coarse.base_h + span), PAIR_FINE_STEP_K)
    fine_c = _grid(max(cl, coarse.base_c - span), min(ch, coarse.base_c + span), PAIR_FINE_STEP_K)
    fine = _pair_grid(series, fine_h, fine_c)
    return fine if fine is not None and fine.sse < coarse.sse else coarse


def guideline14_statistics(
    measured: Sequence[float] | FloatArray,
    predicted: Sequence[float] | FloatArray,
    parameters: int,
) -> tuple[float | None, float | None]:
    """CV(RMSE) and NMBE [%] of a model against measured data, Guideline 14 [2].

    ``CV(RMSE) = 100 sqrt(Σ (y_i − ŷ_i)² / (n − p)) / ȳ``;
    ``NMBE = 100 Σ (y_i − ŷ_i) / ((n − p) ȳ)``.

    Parameters
    ----------
    measured, predicted : sequence of float
        y_i and ŷ_i [any one unit].
    parameters : int
        p, the number of model parameters [-].

    Returns
    -------
    tuple of (float or None)
        Both ``None`` when ``n ≤ p`` or the mean measured value is not positive.
    """
    y = np.asarray(measured, dtype=float)
    yhat = np.asarray(predicted, dtype=float)
    dof = len(y) - parameters
    mean = float(y.mean()) if len(y) else 0.0
    if dof <= 0 or mean <= 0:
        return None, None
    residual = y - yhat
    cv = 100.0 * math.sqrt(float(residual @ residual) / dof) / mean
    nmbe = 100.0 * float(residual.sum()) / (dof * mean)
    return cv, nmbe


def _finish(
    series: _Series,
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
    series = _Series(np.asarray(daily_mean_c, dtype=float), periods)
    if not series.finite:
        raise ValueError("the daily temperatures must be finite over every period")
    count = len(periods)
    baseload = (series.ybar, 0.0, 0.0)
    if count == 1:
        return _finish(series, "baseload", baseload, None, None, 1, False)
    if count == 2:
        line = _line_at(series, REFERENCE_BASE_C, True)
        if line is None:
            return _finish(series, "baseload", baseload, None, None, 1, False)
        coef = (line.alpha, line.slope, 0.0)
        return _finish(series, "heating", coef, REFERENCE_BASE_C, None, 2, False)
    candidates: list[BillsFit] = []
    line = _best_line(series, *HEATING_BASE_RANGE_C, heating=True)
    if line is not None:
        coef = (line.alpha, line.slope, 0.0)
        candidates.append(_finish(series, "heating", coef, line.base_c, None, 3, True))
    if cooling:
        pair = _best_pair(series)
        if pair is not None:
            a, b, g = (float(v) for v in pair.coef)
            candidates.append(
                _finish(series, "heating_and_cooling", (a, b, g), pair.base_h, pair.base_c, 5, True)
            )
        cool = _best_line(series, *COOLING_BASE_RANGE_C, heating=False)
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


def normalize(fit: BillsFit, normal_daily_c: Sequence[float] | FloatArray) -> Normalized:
    """Use of a typical year from the fit [1].

    ``annual = N α + β Σ max(0, τ − T_d) + γ Σ max(0, T_d − τ_c)`` over the N days of the
    normal year; ``heating = β Σ max(0, τ − T_d)``.

    Parameters
    ----------
    fit : BillsFit
        The fitted model.
    normal_daily_c : sequence of float
        Daily mean temperatures of the typical year [°C] (365 values).
    """
    temps = np.asarray(normal_daily_c, dtype=float)
    if temps.size == 0 or not np.isfinite(temps).all():
        raise ValueError("the normal temperatures must be finite numbers")
    hdd = 0.0 if fit.base_c is None else float(np.maximum(fit.base_c - temps, 0.0).sum())
    cdd = (
        0.0
        if fit.cooling_base_c is None
        else float(np.maximum(temps - fit.cooling_base_c, 0.0).sum())
    )
    heating = fit.heating_slope * hdd
    cooling = (fit.cooling_slope or 0.0) * cdd
    return Normalized(
        days=int(temps.size),
        hdd_k_day=hdd,
        cdd_k_day=cdd,
        annual_use=temps.size * fit.baseload_per_day + heating + cooling,
        heating_use=heating,
        cooling_use=cooling,
    )


def apparent_ua_w_per_k(
    heating_slope_per_k_day: float, energy_per_unit_j: float, efficiency: float
) -> float:
    """The house's apparent UA from the heating slope [W/K].

    ``UA = β · E · η / 86 400 s``: β fuel units per K·day, E joules per unit, η the seasonal
    efficiency (or COP); per hour instead of per second this is β E η / 24 [1].
    """
    for value, name in (
        (heating_slope_per_k_day, "the heating slope"),
        (energy_per_unit_j, "the energy per unit"),
        (efficiency, "the efficiency"),
    ):
        if not math.isfinite(value):
            raise ValueError(f"{name} must be a finite number")
    return heating_slope_per_k_day * energy_per_unit_j * efficiency / 86_400.0


#: Guideline 14 criteria applied to a bill fit [2] (name, source, statistic, limit [%]).
GUIDELINE_14_CRITERIA: tuple[tuple[str, str, Literal["cv_rmse", "nmbe"], float], ...] = (
    (
        "calibrated model, monthly data: CV(RMSE) at most 15 %",
        "ASHRAE Guideline 14-2014, calibrated simulation, monthly calibration data (clause "
        "5.3.2.4 of the 2002 edition, from memory)",
        "cv_rmse",
        15.0,
    ),
    (
        "calibrated model, monthly data: NMBE within ±5 %",
        "ASHRAE Guideline 14-2014, calibrated simulation, monthly calibration data (clause "
        "5.3.2.4 of the 2002 edition, from memory)",
        "nmbe",
        5.0,
    ),
    (
        "regression baseline: CV(RMSE) at most 20 % for energy use",
        "ASHRAE Guideline 14-2014, whole-building approach, baseline model (clause 5.2.2.4 "
        "of the 2002 edition, from memory)",
        "cv_rmse",
        20.0,
    ),
    (
        "regression baseline: net bias within ±0.005 %",
        "ASHRAE Guideline 14-2014, whole-building approach, baseline model (clause 5.2.2.4 "
        "of the 2002 edition, from memory)",
        "nmbe",
        0.005,
    ),
)


def criteria(fit: BillsFit) -> tuple[Criterion, ...]:
    """Each of :data:`GUIDELINE_14_CRITERIA` applied to the fit's CV(RMSE) and NMBE [2]."""
    out = []
    for name, source, statistic, limit in GUIDELINE_14_CRITERIA:
        value = fit.cv_rmse if statistic == "cv_rmse" else fit.nmbe
        met = None if value is None else abs(value) <= limit
        out.append(Criterion(name, source, statistic, limit, value, met))
    return tuple(out)
