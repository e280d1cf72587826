"""The array core on houses with systems and sun, against the package path, and the optimiser
against brute force on them.

Every figure of the array core (server.physics.variants) is compared with
house_model.evaluate_option (one modified house per set, the path compute_house takes) to 1e-9
relative, on seeded random houses with: temperature bins alone (they change nothing), ducts
(ASHRAE 152 distribution efficiency, ducts in buffer spaces of computed or given b, sealing
and insulation upgrades), ventilation and altitude, and windows whose sun moves the variable
base (SHGC upgrades). The optimiser's best set is compared with the best of every set
evaluated through the package path; the agreements are counted. The balance point with sun
is checked against scipy.optimize.brentq (a bracketed root finder of a reference library).
"""

from __future__ import annotations

import itertools
import math
import random

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.optimize import brentq

from server.physics import gains
from server.physics import house_model as model
from server.physics import optimize as search
from server.physics.variants import Variants, unsupported
from tests.utils.random_houses import random_systems_house

REL = 1e-9
FIELDS = (
    ("ua_w_per_k", "ua_w_per_k"),
    ("heating_load_j", "heating_load_j"),
    ("heating_fuel_units", "heating_fuel_units"),
    ("total_cost", "total_cost"),
    ("co2_kg", "co2_kg"),
    ("heating_degree_days_k_day", "hdd_k_day"),
)
FEATURES = {
    "bins": {"bins": True},
    "ventilation": {"ventilation": True},
    "ducts": {"ducts": True},
    "sun": {"sun": True, "bins": False},
    "all": {"ducts": True, "sun": True, "ventilation": True},
}


def close(a: float, b: float, rel: float = REL) -> bool:
    return abs(a - b) <= rel * max(abs(a), abs(b), 1e-6)


def _package(house: model.House, upgrades: list[model.Upgrade], ids: tuple[str, ...]):  # type: ignore[no-untyped-def]
    as_found = model.evaluate(house)
    if not ids:
        return as_found, 0.0, 0.0
    by_id = {u.id: u for u in upgrades}
    option = model.evaluate_option(house, as_found, "x", [by_id[n] for n in ids])
    return option.energy, option.appraisal.npv, option.appraisal.annual_savings


def _check_house(house: model.House, upgrades: list[model.Upgrade], picks: int, seed: int) -> int:
    assert unsupported(house, upgrades) is None
    variants = Variants(house, upgrades)
    rows = variants.all_selections()
    rng = random.Random(seed)
    chosen = rows[[rng.randrange(len(rows)) for _ in range(picks)]]
    figures = variants.evaluate(chosen)
    for i, row in enumerate(chosen):
        energy, npv, savings = _package(house, upgrades, variants.upgrade_ids(row))
        for ours, theirs in FIELDS:
            assert close(float(getattr(figures, ours)[i]), getattr(energy, theirs)), ours
        assert close(float(figures.npv[i]), npv)
        assert close(float(figures.annual_savings[i]), savings)
    return len(chosen)


@pytest.mark.parametrize("feature", sorted(FEATURES))
@settings(max_examples=15, deadline=None)
@given(seed=st.integers(0, 2**32 - 1))
def test_array_figures_equal_the_package_path(feature: str, seed: int) -> None:
    house, upgrades = random_systems_house(random.Random(seed), **FEATURES[feature])
    assert _check_house(house, upgrades, 12, seed) == 12


def test_bins_alone_change_nothing() -> None:
    # temperature bins only feed the ducts' season, a heat pump and pipe shares: without
    # them a house computes as the same house without systems, to the last bit
    rng = random.Random(7)
    for _ in range(20):
        house, upgrades = random_systems_house(rng, bins=True)
        plain = model.evaluate(model.House(**{**_fields(house), "systems": None}))
        with_bins = model.evaluate(house)
        assert with_bins.total_cost == pytest.approx(plain.total_cost, rel=1e-12)
        assert with_bins.heating_fuel_units == pytest.approx(plain.heating_fuel_units, rel=1e-12)


def _fields(house: model.House) -> dict[str, object]:
    return {name: getattr(house, name) for name in model.House.__dataclass_fields__}


def _brute_force(house: model.House, upgrades: list[model.Upgrade], budget: float, objective: str):  # type: ignore[no-untyped-def]
    """The best value and its cheapest net cost over every allowed set, package by package."""
    targets: dict[str, list[model.Upgrade]] = {}
    for u in upgrades:
        targets.setdefault(model.upgrade_target(u), []).append(u)
    groups = list(targets.values())
    as_found = model.evaluate(house)
    best = (0.0, 0.0)  # the empty set
    for combo in itertools.product(*(range(len(g) + 1) for g in groups)):
        chosen = [groups[g][k - 1] for g, k in enumerate(combo) if k > 0]
        if not chosen:
            continue
        option = model.evaluate_option(house, as_found, "x", chosen)
        if option.appraisal.net_cost > budget + 1e-9 * max(1.0, budget):
            continue
        value = {
            "npv": option.appraisal.npv,
            "annual_savings": option.appraisal.annual_savings,
            "co2": option.co2_avoided_kg,
        }[objective]
        if value > best[0] + 1e-9 * max(1.0, abs(value)):
            best = (value, option.appraisal.net_cost)
    return best


