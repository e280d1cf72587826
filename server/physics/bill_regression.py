"""The bills regression's search: degree-days at any base from sorted temperatures, the weighted
line at a base, the best base (grid, then golden section), the best heating-and-cooling pair,
and the ASHRAE Guideline 14 statistics (the model and references: :mod:`server.physics.bills`).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from server.physics.bill_model import (
    BASE_TOLERANCE_K,
    COOLING_BASE_RANGE_C,
    GRID_STEP_K,
    HEATING_BASE_RANGE_C,
    PAIR_COARSE_STEP_K,
    PAIR_FINE_STEP_K,
    FloatArray,
    Period,
)

_GOLDEN = (math.sqrt(5.0) - 1.0) / 2.0


class BaseSeries:
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


def line_at(series: BaseSeries, base_c: float, heating: bool) -> _Line | None:
    """The fit at one base, or None when its slope is not positive."""
    dd = series.degree_days(np.array([base_c]), heating)[:, 0]
    alpha, slope, sse, sxx = weighted_line(dd / series.n, series.y, series.n)
    if slope <= 0.0:
        return None
    return _Line(base_c, alpha, slope, sse, sxx)


def best_line(series: BaseSeries, low: float, high: float, heating: bool) -> _Line | None:
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
    found = line_at(series, float(bases[best]), heating)
    # golden-section search between the grid neighbours of the best grid point
    a = float(bases[max(best - 1, 0)])
    b = float(bases[min(best + 1, len(bases) - 1)])

    def error(base: float) -> float:
        line = line_at(series, base, heating)
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
    refined = line_at(series, (a + b) / 2.0, heating)
    if found is None or (refined is not None and refined.sse < found.sse):
        found = refined
    return found


@dataclass(frozen=True, slots=True)
class _Pair:
    base_h: float
    base_c: float
    coef: FloatArray  # α, β, γ
    sse: float


def _pair_grid(series: BaseSeries, bases_h: FloatArray, bases_c: FloatArray) -> _Pair | None:
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


def _pair_design(series: BaseSeries, base_h: float, base_c: float) -> FloatArray:
    hdd = series.degree_days(np.array([base_h]), True)[:, 0]
    cdd = series.degree_days(np.array([base_c]), False)[:, 0]
    return np.column_stack([np.ones_like(hdd), hdd / series.n, cdd / series.n])


def _solve_pair(series: BaseSeries, base_h: float, base_c: float) -> FloatArray | None:
    x = _pair_design(series, base_h, base_c)
    xtwx = x.T @ (x * series.n[:, None])
    try:
        coef = np.linalg.solve(xtwx, x.T @ (series.n * series.y))
    except np.linalg.LinAlgError:
        return None
    return coef if coef[1] > 0 and coef[2] > 0 else None


def _pair_sse(series: BaseSeries, base_h: float, base_c: float, coef: FloatArray) -> float:
    residual = series.y - _pair_design(series, base_h, base_c) @ coef
    return float(series.n @ (residual * residual))


def best_pair(series: BaseSeries) -> _Pair | None:
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
