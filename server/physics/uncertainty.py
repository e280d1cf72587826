"""Savings ranges: a seeded Monte Carlo over the inputs nobody can see exactly.

The uncertain inputs are propagated through the degree-day house of :mod:`.variants` by
sampling, as GUM Supplement 1 describes the propagation of distributions [1]. Every package is
evaluated on the *same* draws (common random numbers [2]), so two packages' ranges differ only
by what the packages change. Per sample i and package k (package 0 is the as-found house):

    UA_ik  = UA_k + Σ_g [k leaves g as found] · b·U_g·A_g · (m_gi − 1)
                  + (UA_air,k − UA_air,0) · (r_i − 1)                       [W/K]
    E_ik   = UA_ik · HDD(UA_ik) · 86 400 / (η_i · E_unit) · price           (envelope heating)
    P_ik   = pipe_k / (η_i · E_unit) · price                                 (pipe runs)
    H_ik   = E_i0 − E_ik,  Hp_ik = P_i0 − P_ik,  C_ik = cooling_i0 − cooling_ik
    s_ikt  = ρ · p_i · (H_ik · w_it + Hp_ik) + C_ik            (year t, today's prices)

with m_gi = exp(σ_g z) the multiplier on the as-found U of surface g (lognormal, median 1),
r_i = exp(σ_r z) the multiplier on the CFM50 reduction an air-sealing upgrade reaches, η_i =
η · exp(σ_η z) (at most 1 when the rated η is at most 1), w_it = max(0, 1 + c·z) the year-t
heating degree-days over the normal year's (the whole degree-day table scales, so the variable
base keeps its balance point), p_i = exp(σ_p z) the fuel price over the typed one, e_i = e +
σ_e z the escalation, and ρ the calibration ratio to the bills (1 without bills). Then, with
the NIST Handbook 135 conventions of :mod:`.economics` [3] (costs at year 0, savings at each
year's end, escalated from the base date):

    annual savings  = s_ik1
    PV_ik           = Σ_{t=1..N} s_ikt · ((1 + e_i) / (1 + d))^t,   NPV = PV − C_k
    SIR             = PV / C_k (C_k > 0),   simple payback = C_k / s_ik1 (s_ik1 > 0)
    pays back       ⇔ max_{y=0..N} (−C_k + Σ_{t≤y} s_ikt ((1 + e_i)/(1 + d))^t) ≥ 0

The quantiles are Hyndman and Fan's definition 7 (numpy's default, linear between order
statistics) [4]; a figure that is infinite in some samples (a payback that never comes) keeps
that infinity. The sample p-quantile has the asymptotic standard error
sqrt(p (1 − p) / n) / f(x_p), f the density at the quantile [5].

Inputs are drawn in a fixed order (U multipliers, air sealing, efficiency, weather by year,
price, escalation), whatever their spreads, so a spread of zero changes no other draw.

References
----------
[1] JCGM 101:2008, Evaluation of measurement data — Supplement 1 to the GUM: propagation of
    distributions using a Monte Carlo method, clauses 5 and 7.
[2] P. Glasserman, Monte Carlo Methods in Financial Engineering, Springer (2004), §4.1
    (common random numbers).
[3] S. K. Fuller and S. R. Petersen, NIST Handbook 135 (1995), ch. 4 and 6 (UPV*, NPV, SIR,
    payback).
[4] R. J. Hyndman and Y. Fan, "Sample quantiles in statistical packages", The American
    Statistician 50(4), 361–365 (1996), definition 7.
[5] H. A. David and H. N. Nagaraja, Order Statistics, 3rd ed., Wiley (2003), §10.2
    (asymptotic normality of sample quantiles).
[6] M. E. O'Neill, "PCG: a family of simple fast space-efficient statistically good
    algorithms for random number generation", HMC-CS-2014-0905 (2014) (numpy's PCG64).
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass

import numpy as np
import numpy.typing as npt

from server.physics import energy
from server.physics.fuels import KWH_J
from server.physics.units import BTU_J, HOUR_S
from server.physics.variants import Variants

FloatArray = npt.NDArray[np.float64]
IntArray = npt.NDArray[np.int64]
BoolArray = npt.NDArray[np.bool_]

#: the three quantiles reported
QUANTILES = (0.10, 0.50, 0.90)
#: escalation rates are kept inside this span after sampling [1/year] (common practice: the
#: economics refuse rates near −1; ±50 %/yr is far beyond any plausible fuel escalation)
ESCALATION_CLIP = 0.5


@dataclass(frozen=True, slots=True)
class Spreads:
    """The spread of each uncertain input.

    Attributes
    ----------
    surface_u : mapping of str to float
        Surface id -> σ of ln(m), m the multiplier on its as-found U [-].
    air_sealing : float
        σ of ln(r), r the multiplier on the CFM50 reduction an air-sealing upgrade reaches [-].
    heating_efficiency : float
        σ of ln of the heating efficiency [-].
    weather : float
        Coefficient of variation of a year's heating degree-days [-].
    fuel_price : float
        σ of ln of the heating fuel price [-].
    fuel_escalation : float
        Standard deviation of the escalation rate [1/year].
    """

    surface_u: Mapping[str, float]
    air_sealing: float = 0.0
    heating_efficiency: float = 0.0
    weather: float = 0.0
    fuel_price: float = 0.0
    fuel_escalation: float = 0.0

    def all_zero(self) -> bool:
        """True when no input has a spread."""
        scalars = (
            self.air_sealing,
            self.heating_efficiency,
            self.weather,
            self.fuel_price,
            self.fuel_escalation,
        )
        return all(v == 0 for v in scalars) and all(v == 0 for v in self.surface_u.values())


@dataclass(frozen=True, slots=True)
class Samples:
    """Figures of every sample (rows) and package (columns), money in the caller's currency.

    ``simple_payback_years`` is +inf where the first-year savings are zero or less; ``sir``
    NaN where the net cost is zero or less; ``pays_back`` the NIST 135 test above. The drawn
    ``escalation`` [1/year] (n,) and ``weather`` factors w_it [-] (n, N) are kept for checks.
    """

    annual_savings: FloatArray
    npv: FloatArray
    simple_payback_years: FloatArray
    sir: FloatArray
    pays_back: BoolArray
    net_cost: FloatArray
    escalation: FloatArray
    weather: FloatArray


def spread_groups(variants: Variants) -> dict[str, int]:
    """Surface id -> group index of the surfaces whose U spread the sampler applies.

    A surface outdoors, on the ground or facing a space of given b is a group of its own with
    a constant b. Surfaces facing a space whose b is computed (ISO 13789) share b(H_iu) and
    are left at their point U (not in the mapping).
    """
    found: dict[str, int] = {}
    for g, group in enumerate(variants.groups):
        if group.space is None and group.key.startswith("surface:"):
            found[group.key.removeprefix("surface:")] = g
    return found


def _cooling_cost(variants: Variants, ua: FloatArray) -> FloatArray:
    """Yearly cooling cost of each UA [W/K] (as :meth:`.variants.Variants.figures_from_sums`)."""
    house = variants.house
    cooling = house.cooling
    if cooling is None:
        return np.zeros_like(ua)
    load = ua * house.climate.cdd_k_day * energy.DAY_S
    if cooling.seer is not None:
        electricity = load / BTU_J / cooling.seer * HOUR_S
    elif cooling.cop is not None:
        electricity = load / cooling.cop
    else:
        raise ValueError("the cooling system needs a SEER or a COP")
    return electricity / KWH_J * cooling.electricity_price_per_kwh


def simulate(
    variants: Variants,
    selections: IntArray,
    spreads: Spreads,
    *,
    samples: int,
    seed: int,
    heating_ratio: float = 1.0,
) -> Samples:
    """Monte Carlo figures of each selection (rows of option indices) [1]–[3], [6].

    Parameters
    ----------
    variants : Variants
        The house and its upgrades as choice groups.
    selections : array of int, shape (K, G)
        One row per package (the as-found house is added as package 0 internally).
    spreads : Spreads
        Spread of each input; a surface not in ``spreads.surface_u`` keeps its U.
    samples : int
        Number of samples n [-], at least 1.
    seed : int
        Seed of numpy's ``Generator(PCG64(seed))`` [6].
    heating_ratio : float
        ρ: the heating savings are multiplied by it (calibration to bills) [-].

    Returns
    -------
    Samples
        Arrays of shape (n, K).

    Raises
    ------
    ValueError
        Fewer than one sample, a negative or non-finite spread, a negative ratio.
    """
    if samples < 1:
        raise ValueError("at least one sample is needed")
    scalars = (
        spreads.air_sealing,
        spreads.heating_efficiency,
        spreads.weather,
        spreads.fuel_price,
        spreads.fuel_escalation,
        *spreads.surface_u.values(),
    )
    if not all(np.isfinite(v) and v >= 0 for v in scalars):
        raise ValueError("every spread must be a finite number of at least zero")
    if not (np.isfinite(heating_ratio) and heating_ratio >= 0):
        raise ValueError("the calibration ratio must be finite and at least zero")
    house = variants.house
    econ = house.economics
    years = econ.years
    sel = np.asarray(selections, dtype=np.int64).reshape(-1, len(variants.groups))
    sel = np.vstack([np.zeros((1, sel.shape[1]), dtype=np.int64), sel])
    ua_k, pipe_k, installed_k, rebate_k = variants.group_sums(sel)
    net_k = installed_k - rebate_k

    rng = np.random.Generator(np.random.PCG64(seed))
    by_surface = spread_groups(variants)
    spread_ids = [s for s in by_surface if s in spreads.surface_u]
    z_u = rng.standard_normal((samples, len(by_surface)))
    z_air = rng.standard_normal(samples)
    z_eta = rng.standard_normal(samples)
    z_weather = rng.standard_normal((samples, years))
    z_price = rng.standard_normal(samples)
    z_escalation = rng.standard_normal(samples)

    ua = np.broadcast_to(ua_k, (samples, sel.shape[0])).copy()
    column = {s: c for c, s in enumerate(by_surface)}
    for surface in spread_ids:
        g = by_surface[surface]
        sigma = spreads.surface_u[surface]
        if sigma == 0:
            continue
        found = variants.ua[g][0]
        as_found = sel[:, g] == 0
        ua += np.outer(found * np.expm1(sigma * z_u[:, column[surface]]), as_found)
    air = next((g for g, group in enumerate(variants.groups) if group.key == "air"), None)
    if air is not None and spreads.air_sealing > 0:
        ua_air = variants.ua[air]
        change = ua_air[sel[:, air]] - ua_air[0]  # ≤ 0: what the sealing takes off
        r = np.exp(spreads.air_sealing * z_air)
        worst = np.min(change)
        if worst < 0:  # the flow cannot fall below zero: r ≤ UA_air,0 / (UA_air,0 − UA_air,k)
            r = np.minimum(r, ua_air[0] / -worst)
        ua += np.outer(r - 1.0, change)

    heating = house.heating
    eta = heating.efficiency * np.exp(spreads.heating_efficiency * z_eta)
    if heating.efficiency <= 1.0:
        eta = np.minimum(eta, 1.0)
    per_joule = heating.price_per_unit / heating.fuel.energy_per_unit_j / eta[:, None]
    # each package's sun and ducts, repeated for every sample (its U spreads move only UA)
    state = variants.state(sel).take(np.tile(np.arange(sel.shape[0]), samples))
    envelope = variants.delivered_load_j(ua, state) * per_joule
    pipes = pipe_k[None, :] * per_joule
    cooling = _cooling_cost(variants, ua)
    h_env = envelope[:, :1] - envelope
    h_pipe = pipes[:, :1] - pipes
    h_cool = cooling[:, :1] - cooling

    weather = np.maximum(0.0, 1.0 + spreads.weather * z_weather)  # (n, N)
    scale = (heating_ratio * np.exp(spreads.fuel_price * z_price))[:, None]
    escalation = np.clip(
        econ.escalation_rate + spreads.fuel_escalation * z_escalation,
        -ESCALATION_CLIP,
        ESCALATION_CLIP,
    )
    growth = (1.0 + escalation) / (1.0 + econ.discount_rate)
    factors = growth[:, None] ** np.arange(1, years + 1)[None, :]  # (n, N): ((1+e)/(1+d))^t
    weighted = np.sum(weather * factors, axis=1)[:, None]
    plain = np.sum(factors, axis=1)[:, None]

    first = scale * (h_env * weather[:, :1] + h_pipe) + h_cool
    present = scale * (h_env * weighted + h_pipe * plain) + h_cool * plain
    npv = present - net_k[None, :]
    positive_cost = net_k > 0
    sir = np.where(positive_cost[None, :], present / np.where(positive_cost, net_k, 1.0), np.nan)
    with np.errstate(divide="ignore"):
        payback = np.where(
            first > 0, np.maximum(net_k[None, :], 0.0) / np.where(first > 0, first, 1.0), np.inf
        )
    cumulative = np.broadcast_to(-net_k, first.shape).copy()
    pays = cumulative >= 0
    fixed = scale * h_pipe + h_cool
    varying = scale * h_env
    for t in range(years):
        cumulative += (varying * weather[:, t : t + 1] + fixed) * factors[:, t : t + 1]
        pays |= cumulative >= 0
    return Samples(
        annual_savings=first[:, 1:],
        npv=npv[:, 1:],
        simple_payback_years=payback[:, 1:],
        sir=sir[:, 1:],
        pays_back=pays[:, 1:],
        net_cost=np.broadcast_to(net_k[1:], first[:, 1:].shape),
        escalation=escalation,
        weather=weather,
    )


def quantiles(values: FloatArray, probabilities: tuple[float, ...] = QUANTILES) -> FloatArray:
    """Sample quantiles of each column, Hyndman and Fan's definition 7 [4].

    x_p = x_(⌊h⌋) + (h − ⌊h⌋) · (x_(⌊h⌋+1) − x_(⌊h⌋)), h = (n − 1) p on the sorted column
    (0-based). An infinite order statistic that the interpolation reaches gives +inf (where
    numpy's arithmetic would give NaN); NaN anywhere in a column gives NaN.

    Parameters
    ----------
    values : array, shape (n,) or (n, K)
    probabilities : tuple of float
        Each in [0, 1].

    Returns
    -------
    array, shape (len(probabilities), K)
    """
    data = np.sort(np.asarray(values, dtype=float), axis=0)
    if data.ndim == 1:
        data = data[:, None]
    n = data.shape[0]
    if n < 1:
        raise ValueError("quantiles of no samples")
    rows = []
    for p in probabilities:
        h = (n - 1) * p
        lo = int(np.floor(h))
        hi = min(lo + 1, n - 1)
        frac = h - lo
        a, b = data[lo], data[hi]
        with np.errstate(invalid="ignore"):
            value = a + frac * (b - a) if frac > 0 else a.copy()
        value = np.where(np.isinf(b) & (frac > 0) & ~np.isnan(a), np.inf, value)
        value = np.where(np.isnan(data).any(axis=0), np.nan, value)
        rows.append(value)
    return np.array(rows)


def quantile_standard_error(p: float, samples: int, density: float) -> float:
    """Asymptotic standard error of the sample p-quantile [5].

    SE = sqrt(p (1 − p) / n) / f(x_p), f [1/unit of x] the density at the true quantile.
    """
    if not 0 < p < 1 or samples < 1 or not density > 0:
        raise ValueError("need 0 < p < 1, at least one sample and a positive density")
    return float(np.sqrt(p * (1 - p) / samples) / density)
