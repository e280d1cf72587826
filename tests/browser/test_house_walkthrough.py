"""Real browser: the House page as one walk-through (issue 17, point 3).

The section bar's links reach each section below the sticky bar, its badges say what is left
to enter, and two htmx saves in two different cards (a settings section, then a systems card)
both go through: the second carries the version the first one made (static/app.js reads
``data-house-version`` of the swapped block), so it is not refused as someone else's edit.
Each test makes its own house, so nothing is shared with the demo house other tests edit.
"""

from __future__ import annotations

import itertools
import re
import time

import pytest
from playwright.sync_api import expect

pytestmark = pytest.mark.browser

_names = itertools.count(1)
SECTIONS = ("house", "envelope", "air", "bills", "upgrades", "share")


def _new_house(browser, base: str, signed_in, viewport):  # type: ignore[no-untyped-def]
    page = browser.new_page(viewport=viewport, storage_state=signed_in)
    page.goto(base + "/houses")
    page.locator("#label").fill(f"Walk-through {next(_names)} ({time.time_ns()})")
    page.get_by_role("button", name="Create house").click()
    page.wait_for_url(re.compile(r"/houses/\d+$"))
    return page


@pytest.mark.parametrize(
    "viewport", [{"width": 1024, "height": 768}, {"width": 390, "height": 844}]
)
def test_section_bar_reaches_each_section_and_shows_badges(
    browser, live_server, signed_in, viewport
) -> None:  # type: ignore[no-untyped-def]
    page = _new_house(browser, live_server, signed_in, viewport)
    bar = page.locator("nav.section-bar")
    # a new house: no climate, no surface, no blower door, no bills, no upgrade
    expected = {"house": "climate", "envelope": "add", "air": "none", "bills": "none",
                "upgrades": "0"}  # fmt: skip
    for key, badge in expected.items():
        expect(bar.locator(f'a[href="#sec-{key}"] .todo')).to_have_text(badge)
    expect(bar.locator('a[href="#sec-share"] .todo')).to_have_count(0)
    for key in SECTIONS:
        link = bar.locator(f'a[href="#sec-{key}"]')
        link.scroll_into_view_if_needed()
        link.click()
        heading = page.locator(f"#sec-{key} h2").first
        expect(heading).to_be_visible()
        page.wait_for_function(
            "id => Math.abs(document.getElementById(id).getBoundingClientRect().top) < 90"
            " || window.scrollY + innerHeight >= document.documentElement.scrollHeight - 2",
            arg=f"sec-{key}",
        )
        bar_box, head_box = bar.bounding_box(), heading.bounding_box()
        assert bar_box is not None and head_box is not None
        # scrolled to it (or to the page's end, for the last), heading below the sticky bar (not under it) and on the screen
        assert head_box["y"] >= bar_box["y"] + bar_box["height"] - 1, key
        assert head_box["y"] + head_box["height"] <= viewport["height"], key
    page.close()


def test_a_settings_save_then_a_systems_save_give_no_conflict(
    browser, live_server, signed_in
) -> None:  # type: ignore[no-untyped-def]
    page = _new_house(browser, live_server, signed_in, {"width": 1024, "height": 768})
    answers: list[int] = []
    page.on("response", lambda r: answers.append(r.status) if r.request.method == "POST" else None)
    for card in ("#set-heating", "#card-design", "#set-air_leakage"):  # open the folded cards
        page.locator(f"{card} details").first.evaluate("d => { d.open = true; }")
    page.locator("#set-heating-fuel").select_option("natural_gas")
    page.locator("#set-heating-efficiency").fill("0.8")
    page.locator("#set-heating-price").fill("1.5")
    page.get_by_role("button", name="Save heating system").click()
    expect(page.locator("#settings .status")).to_have_text("Heating system saved.")
    # the systems block was not swapped: its forms now carry the new version all the same
    # (app.js passes the version on once the swap has settled, a moment after the status shows)
    for _ in range(100):
        versions = page.locator("form input[name=version]").evaluate_all(
            "els => els.map(e => e.value)"
        )
        if len(set(versions)) == 1:
            break
        page.wait_for_timeout(50)
    assert len(set(versions)) == 1, versions
    page.locator("#sys-design-output_capacity").fill("60000")
    page.get_by_role("button", name="Save design load and equipment").click()
    expect(page.locator("#systems .status")).to_have_text("Design load and equipment saved.")
    expect(page.locator("#systems [role=alert]")).to_have_count(0)
    # and a third save in yet another block (air leakage, its own target) goes through too
    page.locator("#set-air_leakage-cfm50").fill("2400")
    page.locator("#set-air_leakage-volume").fill("12000")
    page.get_by_role("button", name="Save air leakage").click()
    expect(page.locator("#air .status")).to_have_text("Air leakage saved.")
    assert answers == [200, 200, 200], answers  # htmx answers 200 with the fragment; no 409
    page.reload()
    expect(page.locator("#sys-design-output_capacity")).to_have_value("60000")
    expect(page.locator('nav.section-bar a[href="#sec-air"] .todo')).to_have_count(0)
    page.close()
