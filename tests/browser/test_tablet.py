"""Tablet-first checks at 1024x768 and 390x844: targets, labels, no sideways scroll, offline saves.

Screenshots of every page at both sizes are kept in test-artifacts/ (look at them).
"""

from __future__ import annotations

import re

import pytest

playwright_api = pytest.importorskip("playwright.sync_api")
expect = playwright_api.expect

pytestmark = pytest.mark.browser
VIEWPORTS = {"tablet": (1024, 768), "phone": (390, 844)}

# visible controls under 44 px tall (WCAG 2.5.5 target size; common practice for gloved hands)
SMALL_TARGETS = """
() => [...document.querySelectorAll('button, input:not([type=hidden]), select, a.row-link, a.button-link, summary')]
  .filter(e => e.offsetParent !== null)
  .filter(e => !['checkbox', 'radio', 'file'].includes(e.type))
  .filter(e => e.getBoundingClientRect().height < 44)
  .map(e => (e.id || e.name || e.textContent.trim()).slice(0, 40))
"""
# form controls without an accessible name (label element, aria-label or aria-labelledby)
UNLABELLED = """
() => [...document.querySelectorAll('input:not([type=hidden]), select, textarea')]
  .filter(e => !(e.labels && e.labels.length) && !e.getAttribute('aria-label') && !e.getAttribute('aria-labelledby'))
  .map(e => e.name || e.id)
"""
OVERFLOW = "() => document.scrollingElement.scrollWidth - window.innerWidth"
WIDE = """
() => [...document.querySelectorAll('body *')]
  .filter(e => e.getBoundingClientRect().right > window.innerWidth + 1 && !e.closest('.table-wrap'))
  .slice(0, 3).map(e => e.tagName + '.' + e.className + ' ' + (e.id || e.textContent.trim().slice(0, 30)))
  .concat([...document.querySelectorAll('*')].filter(e => e.scrollWidth > window.innerWidth + 1)
    .slice(0, 6).map(e => 'wide:' + e.tagName + '.' + e.className + ' ' + e.scrollWidth + '/' + getComputedStyle(e).overflowX))
"""


def _pages(page, base: str) -> dict[str, str]:  # type: ignore[no-untyped-def]
    page.goto(base + "/houses")
    page.get_by_role("link", name=re.compile("Quillfeather")).first.click()
    house = page.url.split("#")[0]
    surface = page.get_by_role("link", name="Walls, first floor").get_attribute("href")
    upgrade = page.locator("#upgrades a.row-link").first.get_attribute("href")
    return {
        "houses": "/houses", "house": house.removeprefix(base), "surface": surface,
        "upgrade": upgrade, "compare": house.removeprefix(base) + "/compare",
        "library": "/library", "pipes": "/tools/pipe", "account": "/account",
    }  # fmt: skip


@pytest.mark.parametrize("size", list(VIEWPORTS))
def test_pages_fit_and_have_big_labelled_targets(
    browser, live_server: str, signed_in, shot_dir, size: str
) -> None:  # type: ignore[no-untyped-def]
    width, height = VIEWPORTS[size]
    page = browser.new_page(storage_state=signed_in, viewport={"width": width, "height": height})
    problems: list[str] = []
    for name, path in _pages(page, live_server).items():
        page.goto(live_server + path)
        page.screenshot(path=str(shot_dir / f"{name}-{size}.png"), full_page=True)
        small = page.evaluate(SMALL_TARGETS)
        unlabelled = page.evaluate(UNLABELLED)
        overflow = page.evaluate(OVERFLOW)
        if small:
            problems.append(f"{name}: targets under 44 px: {small[:5]}")
        if unlabelled:
            problems.append(f"{name}: controls without a label: {unlabelled[:5]}")
        if overflow > 1:
            problems.append(f"{name}: page scrolls sideways by {overflow}px: {page.evaluate(WIDE)}")
    page.close()
    assert not problems, "\n".join(problems)


# the smallest chart text as drawn: font size in the SVG's units x drawn width / viewBox width
CHART_TEXT_PX = """
() => [...document.querySelectorAll('figure svg')].filter(s => s.getBoundingClientRect().width > 0)
  .map(s => {
    const scale = s.getBoundingClientRect().width / s.viewBox.baseVal.width;
    const sizes = [...s.querySelectorAll('text')].map(t => parseFloat(getComputedStyle(t).fontSize));
    return Math.min(...sizes) * scale;
  })
"""


@pytest.mark.parametrize("size", list(VIEWPORTS))
def test_chart_text_is_readable_at_both_sizes(
    browser, live_server: str, signed_in, size: str
) -> None:  # type: ignore[no-untyped-def]
    # 11 px is the smallest chart text we accept on a tablet held at arm's length (common
    # practice for labels; body text is 16 px). Before the narrow layouts, a phone drew it at
    # about 6.6 px.
    width, height = VIEWPORTS[size]
    page = browser.new_page(storage_state=signed_in, viewport={"width": width, "height": height})
    page.goto(live_server + _pages(page, live_server)["compare"])
    sizes = page.evaluate(CHART_TEXT_PX)
    page.close()
    assert len(sizes) == 3, sizes  # one layout of each chart shows, never both
    assert min(sizes) >= 11, sizes


def test_edit_survives_a_dropped_connection(browser, live_server: str, signed_in) -> None:  # type: ignore[no-untyped-def]
    context = browser.new_context(storage_state=signed_in, viewport={"width": 1024, "height": 768})
    page = context.new_page()
    paths = _pages(page, live_server)
    page.goto(live_server + paths["surface"])
    context.set_offline(True)
    field = page.locator("#l0-name")
    field.fill("siding (edited offline)")
    field.press("Tab")
    banner = page.locator("#net-status")
    banner.wait_for(state="visible")
    assert "No connection" in banner.inner_text()
    outbox = page.locator("#outbox-status")
    expect(outbox).to_have_attribute("data-waiting", "1")
    assert "1 change waits to be sent (no connection)" in outbox.inner_text()  # kept on the tablet
    assert page.locator("#l0-name").input_value() == "siding (edited offline)"  # kept on the page
    context.set_offline(False)
    banner.wait_for(state="hidden", timeout=15000)
    expect(outbox).to_have_attribute("data-waiting", "0", timeout=15000)
    assert "All changes sent" in outbox.inner_text()
    page.reload()
    assert page.locator("#l0-name").input_value() == "siding (edited offline)"  # the outbox sent it
    context.close()
