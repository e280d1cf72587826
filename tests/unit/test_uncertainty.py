"""The savings-range Monte Carlo (server/physics/uncertainty.py) against hand arithmetic.

The hand-checkable house: one wall of 1,000 ft² at U 0.5 Btu/(h·ft²·°F) upgraded to U 0.25,
5,000 °F·day, natural gas at 80 % and $1.50/therm (100,000 Btu), no cooling. A unit of U is
1000 × 5000 × 24 Btu / (100,000 × 0.8) = 1,500 therm = $2,250 a year, so with the as-found U
multiplied by m the first-year savings are 2250 × (0.5 m − 0.25): $562.50 at m = 1.
"""

from __future__ import annotations

import math
import statistics
import time

import numpy as np
import pytest

from server.documents.house import HouseDocument
from server.physics import economics
from server.physics import uncertainty as mc
from server.physics.variants import Variants
from tests.utils.house_models import model_of_document
from tests.utils.houses import big_house_document

WALL = {
    "units": "ip",
    "climate": {"hdd": 5000, "cdd": 0},
    "heating": {"fuel": "natural_gas", "efficiency": 0.8, "price": 1.5},
    "surfaces": [{"id": "walls", "kind": "wall", "area": 1000, "u": 0.5}],
    "upgrades": [{"id": "better", "surface": "walls", "u": 0.25, "cost": {"fixed": 3000}}],
    "packages": [{"id": "p", "upgrades": ["better"]}],
    "economics": {"discount_rate": 0.03, "fuel_escalation": 0.0, "years": 20},
}
PER_U = 2250.0  # $ a year per Btu/(h·ft²·°F) of the wall (module docstring)
#: UPV* at d = 3 %, e = 0, 20 years: (1 − 1.03^−20) / 0.03 = 14.877475 (NIST 135 UPV)
UPV = (1 - 1.03**-20) / 0.03


def variants_of(doc: dict) -> tuple[Variants, np.ndarray]:
    parsed = HouseDocument.model_validate(doc)
    house, upgrades = model_of_document(parsed)
    variants = Variants(house, upgrades)
    rows = np.stack([variants.selection(p.upgrades) for p in parsed.packages])
    return variants, rows


def wall(**changes: float) -> dict:
    doc = {**WALL, "upgrades": [dict(WALL["upgrades"][0])]}
    if "fixed" in changes:
        doc["upgrades"][0]["cost"] = {"fixed": changes["fixed"]}
    return doc


def test_lognormal_u_only_gives_the_analytic_quantiles() -> None:
    variants, rows = variants_of(wall())
    sigma, n = 0.2, 20_000
    spreads = mc.Spreads(surface_u={"walls": sigma})
    out = mc.simulate(variants, rows, spreads, samples=n, seed=11)
    found = mc.quantiles(out.annual_savings)[:, 0]
    npv = mc.quantiles(out.npv)[:, 0]
    normal = statistics.NormalDist()
    for p, value, value_npv in zip(mc.QUANTILES, found, npv, strict=True):
        z = normal.inv_cdf(p)  # ∓1.2815516 at 10 % / 90 % (standard normal table), 0 at 50 %
        # savings = 2250 (0.5 e^{σz} − 0.25) is increasing in z, so its p-quantile is this
        expected = PER_U * (0.5 * math.exp(sigma * z) - 0.25)
        # density of the savings there: φ(z) / (dS/dz), dS/dz = 1125 σ e^{σz}
        density = normal.pdf(z) / (PER_U * 0.5 * sigma * math.exp(sigma * z))
        se = mc.quantile_standard_error(p, n, density)  # ≈ $2.1 at p = 0.1, n = 20,000
        assert abs(value - expected) <= 4 * se, (p, value, expected, se)
        # NPV = s × UPV* − 3000 is linear in s: its quantiles follow to rounding
        assert value_npv == pytest.approx(value * UPV - 3000, rel=1e-12)
    assert found[0] <= found[1] <= found[2]
    # as-found U never changes the cost: payback = 3000 / s, so P10 of payback ↔ P90 of savings
    payback = mc.quantiles(out.simple_payback_years)[:, 0]
    assert payback[0] == pytest.approx(3000 / found[2], rel=2e-3)


def test_no_spread_gives_the_point_figures_in_every_sample() -> None:
    doc = big_house_document(surfaces=6, upgrades_per_surface=3, packages=3)
    variants, rows = variants_of(doc)
    point = variants.evaluate(rows)
    out = mc.simulate(variants, rows, mc.Spreads(surface_u={}), samples=50, seed=3)
    for name in ("annual_savings", "npv", "sir"):
        got = getattr(out, name)
        assert np.all(got == got[0])  # every sample the same
        assert np.allclose(got[0], getattr(point, name), rtol=1e-12, atol=0)
    assert np.allclose(out.simple_payback_years[0], point.net_cost / point.annual_savings)
    assert np.array_equal(out.pays_back[0], point.npv >= 0)


