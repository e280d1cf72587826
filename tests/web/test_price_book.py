"""Price book: CRUD, plain validation messages, costs filled from an item, ip/si conversion."""

from __future__ import annotations

import math
from dataclasses import dataclass

import pytest
from fastapi.testclient import TestClient
from hypothesis import given, settings
from hypothesis import strategies as st
from sqlalchemy import select

from server.errors import InputError
from server.models import House, Organization, PriceBookItem
from server.services import price_book as book
from server.services.comparison import compute_house
from server.services.house_document import house_document
from server.services.library import catalog_for
from tests.web.test_sharing import demo_house_for, signed_in_org

#: exact definitions (NIST SP 811, appendix B): 1 ft = 0.3048 m, 1 ft² = 0.09290304 m²
FT_M, FT2_M2 = 0.3048, 0.09290304


@dataclass
class Item:
    """A price-book row as the pure functions see it."""

    slug: str = "x"
    name: str = "Item"
    basis: str = "per_area"
    units: str = "ip"
    unit_cost: float = 0.0
    fixed_cost: float = 0.0


def _form(**changes: str) -> dict[str, str]:
    base = {"name": "Attic: blown cellulose", "upgrade_type": "attic_fill", "basis": "per_area",
            "units": "ip", "unit_cost": "2.00", "fixed_cost": "100", "notes": ""}  # fmt: skip
    return {**base, **changes}


def _items(app, org_id: int) -> list[PriceBookItem]:  # type: ignore[no-untyped-def]
    with app.state.session_factory() as s:
        return book.list_items(session=s, organization_id=org_id)


# --- pure arithmetic ------------------------------------------------------------------------------


def test_price_upgrade_hand_worked() -> None:
    attic = Item(unit_cost=1.35, fixed_cost=350.0)
    # 350 + 1.35 $/ft² × 860 ft² = 350 + 1161 = 1511
    assert book.price_upgrade(attic, 860.0) == pytest.approx(1511.0, abs=1e-9)
    # the same attic measured in m²: 860 × 0.09290304 = 79.8966144 m², still $1511
    assert book.price_upgrade(attic, 860 * FT2_M2, quantity_units="si") == pytest.approx(1511.0)
    # $1.35/ft² = 1.35 / 0.09290304 = 14.5312790 $/m²
    assert book.unit_cost_in(attic, "si") == pytest.approx(14.5312790, rel=1e-8)
    metric = Item(units="si", unit_cost=20.0)
    # $20/m² over 100 ft² = 20 × 9.290304 m² = $185.80608; per ft²: 20 × 0.09290304 = 1.8580608
    assert book.price_upgrade(metric, 100.0, quantity_units="ip") == pytest.approx(185.80608)
    assert book.unit_cost_in(metric, "ip") == pytest.approx(1.8580608, rel=1e-12)
    pipe = Item(basis="per_length", unit_cost=3.0, fixed_cost=50.0)
    # 50 + $3/ft × (10 m / 0.3048 m/ft = 32.8083990 ft) = 50 + 98.4251969 = 148.4251969
    assert book.price_upgrade(pipe, 10.0, quantity_units="si") == pytest.approx(148.4251969)
    job = Item(basis="fixed", fixed_cost=1350.0)
    # limiting case: a fixed price does not depend on the quantity
    assert book.price_upgrade(job, 0.0) == book.price_upgrade(job, 5000.0) == 1350.0
    # limiting case: no quantity costs just the fixed part
    assert book.price_upgrade(attic, 0.0) == 350.0
    for bad in (-1.0, math.nan, math.inf):
        with pytest.raises(ValueError, match="quantity"):
            book.price_upgrade(attic, bad)


@settings(max_examples=200, deadline=None)
@given(
    unit_cost=st.floats(0.01, 1e4),
    fixed=st.floats(0, 1e5),
    quantity_ft=st.floats(0, 1e5),
    basis=st.sampled_from(["per_area", "per_length"]),
    item_units=st.sampled_from(["ip", "si"]),
)
def test_price_does_not_depend_on_the_units_it_is_measured_in(
    unit_cost: float, fixed: float, quantity_ft: float, basis: str, item_units: str
) -> None:
    item = Item(basis=basis, units=item_units, unit_cost=unit_cost, fixed_cost=fixed)
    factor = FT2_M2 if basis == "per_area" else FT_M
    ip = book.price_upgrade(item, quantity_ft, quantity_units="ip")
    si = book.price_upgrade(item, quantity_ft * factor, quantity_units="si")
    assert si == pytest.approx(ip, rel=1e-9, abs=1e-9)
    assert ip >= fixed  # never below the fixed part


