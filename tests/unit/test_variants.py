"""The array core (server/physics/variants.py) reproduces the package path figure by figure.

Every figure of every package is compared with compute_house (documents) or with
house_model.evaluate_option (pure random houses) to 1e-9 relative: the API.md example, the
demo house, the 40-surface load-test house, and seeded random houses with variable base,
buffer spaces (b computed and given), air sealing and pipe runs.
"""

from __future__ import annotations

import math
import random

import numpy as np
import pytest

from server.documents.house import HouseDocument
from server.physics import house_model as model
from server.physics.units import from_si
from server.physics.variants import Variants, unsupported
from server.services.comparison import compute_house
from tests.api.test_house_api import DOC_IP
from tests.utils.house_models import model_of_document
from tests.utils.houses import big_house_document
from tests.utils.random_houses import random_house

REL = 1e-9


def close(a: float | None, b: float, rel: float = REL) -> bool:
    if a is None:
        return math.isnan(b)
    return abs(a - b) <= rel * max(abs(a), abs(b), 1e-6)


def check_document(doc: HouseDocument) -> int:
    """Compare every package and every upgrade alone; returns the number of options compared."""
    result = compute_house(doc)
    house, upgrades = model_of_document(doc)
    variants = Variants(house, upgrades)
    options = result.packages + result.upgrades
    figures = variants.evaluate_packages([o.upgrades for o in options])
    units = doc.units
    for i, option in enumerate(options):
        pairs = [
            (option.ua, from_si(float(figures.ua_w_per_k[i]), "ua", units)),
            (option.heating_fuel, figures.heating_fuel_units[i]),
            (option.heating_cost, figures.heating_cost[i]),
            (option.cooling_cost, figures.cooling_cost[i]),
            (option.total_cost, figures.total_cost[i]),
            (option.co2, figures.co2_kg[i]),
            (option.annual_savings, figures.annual_savings[i]),
            (option.installed_cost, figures.installed_cost[i]),
            (option.net_cost, figures.net_cost[i]),
            (option.present_value, figures.present_value[i]),
            (option.npv, figures.npv[i]),
            (option.sir, figures.sir[i]),
            (option.co2_avoided, figures.co2_avoided_kg[i]),
        ]
        for expected, got in pairs:
            assert close(expected, float(got)), (option.id, expected, got)
    return len(options)


def test_api_example_every_option() -> None:
    # API.md's house: attic-r49 alone, air-seal alone and the package of both
    assert check_document(HouseDocument.model_validate(DOC_IP)) == 3


def test_load_test_house_every_package() -> None:
    # 40 surfaces x 5 upgrades, 6 packages of 40 upgrades and 200 upgrades alone
    doc = HouseDocument.model_validate(big_house_document())
    assert check_document(doc) == 206
    house, upgrades = model_of_document(doc)
    variants = Variants(house, upgrades)
    assert variants.count() == 6**40 and len(variants.groups) == 41  # 40 surfaces + air


def test_demo_house_every_option(app) -> None:  # type: ignore[no-untyped-def]
    from server.models import House
    from server.services.demo import load_demo_house
    from server.services.house_document import house_document

    with app.state.session_factory() as s:
        demo = s.get(House, load_demo_house(session=s))
        body = house_document(demo).model_dump(mode="json", exclude_none=True)
        s.rollback()
    # the demo's ducts in the crawlspace, temperature bins, windows' sun with the variable
    # base, duct sealing and storm windows: all on the array core now
    house, upgrades = model_of_document(HouseDocument.model_validate(body))
    assert unsupported(house, upgrades) is None
    # 8 upgrades alone and the two saved packages
    assert check_document(HouseDocument.model_validate(body)) == 10


def _figures_of(house: model.House, as_found: model.HouseEnergy, chosen: list[model.Upgrade]):  # type: ignore[no-untyped-def]
    if not chosen:
        return as_found, None
    option = model.evaluate_option(house, as_found, "x", chosen)
    return option.energy, option


@pytest.mark.parametrize("cap", [65_536, 1])
def test_random_houses_match_the_package_path(cap: int) -> None:
    """40 seeded random houses, 25 random sets each; cap 1 keeps buffer-space surfaces as
    separate coupled groups (b applied at evaluation), the default lists their product."""
    rng = random.Random(20250916 + cap)
    compared = 0
    for _ in range(40):
        house, upgrades = random_house(rng, spaces=True if rng.random() < 0.7 else None)
        variants = Variants(house, upgrades, group_cap=cap)
        as_found = model.evaluate(house)
        rows = variants.all_selections()
        picks = rows[[rng.randrange(len(rows)) for _ in range(25)]]
        figures = variants.evaluate(picks)
        for i, row in enumerate(picks):
            names = variants.upgrade_ids(row)
            assert np.array_equal(variants.selection(names), row)
            by_id = {u.id: u for u in upgrades}
            energy, option = _figures_of(house, as_found, [by_id[n] for n in names])
            assert close(energy.ua_w_per_k, float(figures.ua_w_per_k[i]))
            assert close(energy.heating_load_j, float(figures.heating_load_j[i]))
            assert close(energy.pipe_loss_j, float(figures.pipe_loss_j[i]))
            assert close(energy.total_cost, float(figures.total_cost[i]))
            assert close(energy.co2_kg, float(figures.co2_kg[i]))
            assert close(energy.co2_biogenic_kg, float(figures.co2_biogenic_kg[i]))
            if option is not None:
                money = option.appraisal
                assert close(money.annual_savings, float(figures.annual_savings[i]))
                assert close(money.npv, float(figures.npv[i]))
                assert close(money.sir, float(figures.sir[i]))
                assert close(option.co2_avoided_kg, float(figures.co2_avoided_kg[i]))
            compared += 1
    assert compared == 1000


def test_buffer_space_group_is_the_product_of_its_surfaces() -> None:
    rng = random.Random(7)
    house, upgrades = random_house(rng, spaces=True)
    variants = Variants(house, upgrades)
    for group in variants.groups:
        if group.key.startswith("space:"):
            members = [t.split(":", 1)[1] for t in group.targets]
            sizes = [
                1 + sum(1 for u in upgrades if getattr(u, "surface_id", None) == m) for m in members
            ]
            assert len(group.options) == math.prod(sizes)


def test_conflicting_upgrades_are_refused() -> None:
    doc = HouseDocument.model_validate(DOC_IP)
    house, upgrades = model_of_document(doc)
    twin = model.AssemblyUpgrade("attic-again", "attic", 0.2, 10.0)
    variants = Variants(house, [*upgrades, twin])
    with pytest.raises(ValueError, match="both change surface attic"):
        variants.selection(["attic-r49", "attic-again"])
    with pytest.raises(ValueError, match="two upgrades are called"):
        Variants(house, [*upgrades, upgrades[0]])