@pytest.mark.parametrize("feature", ["ducts", "sun", "all", "ventilation"])
def test_optimizer_agrees_with_brute_force(feature: str) -> None:
    rng = random.Random(hash(feature) % 10_000 + 16)
    agreements = 0
    houses = 12
    for h in range(houses):
        house, upgrades = random_systems_house(rng, max_sets=600, **FEATURES[feature])
        variants = Variants(house, upgrades)
        objective = search.OBJECTIVES[h % 3]
        budget = rng.choice([math.inf, rng.uniform(0.0, 6000.0)])
        found = search.best_package(variants, budget=budget, objective=objective)
        value, _cost = _brute_force(house, upgrades, budget, objective)
        assert found.exact
        if feature in ("ducts", "sun", "all") and variants.nonlinear is not None:
            assert found.method == "enumeration"
        assert close(found.best.objective_value, value, 1e-8), (h, objective)
        agreements += 1
    assert agreements == houses


def test_no_answer_above_the_enumeration_limit_says_why() -> None:
    house, upgrades = random_systems_house(random.Random(3), ducts=True)
    variants = Variants(house, upgrades)
    saved = search.MAX_ENUMERATION
    try:
        search.MAX_ENUMERATION = 0
        found = search.best_package(variants, budget=math.inf, objective="npv")
    finally:
        search.MAX_ENUMERATION = saved
    assert not found.exact and found.best.upgrade_ids == ()
    assert "no linear programme is exact" in found.warnings[0]
    assert "ducts' distribution efficiency" in found.warnings[0]


@settings(max_examples=200, deadline=None)
@given(
    seed=st.integers(0, 2**32 - 1),
    ua=st.floats(20.0, 2000.0),
    internal=st.floats(0.0, 3000.0),
)
def test_balance_point_with_sun_is_the_bracketed_root(
    seed: int, ua: float, internal: float
) -> None:
    rng = random.Random(seed)
    bases = [float(b) for b in range(-10, 26, rng.choice([1, 2, 5]))]
    # Ē(τ) rises with τ (milder days are sunnier: the premise of server.physics.gains), so
    # the excess t − t_set + (Q + S(t)) / UA rises and has one root
    terms = []
    for _ in range(rng.randint(1, 4)):
        start = rng.uniform(5, 30)
        steps = np.cumsum([rng.uniform(0.0, 4.0) for _ in bases])
        terms.append((rng.uniform(0.5, 8.0), tuple(start + float(v) for v in steps)))
    setpoint = rng.uniform(16.0, 23.0)
    table = np.array(gains.solar_table(bases, terms))

    def excess(t: float) -> float:
        return t - setpoint + (internal + float(np.interp(t, bases, table))) / ua

    ours = gains.balance_point_c(setpoint, internal, ua, bases, terms)
    vector = gains.balance_points_c(setpoint, internal, np.array([ua]), bases, table[None, :])[0]
    if excess(bases[0]) >= 0:
        expected = bases[0]
    elif excess(bases[-1]) <= 0:
        expected = bases[-1]
    else:
        expected = brentq(excess, bases[0], bases[-1], xtol=1e-13, rtol=1e-15)
    assert ours == pytest.approx(expected, abs=1e-9)
    assert vector == pytest.approx(ours, abs=1e-12)


def _demo_document(app):  # type: ignore[no-untyped-def]
    from server.models import House
    from server.services.demo import load_demo_house
    from server.services.house_document import house_document

    with app.state.session_factory() as s:
        demo = s.get(House, load_demo_house(session=s))
        body = house_document(demo).model_dump(mode="json", exclude_none=True)
        s.rollback()
    return body


def test_demo_house_every_set_and_its_best(app) -> None:  # type: ignore[no-untyped-def]
    try:
        from server.documents.house_request import HouseDocument
    except ImportError:  # before the documents split
        from server.documents.house import HouseDocument  # type: ignore[no-redef]
    from server.services.comparison import compute_house, model_of_document

    body = _demo_document(app)
    house, upgrades, _ = model_of_document(HouseDocument.model_validate(body))
    variants = Variants(house, upgrades)
    assert variants.count() == 256 and variants.nonlinear is not None
    # every one of the 256 sets equals its package (ducts in the crawlspace, sun, bins)
    assert _check_house(house, upgrades, 256, 1) == 256
    for objective in search.OBJECTIVES:
        for budget in (math.inf, 5000.0, 0.0):
            found = search.best_package(variants, budget=budget, objective=objective)
            by_model, _ = search.best_package_by_model(
                house, upgrades, budget=budget, objective=objective, reason="test"
            )
            assert found.exact and found.method == "enumeration"
            assert found.best.upgrade_ids == by_model.best.upgrade_ids
            assert close(found.best.objective_value, by_model.best.objective_value)
            assert [p.upgrade_ids for p in found.frontier] == [
                p.upgrade_ids for p in by_model.frontier
            ]
    # the best set is calibrated to the bills and gets a range, as the packages do
    doc = HouseDocument.model_validate(
        {
            **body,
            "optimize": {"budget": None, "objective": "npv"},
            "uncertainty": {"samples": 500, "seed": 3},
        }
    )
    result = compute_house(doc)
    assert result.best is not None and result.calibration is not None
    assert result.best.calibrated is not None and result.best.range is not None
    assert result.uncertainty is not None and result.uncertainty.available
    assert all(p.range is not None for p in result.packages)
