"""Quote page: its figures are compute_house's for the package; cautions for what it touches."""

from __future__ import annotations

import re

import pytest
from fastapi.testclient import TestClient

from server.models import House, Organization
from server.services.comparison import compute_house
from server.services.house_document import house_document
from server.services.houses import create_house
from server.services.library import catalog_for
from tests.web.test_sharing import demo_house_for, signed_in_org


def _result(app, house_id: int):  # type: ignore[no-untyped-def]
    with app.state.session_factory() as s:
        house = s.get(House, house_id)
        return compute_house(
            house_document(house),  # type: ignore[arg-type]
            catalog=catalog_for(session=s, organization_id=house.organization_id),  # type: ignore[union-attr]
        )


def _dd(page: str, element_id: str) -> str:
    match = re.search(rf'id="{element_id}"[^>]*>([^<]*)<', page)  # other attributes may follow
    assert match, element_id
    return match.group(1)


def test_quote_figures_are_compute_house_figures(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    house_id = demo_house_for(app, signed_in_org(app, client))
    result = _result(app, house_id)
    package = next(p for p in result.packages if p.id == "attic-and-air")
    page = client.get(f"/houses/{house_id}/quote/attic-and-air")
    assert page.status_code == 200
    html = page.text
    assert _dd(html, "total-installed") == f"${package.installed_cost:,.0f}"
    assert _dd(html, "total-rebates") == f"${package.rebates:,.0f}"
    assert _dd(html, "total-net") == _dd(html, "q-net") == f"${package.net_cost:,.0f}"
    # the demo house has bills: the quote leads with the calibrated figures, the modelled
    # ones beside (tests/web/test_quote_calibrated.py checks them against calc/house)
    matched = package.calibrated
    assert matched is not None
    assert _dd(html, "q-savings") == f"${matched.annual_savings:,.0f}"
    assert _dd(html, "q-savings-modelled") == f"${package.annual_savings:,.0f}"
    assert _dd(html, "q-payback") == f"{matched.simple_payback_years:,.1f} years"
    assert _dd(html, "q-payback-modelled") == f"{package.simple_payback_years:,.1f} years"
    assert _dd(html, "q-npv") == f"${matched.npv:,.0f}"
    assert _dd(html, "q-sir") == f"{matched.sir:,.2f}"
    assert f"${package.monthly_loan_payment:,.0f} a month" in html
    assert f"${matched.monthly_savings:,.0f} a month" in html
    # hand-worked from the demo data: attic 350 + 1.35 $/ft² × 860 ft² = 1511, air sealing 1350;
    # total 2861; rebates 300 + 250 = 550; net 2861 - 550 = 2311
    assert (package.installed_cost, package.rebates, package.net_cost) == pytest.approx(
        (2861.0, 550.0, 2311.0)
    )
    assert "$1,511" in html and "$1,350" in html and "860 ft²" in html
    # header: firm, house, date, reference
    with app.state.session_factory() as s:
        house = s.get(House, house_id)
        firm = s.get(Organization, house.organization_id).name  # type: ignore[union-attr]
        reference = f"Q-{house_id}-{house.version}-ATTIC-AND-AIR"  # type: ignore[union-attr]
    assert firm in html and reference in html and "Demo" in html
    # assumptions and sources come from the same result
    assert result.fuel.energy_source in html and "NIST Handbook 135" in html


def test_quote_cautions_are_for_what_the_package_touches(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    house_id = demo_house_for(app, signed_in_org(app, client))
    attic_air = client.get(f"/houses/{house_id}/quote/attic-and-air").text
    assert "vermiculite" in attic_air and "knob-and-tube" in attic_air  # the attic
    assert "combustion safety" in attic_air  # the air sealing
    assert "dense-packing" not in attic_air  # walls are not part of this package
    assert "Foam plastics" not in attic_air
    whole = client.get(f"/houses/{house_id}/quote/whole-house").text
    assert "dense-packing" in whole and "Foam plastics" in whole  # walls, rim joist
    for page in (attic_air, whole):
        assert "locally adopted code" in page and "licensed professionals" in page
        assert "estimates" in page


def test_quote_prints_with_its_own_stylesheet_and_no_inline_styles(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    house_id = demo_house_for(app, signed_in_org(app, client))
    html = client.get(f"/houses/{house_id}/quote/attic-and-air").text
    assert '<link rel="stylesheet" href="/static/print.css" media="print">' in html
    assert "style=" not in html
    assert client.get("/static/print.css").status_code == 200


def test_quote_unknown_package_or_other_firm_is_404(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    house_id = demo_house_for(app, signed_in_org(app, client))
    assert client.get(f"/houses/{house_id}/quote/no-such-package").status_code == 404
    with app.state.session_factory() as s:
        other = Organization(name="Quote test other firm")
        s.add(other)
        s.flush()
        theirs = create_house(session=s, organization_id=other.id, label="Theirs").id
        s.commit()
    assert client.get(f"/houses/{theirs}/quote/attic-and-air").status_code == 404


def test_compare_page_links_each_package_to_its_quote(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    house_id = demo_house_for(app, signed_in_org(app, client))
    page = client.get(f"/houses/{house_id}/compare", params={"pick": "air-seal"}).text
    assert f'href="/houses/{house_id}/quote/attic-and-air"' in page
    assert f'href="/houses/{house_id}/quote/whole-house"' in page
    assert "/quote/your-selection" not in page


def test_pipe_insulation_quote_priced_per_length(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    from server.services import houses as svc
    from server.services import price_book as book
    from server.services import upgrades as ups

    house_id = demo_house_for(app, signed_in_org(app, client))
    with app.state.session_factory() as s:
        house = s.get(House, house_id)
        run = svc.add_pipe_run(session=s, house=house, name="Basement hot water", length=40.0,  # type: ignore[arg-type]
                               pipe={"pipe_outer_diameter": 0.875, "layers": [],
                                     "fluid_temperature": 130.0, "ambient_temperature": 60.0},
                               hours_per_year=3000.0, expected_version=None)  # fmt: skip
        up = ups.add_pipe_insulation(session=s, house=house, surface=run, name="Pipe sleeves",  # type: ignore[arg-type]
                                     thickness=0.75, conductivity=0.25, expected_version=None)  # fmt: skip
        item = book.add_item(session=s, organization_id=house.organization_id, name="Sleeves",  # type: ignore[union-attr]
                             upgrade_type="pipe_insulation", basis="per_length", units="si",
                             unit_cost=10.0, fixed_cost=40.0)  # fmt: skip
        up.document = book.apply_price_item(up.document, item, kind=up.kind, units="ip")
        package = ups.add_package(session=s, house=house, name="Pipes only",  # type: ignore[arg-type]
                                  upgrade_slugs=[up.slug], expected_version=None)  # fmt: skip
        s.commit()
        slug = package.slug
    html = client.get(f"/houses/{house_id}/quote/{slug}").text
    # 40 + $10/m × (40 ft × 0.3048 m/ft = 12.192 m) = 40 + 121.92 = $161.92 -> "$162"
    assert _dd(html, "total-installed") == "$162"
    assert "40 ft" in html and "Keep pipe insulation clear of flue pipes" in html
    assert "Priced from the price book: Sleeves, $3.05 per ft + $40 fixed" in html  # 10 × 0.3048