def test_apply_price_item_fills_cost_and_refuses_unsuitable_items() -> None:
    doc = {"surface": "attic", "assembly": {"layers": []}, "cost": {"fixed": 1, "per_area": 9},
           "rebate": 300}  # fmt: skip
    metric = Item(slug="loose-fill", units="si", unit_cost=10.0, fixed_cost=200.0)
    out = book.apply_price_item(doc, metric, kind="assembly", units="ip")
    # $10/m² = 10 × 0.09290304 = $0.9290304/ft²
    assert out["cost"] == {"fixed": 200.0, "per_area": pytest.approx(0.9290304)}
    assert out["rebate"] == 300 and out["price_item"] == "loose-fill"
    assert doc["cost"] == {"fixed": 1, "per_area": 9}  # the input is not changed
    sealing = {"cfm50_after": 2000, "cost": {"fixed": 900}}
    with pytest.raises(InputError, match="air sealing takes a price fixed price per job"):
        book.apply_price_item(sealing, Item(name="Loose fill"), kind="air_sealing", units="ip")
    fixed = Item(basis="fixed", fixed_cost=1200.0)
    out = book.apply_price_item(sealing, fixed, kind="air_sealing", units="si")
    assert out["cost"] == {"fixed": 1200.0}


# --- pages ----------------------------------------------------------------------------------------


