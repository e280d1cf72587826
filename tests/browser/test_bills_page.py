"""The Bills section of the demo house at 1024x768 and 390x844: the fit shown, the table of
periods usable, nothing wider than the screen, a wrong row marked through htmx and kept.

Screenshots of the section go to /tmp/shots/D/ (bills-tablet.png, bills-phone.png, and the
rejected row as bills-<size>-wrong-row.png).
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest

pytestmark = pytest.mark.browser
VIEWPORTS = {"tablet": (1024, 768), "phone": (390, 844)}
SHOTS = Path("/tmp/shots/D")
# elements of the section reaching past the screen's right edge (tables scroll in .table-wrap)
WIDE = """
() => [...document.querySelectorAll('#bills *')]
  .filter(e => e.getBoundingClientRect().right > window.innerWidth + 1 && !e.closest('.table-wrap'))
  .slice(0, 5).map(e => e.tagName + '.' + e.className + ' ' + (e.id || e.textContent.trim().slice(0, 30)))
"""


@pytest.mark.parametrize("size", list(VIEWPORTS))
def test_the_bills_section_shows_the_fit_and_keeps_a_wrong_row(
    browser, live_server: str, signed_in, size: str
) -> None:  # type: ignore[no-untyped-def]
    SHOTS.mkdir(parents=True, exist_ok=True)
    width, height = VIEWPORTS[size]
    page = browser.new_page(storage_state=signed_in, viewport={"width": width, "height": height})
    page.goto(live_server + "/houses")
    page.get_by_role("link", name=re.compile("Quillfeather")).first.click()
    page.goto(page.url.split("#")[0] + "#sec-bills")
    section = page.locator("#bills")
    section.scroll_into_view_if_needed()
    # the demo's two years of bills are fitted: base, slope, the Guideline 14 criteria, the ratio
    fit = section.locator(".bills-fit")
    assert "Base temperature" in fit.inner_text()
    assert "ASHRAE Guideline 14" in fit.inner_text()
    assert "Modelled vs bills" in fit.inner_text()
    assert "estimated read" in section.inner_text()  # the demo's estimated read, flagged
    assert page.evaluate(WIDE) == []
    section.screenshot(path=str(SHOTS / f"bills-{size}.png"))
    # a wrong date typed in the empty row: htmx swaps the section, the row kept with its message
    section.get_by_text("Edit the bills").click()  # the table is folded under the fit
    rows = section.locator("table.bill-rows tbody tr")
    empty = rows.count() - 1
    page.locator(f"#bp-{empty}-start").fill("13/45/2025")
    page.locator(f"#bp-{empty}-end").fill("2026-01-31")
    page.locator(f"#bp-{empty}-use").fill("120")
    page.get_by_role("button", name="Save bills").click()
    error = page.locator(f"#bp-{empty}-start-err")
    error.wait_for()
    assert "13 is no month" in error.inner_text()
    assert page.locator(f"#bp-{empty}-start").input_value() == "13/45/2025"
    assert page.locator(f"#bp-{empty}-start").get_attribute("aria-invalid") == "true"
    assert "every row is kept" in page.locator("#bills").inner_text()
    page.locator("#bills").screenshot(path=str(SHOTS / f"bills-{size}-wrong-row.png"))
    page.close()
