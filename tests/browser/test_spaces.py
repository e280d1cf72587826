"""The spaces card in a browser: add a crawlspace (htmx swaps the card), see b, refuse a delete.

Screenshots of the card at 1024x768 and 390x844 go to /tmp/shots/B/ (look at them).
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest
from sqlalchemy import create_engine, text

pytestmark = pytest.mark.browser
VIEWPORTS = {"tablet": (1024, 768), "phone": (390, 844)}
SHOTS = Path("/tmp/shots/B")


def _face(live_db_url: str, house_id: str, name: str, space_id: str) -> None:
    """What the Surface page's picker stores: the named surface faces the space."""
    engine = create_engine(live_db_url)
    with engine.begin() as conn:
        conn.execute(
            text(
                "update surfaces set details = json_set(coalesce(details, '{}'), '$.adjacent', :s)"
                " where house_id = :h and name = :n"
            ),
            {"s": space_id, "h": int(house_id), "n": name},
        )
    engine.dispose()


def test_add_a_crawlspace_and_see_its_b(
    browser, live_server: str, signed_in, live_db_url: str
) -> None:  # type: ignore[no-untyped-def]
    SHOTS.mkdir(parents=True, exist_ok=True)
    page = browser.new_page(storage_state=signed_in, viewport={"width": 1024, "height": 768})
    page.goto(live_server + "/houses")
    page.get_by_role("link", name=re.compile("Quillfeather")).first.click()
    house_url = page.url.split("#")[0]
    house_id = house_url.rstrip("/").rsplit("/", 1)[1]
    card = page.locator("#spaces")
    card.get_by_text("Add an unheated space").click()
    new = card.locator("#space-new")
    new.get_by_label("Kind").select_option("crawlspace")
    new.get_by_label("Name optional").fill("Crawlspace under kitchen")
    card.locator("#sp-new-part-0-name").fill("Block walls")
    card.locator("#sp-new-part-0-area").fill("300")
    card.locator("#sp-new-part-0-u").fill("0.5")
    card.locator("#sp-new-part-1-typical").select_option("rim-2x10-empty")
    card.locator("#sp-new-part-1-area").fill("120")
    new.get_by_label("Air volume ft³").fill("4000")
    new.get_by_label("How airtight is it?").select_option("iso-3")
    new.get_by_role("button", name="Add space").click()
    page.locator("#spaces .status", has_text="Space added.").wait_for()
    added = page.locator("#space-crawlspace-under-kitchen")
    assert "No surface faces it yet" in added.inner_text()  # the card says so

    _face(live_db_url, house_id, "Floor over crawlspace", "crawlspace-under-kitchen")
    page.reload()
    added = page.locator("#space-crawlspace-under-kitchen")
    body = added.inner_text()
    assert "Floor over crawlspace" in body and "b, as found" in body
    b = float(added.locator(".space-figures strong").inner_text())
    assert 0 < b < 1  # the floor's H_iu now counts: b below outdoors' 1

    for size, (w, h) in VIEWPORTS.items():
        page.set_viewport_size({"width": w, "height": h})
        page.locator("#spaces").screenshot(path=str(SHOTS / f"spaces-{size}.png"))

    page.set_viewport_size({"width": 1024, "height": 768})
    added.get_by_role("button", name="Delete Crawlspace under kitchen").click()
    refused = page.locator("#spaces .cautions")
    refused.wait_for()
    assert "Floor over crawlspace" in refused.inner_text()
    refused.screenshot(path=str(SHOTS / "spaces-delete-refused.png"))
    page.close()
