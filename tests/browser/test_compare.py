"""Real browser: the compare page, ticking upgrades builds a package without a reload."""

from __future__ import annotations

import re

import pytest

pytestmark = pytest.mark.browser


def test_compare_toggle(browser, live_server: str, signed_in, shot_dir) -> None:  # type: ignore[no-untyped-def]
    page = browser.new_page(viewport={"width": 1024, "height": 768}, storage_state=signed_in)
    page.goto(live_server + "/houses")
    page.get_by_role("link", name=re.compile("Quillfeather")).first.click()
    page.get_by_role("link", name=re.compile("Compare upgrades")).click()
    assert page.locator("table.compare thead th").count() == 4  # label, as found, 2 packages
    page.get_by_label("Attic: blow R-47 cellulose over the joists").check()
    page.wait_for_selector("th:has-text('Your selection')")
    assert page.locator("table.compare thead th").count() == 5
    page.screenshot(path=str(shot_dir / "compare-tablet.png"), full_page=True)
    page.set_viewport_size({"width": 390, "height": 844})
    page.screenshot(path=str(shot_dir / "compare-phone.png"), full_page=True)
    page.close()
