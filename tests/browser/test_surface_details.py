"""Real browser: a slab's ground inputs and a window's U, SHGC and facing, typed on the Surface
page, change the House page's envelope table (plain forms: post, redirect, reload).

Slab, US units: 1000 ft², exposed perimeter 130 ft, 8 in walls, clay or silt (λ 1.5 W/(m·K),
ISO 13370's table of ground properties, from memory), the new surface's R-1 layer as R_f. In SI:
A = 92.903 m², P = 39.624 m, w = 0.2032 m, R_f = 0.17611 m²·K/W:
  B' = A / (0.5 P) = 4.6892 m;  d_t = 0.2032 + 1.5 (0.17 + 0.17611 + 0.04) = 0.78237 m (< B')
  U = 2·1.5 / (π·4.6892 + 0.78237) · ln(π·4.6892 / 0.78237 + 1)
    = 0.57764 W/(m²·K) = 0.10173 Btu/(h·ft²·°F)
  (÷ 5.678263, NIST SP 811), shown as 0.102.
"""

from __future__ import annotations

import re

import pytest

from tests.conftest import unfold

pytestmark = pytest.mark.browser


def _row(page, name: str) -> str:  # type: ignore[no-untyped-def]
    return str(page.locator("tr", has=page.get_by_role("link", name=name, exact=True)).inner_text())


def _add(page, base: str, house_url: str, kind: str, name: str, area: str) -> None:  # type: ignore[no-untyped-def]
    page.goto(house_url)
    unfold(page.locator("details.add-surface"))
    page.locator("#kind").select_option(kind)
    page.locator("#name").fill(name)
    page.locator("#area").fill(area)
    page.get_by_role("button", name="Add surface").click()
    page.wait_for_url(re.compile(r".*/surfaces/\d+$"))


def test_slab_and_window_details_change_the_envelope_table(
    browser, live_server: str, signed_in, shot_dir
) -> None:  # type: ignore[no-untyped-def]
    page = browser.new_page(viewport={"width": 1024, "height": 768}, storage_state=signed_in)
    page.goto(live_server + "/houses")
    page.get_by_role("link", name=re.compile("Quillfeather")).first.click()
    house_url = page.url.split("#")[0]

    _add(page, live_server, house_url, "slab", "Garage slab test", "1000")
    slab_url = page.url
    page.goto(house_url)
    before = _row(page, "Garage slab test")
    assert "Outdoors" in before  # no ground inputs yet: counted against outdoor air
    page.goto(slab_url)
    page.locator("#d-g_exposed_perimeter").fill("130")
    page.locator("#d-g_wall_thickness").fill('8"')
    page.locator("#d-g_soil").select_option("clay_silt")
    page.get_by_role("button", name="Save details").click()
    page.wait_for_url(re.compile(r".*/surfaces/\d+(#details)?$"))
    assert "ground U 0.102 Btu/(h·ft²·°F)" in page.locator(".figures").inner_text()
    page.screenshot(path=str(shot_dir / "surface-slab-details-tablet.png"), full_page=True)
    page.goto(house_url)
    after = _row(page, "Garage slab test")
    assert "Ground" in after and "0.102" in after and after != before
    assert "101.7" in after  # UA = 0.1017 × 1000 ft²

    _add(page, live_server, house_url, "window", "South window test", "15")
    page.locator("#d-u").fill("0.30")
    page.locator("#d-w_shgc").fill("0.40")
    page.locator("#d-w_orientation").select_option("S")
    page.get_by_role("button", name="Save details").click()
    page.wait_for_url(re.compile(r".*/surfaces/\d+(#details)?$"))
    page.screenshot(path=str(shot_dir / "surface-window-details-tablet.png"), full_page=True)
    assert page.locator("#d-w_shgc").input_value() == "0.4"
    assert page.locator("#d-w_orientation").input_value() == "S"
    page.goto(house_url)
    row = _row(page, "South window test")
    assert "0.300" in row and "4.5" in row  # U 0.30 × 15 ft² = 4.5 Btu/(h·°F)
    page.close()
