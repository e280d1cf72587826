"""The House page's systems cards in a browser: an htmx save swaps the section in place and
refreshes the settings block's house version, so the next settings save is not refused."""

from __future__ import annotations

import re

import pytest

from tests.conftest import unfold

pytestmark = pytest.mark.browser


def test_card_saves_in_place_and_keeps_settings_current(
    browser, live_server: str, signed_in
) -> None:  # type: ignore[no-untyped-def]
    page = browser.new_page(storage_state=signed_in, viewport={"width": 1024, "height": 768})
    try:
        page.goto(live_server + "/houses")
        page.get_by_role("link", name=re.compile("Quillfeather")).first.click()
        url = page.url.split("#")[0]
        before = page.locator("#settings input[name=version]").first.get_attribute("value")
        card = page.locator("#card-design")
        unfold(card.locator("details").first)
        capacity = card.get_by_label(re.compile("Heating equipment output"))
        typed = capacity.input_value() or "88000"
        capacity.fill(typed)
        card.get_by_role("button", name=re.compile("Save design load")).click()
        page.get_by_role("status").filter(has_text="Design load and equipment saved.").wait_for()
        assert page.url.split("#")[0] == url  # swapped in place, no page load
        after = page.locator("#settings input[name=version]").first.get_attribute("value")
        assert after is not None and before is not None and int(after) > int(before)
        # the settings block (swapped out of band) now carries the new version: no conflict
        settings = page.locator("#settings form").filter(has_text="Heating system")
        unfold(settings.locator("details").first)
        settings.get_by_role("button", name=re.compile("Save heating system")).click()
        page.get_by_role("status").filter(has_text="Heating system saved.").wait_for()
        assert "Someone else saved" not in page.content()
    finally:
        page.close()
