"""Real browser, phone size: the homeowner opens /s/<token>, ticks an upgrade, the figures change."""

from __future__ import annotations

import pytest
from sqlalchemy import select

from server.db import make_engine, make_session_factory, session_scope
from server.models import House
from server.services.comparison import compute_house
from server.services.demo import DEMO_LABEL
from server.services.house_document import house_document
from server.services.library import catalog_for
from server.services.sharing import create_link

pytestmark = pytest.mark.browser
ATTIC = "Attic: blow R-47 cellulose over the joists"


def _link_and_expected(live_db_url: str) -> tuple[str, int, float]:
    """A fresh link to the demo house, its version, and the attic-alone first-year savings."""
    engine = make_engine(live_db_url)
    with session_scope(make_session_factory(engine)) as s:
        house = s.scalars(select(House).where(House.label == DEMO_LABEL)).one()
        _link, token = create_link(session=s, organization_id=house.organization_id,
                                   house_id=house.id, label="phone test")  # fmt: skip
        catalog = catalog_for(session=s, organization_id=house.organization_id)
        result = compute_house(house_document(house, extra_package=["attic-r49"]), catalog=catalog)
        mine = next(p for p in result.packages if p.id == "your-selection")
        # the demo house has bills: the shared view leads with the calibrated savings
        savings = mine.calibrated.annual_savings if mine.calibrated else mine.annual_savings
        version = house.version
    engine.dispose()
    return token, version, savings


def _version(live_db_url: str) -> int:
    engine = make_engine(live_db_url)
    with session_scope(make_session_factory(engine)) as s:
        version = s.scalars(select(House.version).where(House.label == DEMO_LABEL)).one()
    engine.dispose()
    return version


def test_shared_view_on_a_phone(browser, live_server: str, live_db_url: str, shot_dir) -> None:  # type: ignore[no-untyped-def]
    token, version, savings = _link_and_expected(live_db_url)
    page = browser.new_page(viewport={"width": 390, "height": 844})  # nobody signed in
    response = page.goto(f"{live_server}/s/{token}")
    assert response is not None and response.status == 200
    assert response.headers["referrer-policy"] == "no-referrer"
    assert "Tick one or more upgrades" in page.locator("#selection").inner_text()
    page.get_by_label(ATTIC).check()
    page.wait_for_selector("#selection h3:has-text('Your selection')")
    after = page.locator("#selection").inner_text()
    assert f"Saves about ${savings:,.0f} a year" in after  # compute_house's figure
    assert page.get_by_label(ATTIC).is_checked()  # the swapped fragment keeps the tick
    # fits the phone: no sideways scrolling of the page itself
    assert page.evaluate("document.documentElement.scrollWidth") <= 390
    assert page.locator("a[href^='/houses'], form[method='post']").count() == 0
    page.screenshot(path=str(shot_dir / "shared-phone.png"), full_page=True)
    page.close()
    assert _version(live_db_url) == version  # ticking saved nothing