def test_probability_pays_back_is_a_direct_count_of_the_cash_flows() -> None:
    variants, rows = variants_of(wall())
    # price σ = 1: NPV < 0 when 562.5 e^z × 14.877 < 3000, z < ln(0.3585) = −1.03: ~15 %
    spreads = mc.Spreads(surface_u={}, fuel_price=1.0, fuel_escalation=0.02)
    out = mc.simulate(variants, rows, spreads, samples=400, seed=5)
    count = 0
    for i in range(400):
        money = economics.appraise(
            installed_cost=3000,
            rebates=0,
            annual_savings=float(out.annual_savings[i, 0]),
            discount_rate=0.03,
            escalation_rate=float(out.escalation[i]),
            years=20,
        )
        assert out.npv[i, 0] == pytest.approx(money.npv, rel=1e-9, abs=1e-9)
        assert out.simple_payback_years[i, 0] == pytest.approx(money.simple_payback_years)
        paid = money.discounted_payback_year is not None
        assert bool(out.pays_back[i, 0]) == paid
        count += paid
    share = float(out.pays_back[:, 0].mean())
    assert share == count / 400
    assert 0.7 < share < 0.95  # about 85 % (above)


def test_weather_changes_each_year_of_the_cash_flow() -> None:
    # net cost 8000: point NPV = 562.5 × 14.877 − 8000 = $368.6, so the weather decides
    variants, rows = variants_of(wall(fixed=8000))
    out = mc.simulate(variants, rows, mc.Spreads(surface_u={}, weather=0.3), samples=300, seed=9)
    discount = 1.03 ** -np.arange(1, 21)
    paid = 0
    for i in range(300):
        yearly = 562.5 * out.weather[i]  # heating savings scale with each year's degree-days
        assert out.annual_savings[i, 0] == pytest.approx(yearly[0], rel=1e-12)
        cumulative = -8000 + np.cumsum(yearly * discount)
        assert out.npv[i, 0] == pytest.approx(cumulative[-1], rel=1e-9, abs=1e-6)
        hit = bool(np.any(cumulative >= 0))
        assert bool(out.pays_back[i, 0]) == hit
        paid += hit
    assert 0.05 < paid / 300 < 0.95


def test_same_seed_same_figures_other_seed_other_figures() -> None:
    variants, rows = variants_of(wall())
    spreads = mc.Spreads(surface_u={"walls": 0.2}, weather=0.1, fuel_price=0.1)
    a = mc.simulate(variants, rows, spreads, samples=200, seed=42)
    b = mc.simulate(variants, rows, spreads, samples=200, seed=42)
    c = mc.simulate(variants, rows, spreads, samples=200, seed=43)
    assert np.array_equal(a.npv, b.npv) and np.array_equal(a.annual_savings, b.annual_savings)
    assert not np.array_equal(a.npv, c.npv)


def test_quantiles_by_hand_and_with_a_payback_that_never_comes() -> None:
    # definition 7 on 1..5: h = 4p; p = 0.1 -> 1.4, 0.5 -> 3, 0.9 -> 4.6 (as numpy's default)
    values = np.array([5.0, 1.0, 3.0, 2.0, 4.0])
    assert mc.quantiles(values)[:, 0].tolist() == pytest.approx([1.4, 3.0, 4.6])
    assert np.allclose(mc.quantiles(values)[:, 0], np.quantile(values, mc.QUANTILES))
    # [1, 2, inf]: h = 2p; p = 0.5 -> exactly 2; p = 0.9 -> between 2 and inf: inf
    got = mc.quantiles(np.array([np.inf, 1.0, 2.0]))[:, 0]
    assert got[0] == pytest.approx(1.2) and got[1] == 2.0 and got[2] == math.inf


def test_bad_inputs_are_refused() -> None:
    variants, rows = variants_of(wall())
    with pytest.raises(ValueError, match="sample"):
        mc.simulate(variants, rows, mc.Spreads(surface_u={}), samples=0, seed=1)
    with pytest.raises(ValueError, match="spread"):
        mc.simulate(variants, rows, mc.Spreads(surface_u={}, weather=math.nan), samples=5, seed=1)
    with pytest.raises(ValueError, match="spread"):
        mc.simulate(variants, rows, mc.Spreads(surface_u={"walls": -0.1}), samples=5, seed=1)


def test_big_house_2000_samples_of_every_package_timing() -> None:
    variants, rows = variants_of(big_house_document())
    spreads = mc.Spreads(
        surface_u={s: 0.2 for s in mc.spread_groups(variants)},
        air_sealing=0.3,
        heating_efficiency=0.05,
        weather=0.1,
        fuel_price=0.1,
        fuel_escalation=0.01,
    )
    times = []
    for seed in range(5):
        start = time.perf_counter()
        out = mc.simulate(variants, rows, spreads, samples=2000, seed=seed)
        for name in ("annual_savings", "npv", "simple_payback_years", "sir"):
            mc.quantiles(getattr(out, name))
        times.append(time.perf_counter() - start)
    print(
        f"\n2,000 samples x {rows.shape[0]} packages: median {statistics.median(times) * 1e3:.1f} ms"
    )
    assert out.npv.shape == (2000, 6)
    assert statistics.median(times) < 3.0  # the target is 0.3 s; loose on a shared machine