def test_add_edit_delete_through_the_page(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    org_id = signed_in_org(app, client)
    assert client.post("/price-book", data=_form(), follow_redirects=False).status_code == 303
    (item,) = _items(app, org_id)
    assert (item.slug, item.basis, item.unit_cost, item.fixed_cost) == (
        "attic-blown-cellulose", "per_area", 2.0, 100.0,
    )  # fmt: skip
    page = client.get("/price-book").text
    assert "Attic: blown cellulose" in page and "$2.00 per ft²" in page
    changed = _form(unit_cost="2.40", units="si", notes="2026 season")
    r = client.post(f"/price-book/{item.id}", data=changed, follow_redirects=False)
    assert r.status_code == 303
    (item,) = _items(app, org_id)
    assert (item.unit_cost, item.units, item.notes, item.slug) == (
        2.4, "si", "2026 season", "attic-blown-cellulose",
    )  # fmt: skip
    r = client.post(f"/price-book/{item.id}/delete", follow_redirects=False)
    assert r.status_code == 303 and _items(app, org_id) == []


def test_validation_messages_keep_the_input(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    org_id = signed_in_org(app, client)
    cases = [
        (_form(name=" "), "give the item a name"),
        (_form(unit_cost="abc"), "&#39;abc&#39; is not a number"),
        (_form(unit_cost="0"), "a price per area needs its cost per unit"),
        (_form(basis="fixed", unit_cost="3"), "a fixed price has no unit cost"),
        (_form(basis="fixed", unit_cost="0", fixed_cost="0"), "a fixed-price item needs its price"),
        (_form(fixed_cost="-5"), "must be a number from 0 to 1,000,000,000"),
        (_form(basis="per_volume"), "choose how it is priced"),
        (_form(upgrade_type="roofing"), "choose what kind of work this prices"),
    ]
    for form, message in cases:
        r = client.post("/price-book", data=form)
        assert r.status_code == 422, form
        assert message in r.text, (message, form)
        assert 'aria-invalid="true"' in r.text
    r = client.post("/price-book", data=_form(unit_cost="abc"))
    assert 'value="abc"' in r.text  # what was typed stays in the field
    assert _items(app, org_id) == []


def test_example_rows_are_marked_and_added_once(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    org_id = signed_in_org(app, client)
    assert "Start from example rows" in client.get("/price-book").text
    client.post("/price-book/examples")
    client.post("/price-book/examples")
    items = _items(app, org_id)
    assert len(items) == len(book.EXAMPLE_ITEMS)
    assert all(i.notes == "example — replace with your own" for i in items)
    assert client.get("/price-book").text.count("example — replace with your own") >= len(items)


def test_another_firms_rows_are_not_found(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    signed_in_org(app, client)
    with app.state.session_factory() as s:
        other = Organization(name="Other pricing firm")
        s.add(other)
        s.flush()
        item = book.add_item(session=s, organization_id=other.id, name="Theirs",
                             upgrade_type="attic_fill", basis="per_area", unit_cost=1.0)  # fmt: skip
        s.commit()
        item_id = item.id
    assert "Theirs" not in client.get("/price-book").text
    assert client.post(f"/price-book/{item_id}", data=_form()).status_code == 404
    assert client.post(f"/price-book/{item_id}/delete").status_code == 404
    with app.state.session_factory() as s:
        assert s.get(PriceBookItem, item_id).unit_cost == 1.0  # type: ignore[union-attr]


def _attic_installed(app, house_id: int) -> float:  # type: ignore[no-untyped-def]
    with app.state.session_factory() as s:
        house = s.get(House, house_id)
        result = compute_house(
            house_document(house),  # type: ignore[arg-type]
            catalog=catalog_for(session=s, organization_id=house.organization_id),  # type: ignore[union-attr]
        )
    return next(u.installed_cost for u in result.upgrades if u.id == "attic-r49")


def test_fill_cost_from_the_price_book(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    org_id = signed_in_org(app, client)
    house_id = demo_house_for(app, org_id)
    # the demo's own price: 350 + 1.35 $/ft² × 860 ft² = 1511
    assert _attic_installed(app, house_id) == pytest.approx(1511.0)
    client.post("/price-book", data=_form())
    client.post("/price-book", data=_form(name="Whole-house air sealing", upgrade_type="air_sealing",
                                          basis="fixed", unit_cost="0", fixed_cost="1800"))  # fmt: skip
    with app.state.session_factory() as s:
        house = s.get(House, house_id)
        attic = next(u for u in house.upgrades if u.slug == "attic-r49")  # type: ignore[union-attr]
        sealing = next(u for u in house.upgrades if u.slug == "air-seal")  # type: ignore[union-attr]
        version = house.version  # type: ignore[union-attr]
    back = f"/houses/{house_id}/quote/attic-and-air"
    r = client.post(f"/houses/{house_id}/upgrades/{attic.id}/price-item",
                    data={"price_item": "attic-blown-cellulose", "version": str(version),
                          "back": back}, follow_redirects=False)  # fmt: skip
    assert r.status_code == 303 and r.headers["location"] == back
    # from the item: 100 + 2.00 $/ft² × 860 ft² = 100 + 1720 = 1820
    assert _attic_installed(app, house_id) == pytest.approx(1820.0)
    # the item's new price reaches the upgrade without filling again: 100 + 2.50 × 860 = 2250
    (item,) = [i for i in _items(app, org_id) if i.slug == "attic-blown-cellulose"]
    client.post(f"/price-book/{item.id}", data=_form(unit_cost="2.50"))
    assert _attic_installed(app, house_id) == pytest.approx(2250.0)
    # a per-area item does not fit air sealing: refused with a message, nothing saved
    r = client.post(f"/houses/{house_id}/upgrades/{sealing.id}/price-item",
                    data={"price_item": "attic-blown-cellulose", "back": back})  # fmt: skip
    assert r.status_code == 422 and "air sealing takes a price fixed price per job" in r.text
    # deleting the item writes its last price (2250) into the upgrade's own cost
    client.post(f"/price-book/{item.id}/delete")
    assert _attic_installed(app, house_id) == pytest.approx(2250.0)
    with app.state.session_factory() as s:
        kept = s.get(House, house_id).upgrades[0].document  # type: ignore[union-attr]
    assert "price_item" not in kept and kept["cost"] == {"fixed": 100.0, "per_area": 2.5}


def test_metric_item_on_an_ip_house_is_converted(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    org_id = signed_in_org(app, client)
    house_id = demo_house_for(app, org_id)
    client.post("/price-book", data=_form(name="Metric fill", units="si", unit_cost="20",
                                          fixed_cost="0"))  # fmt: skip
    with app.state.session_factory() as s:
        attic = s.scalars(select(House).where(House.id == house_id)).one().upgrades[0]
    client.post(f"/houses/{house_id}/upgrades/{attic.id}/price-item",
                data={"price_item": "metric-fill"})  # fmt: skip
    # $20/m² × (860 ft² × 0.09290304 m²/ft² = 79.8966144 m²) = $1597.932288
    assert _attic_installed(app, house_id) == pytest.approx(1597.932288, rel=1e-9)
