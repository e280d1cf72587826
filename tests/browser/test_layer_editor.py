"""Real browser: edit a layer on the Surface page and see R change (htmx, no reload)."""

from __future__ import annotations

import re

import pytest
from playwright.sync_api import expect

pytestmark = pytest.mark.browser


def _open_demo_surface(page, base: str, name: str) -> None:  # type: ignore[no-untyped-def]
    page.goto(base + "/houses")
    page.get_by_role("link", name=re.compile("Quillfeather")).first.click()
    page.get_by_role("link", name=name, exact=True).click()


def test_edit_layer_changes_r(browser, live_server: str, signed_in, shot_dir) -> None:  # type: ignore[no-untyped-def]
    page = browser.new_page(viewport={"width": 1024, "height": 768}, storage_state=signed_in)
    _open_demo_surface(page, live_server, "Walls, first floor")
    total = page.locator("#r-total")
    # Demo wall: empty 2x4 cavities (cavity) → by parallel path:
    # cavity path 0.85 + 0.81 + 0.94 + 1.0 + 0.45 = 4.05 ... with framing 3.5/0.8 = 4.375 → 7.425;
    # 1 / (0.75/4.05 + 0.25/7.425) = 1 / (0.1852 + 0.0337) = 4.57
    assert total.inner_text() == "R-4.6"
    # Dense-pack the cavity: type into the cavity field (change → htmx post → swap)
    field = page.locator("#l2-cavity_r")
    field.fill("12.6")
    field.press("Tab")
    expect(page.locator("#r-total")).not_to_have_text("R-4.6")  # no eval: the CSP forbids it
    # cavity path 4.05 − 1.0 + 12.6 = 15.65; 1 / (0.75/15.65 + 0.0337) = 1 / (0.04792 + 0.03367) = 12.26
    assert total.inner_text() == "R-12.3"
    page.screenshot(path=str(shot_dir / "surface-edited-tablet.png"), full_page=True)
    # Reload: the edit was saved
    page.reload()
    assert page.locator("#r-total").inner_text() == "R-12.3"
    # A bad entry is kept as typed, marked beside the field, and nothing is saved
    field = page.locator("#l2-cavity_r")
    field.fill("twelve")
    field.press("Tab")
    page.wait_for_selector("#l2-cavity_r-err")
    assert page.locator("#l2-cavity_r").input_value() == "twelve"
    assert "is not a number" in page.locator("#l2-cavity_r-err").inner_text()
    page.reload()
    assert page.locator("#r-total").inner_text() == "R-12.3"
    page.close()


def test_add_layer_with_button_and_phone_layout(
    browser, live_server: str, signed_in, shot_dir
) -> None:  # type: ignore[no-untyped-def]
    page = browser.new_page(viewport={"width": 390, "height": 844}, storage_state=signed_in)
    _open_demo_surface(page, live_server, "Rim joist")
    before = page.locator(".layer").count()
    page.get_by_role("button", name="+ Add layer").click()
    expect(page.locator(".layer")).to_have_count(before + 1)
    new_r = page.locator(f"#l{before}-r")
    new_r.fill("5")
    new_r.press("Tab")
    page.wait_for_selector("text=Saved.")
    # Rim joist R-4.5 (hand: 0.85 + 0.81 + 0.94 + 1.5/0.8 = 4.475) + R-5 foam = R-9.5
    expect(page.locator("#r-total")).to_have_text("R-9.5")
    # Touch targets: every button and input is at least 44 px tall
    heights = page.eval_on_selector_all(
        "button:not([disabled]), input:not([type=hidden]):not([type=radio]), select",
        "els => els.filter(e => e.offsetParent !== null).map(e => e.getBoundingClientRect().height)",
    )
    assert heights and min(heights) >= 44
    page.screenshot(path=str(shot_dir / "surface-phone.png"), full_page=True)
    page.close()
