"""The homeowner's shared view: the savings matched to the bills, one range sentence per
package, and the plain sentence of what the figures rest on; every figure equals
POST /api/v1/calc/house's for the same document (with the compare page's ``uncertainty``).

Outside sources: the demo house's invented bills (server/services/demo_parts.py); the
rounding rule ($10 under $1,000, else $50) is the brief's, written out again in
tests/web/test_quote_calibrated.py.
"""

from __future__ import annotations

import html as markup
import re
from typing import Any

from fastapi.testclient import TestClient

from server.web.pages.compare import PAGE_UNCERTAINTY
from tests.web.test_quote_calibrated import _api, _document, _money, _rounded
from tests.web.test_sharing import demo_house_for, make_link, signed_in_org


def _card(page: str, option_id: str) -> str:
    match = re.search(rf'aria-labelledby="opt-{option_id}">(.*?)</article>', page, re.S)
    assert match, option_id
    return markup.unescape(match.group(1))


def _range_words(package: dict[str, Any], years: int) -> str:
    q = package["range"]["annual_savings"]
    share = package["range"]["probability_pays_back"]
    chance = (
        f"It pays back within {years} years in every trial run."
        if share == 1
        else f"{share:.0%} chance it pays back within {years} years."
    )
    return (
        f"8 in 10 chance the savings are between {_rounded(q['p10'])} and "
        f"{_rounded(q['p90'])} a year. {chance}"
    )


def test_shared_view_sentences_equal_calc_house(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    house_id = demo_house_for(app, signed_in_org(app, client))
    api = _api(client, _document(client, house_id))
    page = TestClient(app).get(f"/s/{make_link(app, house_id)}").text
    c = api["calibration"]
    assert f"predicted {c['model_heating_use']:,.0f} therms a year" in page
    assert f"your bills show {c['bills_heating_use']:,.0f} therms at typical weather" in page
    for package in api["packages"]:
        card = _card(page, package["id"])
        matched = package["calibrated"]
        assert f"Saves about {_money(matched['annual_savings'])} a year" in card
        assert f"the model alone says {_money(package['annual_savings'])} a year" in card
        assert f"about {matched['simple_payback_years']:,.1f} years" in card
        assert _range_words(package, api["analysis_years"]) in card
    # the annual-cost chart says the costs the cards say: the heating cost × ratio + the rest
    found = api["as_found"]
    now = found["total_cost"] - found["heating_cost"] * (1 - c["ratio"])
    assert f"${now:,.0f}/yr" in page and f"${found['total_cost']:,.0f}/yr" not in page
    for package in api["packages"]:
        after = now - package["calibrated"]["annual_savings"]
        assert f"${after:,.0f}/yr" in page
    # cautions and the estimates line stay (DESIGN.md §7)
    assert "combustion safety" in page and "vermiculite" in page
    assert "locally adopted code" in page and "licensed professionals" in page


def test_shared_selection_gets_its_range_sentence(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    house_id = demo_house_for(app, signed_in_org(app, client))
    doc = _document(client, house_id)
    picked = ["attic-r49", "air-seal"]
    extra = {"id": "your-selection", "name": "Your selection", "upgrades": picked}
    api = _api(client, {**doc, "packages": [*doc["packages"], extra]})
    mine = next(p for p in api["packages"] if p["id"] == "your-selection")
    fragment = TestClient(app).get(f"/s/{make_link(app, house_id)}", params={"pick": picked},
                                   headers={"HX-Request": "true"}).text  # fmt: skip
    selection = markup.unescape(fragment.split('id="selection"', 1)[1])
    assert _range_words(mine, api["analysis_years"]) in selection
    # the same two upgrades as the saved "Attic + air sealing": the same range on the same draws
    saved = next(p for p in api["packages"] if p["id"] == "attic-and-air")
    assert mine["range"]["annual_savings"] == saved["range"]["annual_savings"]


def test_shared_view_without_bills_says_the_figures_are_modelled(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    house_id = demo_house_for(app, signed_in_org(app, client))
    doc = _document(client, house_id)
    doc.pop("bills")
    created = client.post("/api/v1/houses", json={**doc, "name": "No bills"})
    assert created.status_code == 201, created.text
    bare = created.json()["id"]
    api = client.post("/api/v1/calc/house",
                      json={**_document(client, bare), "uncertainty": PAGE_UNCERTAINTY}).json()  # fmt: skip
    page = markup.unescape(TestClient(app).get(f"/s/{make_link(app, bare)}").text)
    assert "they have not been checked against the house's energy bills" in page
    assert "Matched to your bills" not in page
    assert f"${api['as_found']['total_cost']:,.0f}/yr" in page  # the modelled cost chart
    for package in api["packages"]:
        card = _card(page, package["id"])
        assert f"Saves about {_money(package['annual_savings'])} a year" in card
        assert _range_words(package, api["analysis_years"]) in card
