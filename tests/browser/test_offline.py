"""Real browser: working with no signal (issue 17, points 1 and 4).

Each test makes its own house with one rim-joist surface (typical "rim-2x10-empty": siding
R-0.81, board sheathing R-0.94, 1-1/2 in softwood rim joist k = 0.8 Btu·in/(h·ft²·°F)), goes
offline with Playwright's ``context.set_offline(True)`` (Chrome's own network emulation: the
page and its service worker both lose the network, ``navigator.onLine`` turns false), and
reads what was stored back from the live server's SQLite file.

Hand-worked R of the rim joist with its siding layer entered as R-13 (films from ASHRAE
Handbook of Fundamentals, Ch. 26, Table 10: inside 0.68, outside 0.17, horizontal heat flow):
0.17 + 0.68 + 13 + 0.94 + 1.5/0.8 (= 1.875) = 16.665, shown "R-16.7". With R-20 instead:
23.665, "R-23.7".
"""

from __future__ import annotations

import itertools
import re
import time

import pytest
from playwright.sync_api import expect
from sqlalchemy import create_engine, text

from server.services.demo import DEMO_LABEL
from tests.conftest import log_in, unfold

pytestmark = pytest.mark.browser

_names = itertools.count(1)
TABLET = {"width": 1024, "height": 768}
STATUS = "#outbox-status"


def _context(browser, signed_in=None):  # type: ignore[no-untyped-def]
    return browser.new_context(viewport=TABLET, storage_state=signed_in)


def _wait_controlled(page) -> None:  # type: ignore[no-untyped-def]
    # polled from here: wait_for_function evaluates a string, which the page's CSP forbids
    deadline = time.monotonic() + 10
    while not page.evaluate("() => Boolean(navigator.serviceWorker.controller)"):
        assert time.monotonic() < deadline, "the service worker did not take the page"
        page.wait_for_timeout(50)


def _new_house(page, base: str) -> tuple[str, str]:  # type: ignore[no-untyped-def]
    """A new house with one rim joist of 100 ft², made online. Returns (house url, surface url)."""
    page.goto(base + "/houses")
    _wait_controlled(page)  # from here on, pages go through the worker (and are kept)
    page.locator("#label").fill(f"Offline check {next(_names)} ({time.time_ns()})")
    page.get_by_role("button", name="Create house").click()
    page.wait_for_url(re.compile(r"/houses/\d+$"))
    house_url = page.url
    # the first surface is posted as the quick-add form posts it (the page of a house with no
    # surface is not needed for it)
    token = page.request.get(base + "/offline/state").json()["csrf_token"]
    added = page.request.post(house_url + "/surfaces", max_redirects=0, form={
        "csrf_token": token, "typical": "rim-2x10-empty", "kind": "", "area": "100"})  # fmt: skip
    assert added.status == 303, added.status
    page.goto(base + added.headers["location"])
    # as found: 0.17 + 0.68 + 0.81 + 0.94 + 1.875 = 4.475
    expect(page.locator("#r-total")).to_have_text("R-4.5")
    surface_url = page.url
    page.goto(house_url)  # opened while online: kept by the worker
    return house_url, surface_url


def _rows(db_url: str, sql: str, **params):  # type: ignore[no-untyped-def]
    engine = create_engine(db_url)
    try:
        with engine.connect() as conn:
            return conn.execute(text(sql), params).all()
    finally:
        engine.dispose()


def _house_id(url: str) -> int:
    return int(re.search(r"/houses/(\d+)", url).group(1))  # type: ignore[union-attr]


def _waiting(page) -> int:  # type: ignore[no-untyped-def]
    return int(page.locator(STATUS).get_attribute("data-waiting") or "0")


def _set_r(page, value: str) -> None:  # type: ignore[no-untyped-def]
    r = page.locator("#l0-r")
    r.click()
    r.press("Control+A")
    r.press_sequentially(value)
    r.press("Tab")  # the change event: the autosave


def _posts(page) -> list[str]:  # type: ignore[no-untyped-def]
    seen: list[str] = []
    page.on("request", lambda req: seen.append(req.url) if req.method == "POST" else None)
    return seen


def test_offline_reload_add_surface_change_layer_then_sync_in_order(  # type: ignore[no-untyped-def]
    browser, live_server: str, signed_in, live_db_url: str
) -> None:
    context = _context(browser, signed_in)
    page = context.new_page()
    house_url, surface_url = _new_house(page, live_server)
    house_id = _house_id(house_url)
    (version_before,) = _rows(live_db_url, "select version from houses where id = :h", h=house_id)[
        0
    ]
    posts = _posts(page)

    context.set_offline(True)
    response = page.reload()  # the page as kept by the worker, not the browser's error page
    assert response is not None and response.from_service_worker
    assert response.headers.get("x-warmstead-kept-at")
    expect(page.locator("h1")).to_contain_text("Offline check")
    expect(page.locator("#net-status")).to_contain_text("No connection")

    unfold(page.locator("details.add-surface"))
    page.locator("#qa-rim-2x10-empty").fill("250")
    page.locator("form.quick-item", has=page.locator("#qa-rim-2x10-empty")).get_by_role(
        "button", name="Add"
    ).click()
    expect(page.locator(STATUS)).to_contain_text("1 change waits")
    expect(page.locator("form.quick-item .outbox-note").first).to_contain_text(
        "Kept on this tablet"
    )

    page.goto(surface_url)  # offline: from the worker's cache too
    expect(page.locator("#r-total")).to_have_text("R-4.5")
    _set_r(page, "13")
    expect(page.locator(STATUS)).to_contain_text("2 changes wait")
    assert posts == []  # nothing left the tablet while offline
    assert len(_rows(live_db_url, "select id from surfaces where house_id = :h", h=house_id)) == 1

    context.set_offline(False)
    expect(page.locator(STATUS)).to_contain_text("All changes sent", timeout=15_000)
    assert [p.rsplit(str(house_id), 1)[1] for p in posts if "/offline/" not in p] == [
        "/surfaces",
        surface_url.rsplit(str(house_id), 1)[1] + "/assembly",
    ]  # in the order they were made
    rows = _rows(
        live_db_url, "select id, area from surfaces where house_id = :h order by id", h=house_id
    )
    assert len(rows) == 2  # the rim joist added offline is stored
    (version_after,) = _rows(live_db_url, "select version from houses where id = :h", h=house_id)[0]
    assert version_after == version_before + 2  # two saves, each on the version before it
    page.reload()
    assert page.locator("#l0-r").input_value() == "13"
    expect(page.locator("#r-total")).to_have_text("R-16.7")  # 16.665, worked above
    context.close()


def test_conflict_with_a_save_from_another_tablet_is_shown_and_chosen(  # type: ignore[no-untyped-def]
    browser, live_server: str, signed_in, live_db_url: str
) -> None:
    first = _context(browser, signed_in)
    page = first.new_page()
    _house_url, surface_url = _new_house(page, live_server)
    page.goto(surface_url)

    first.set_offline(True)
    _set_r(page, "13")  # made offline on this tablet
    expect(page.locator(STATUS)).to_contain_text("1 change waits")

    second = _context(browser, signed_in)  # meanwhile, another tablet saves R-20
    other = second.new_page()
    other.goto(surface_url)
    _set_r(other, "20")
    expect(other.locator("#editor p.status")).to_have_text("Saved.", timeout=10_000)
    expect(other.locator("#r-total")).to_have_text("R-23.7")

    first.set_offline(False)
    panel = page.locator("#outbox-choices")
    expect(panel).to_be_visible(timeout=15_000)
    expect(panel).to_contain_text("Someone saved this house after you made this change")
    row = panel.locator("tbody tr", has=page.locator("th", has_text="R"))
    expect(row.locator("td").nth(0)).to_have_text("13")  # what was typed offline
    expect(row.locator("td").nth(1)).to_have_text("20")  # what is saved now
    expect(page.locator(STATUS)).to_contain_text("needs your choice")
    other.reload()
    assert other.locator("#l0-r").input_value() == "20"  # nothing was overwritten meanwhile

    panel.get_by_role("button", name="Send mine again").click()
    expect(page.locator(STATUS)).to_contain_text("All changes sent", timeout=15_000)
    expect(panel).to_have_count(0)
    other.reload()
    assert other.locator("#l0-r").input_value() == "13"
    expect(other.locator("#r-total")).to_have_text("R-16.7")
    first.close()
    second.close()


def test_sign_out_while_changes_wait_asks_then_clears(  # type: ignore[no-untyped-def]
    browser, live_server: str
) -> None:
    context = _context(browser)  # its own sign-in: signing out ends only this session
    page = context.new_page()
    log_in(page, live_server)
    _house_url, surface_url = _new_house(page, live_server)
    page.goto(surface_url)
    context.set_offline(True)
    _set_r(page, "13")
    expect(page.locator(STATUS)).to_contain_text("1 change waits")
    # back online, but the outbox cannot reach the server yet (its check-in fails)
    page.route("**/offline/state", lambda route: route.abort())
    context.set_offline(False)
    page.get_by_role("button", name="Sign out").click()
    ask = page.get_by_role("alertdialog")
    expect(ask).to_contain_text("1 change made on this tablet has not reached the server yet")
    assert page.url == surface_url  # not signed out yet
    kept = page.evaluate("caches.keys()")
    assert any(name.startswith("warmstead-pages-") for name in kept)

    ask.get_by_role("button", name="Sign out and delete them").click()
    page.wait_for_url(re.compile(r"/login"))
    kept = page.evaluate("caches.keys()")
    assert not any(name.startswith("warmstead-pages-") for name in kept), kept
    left = page.evaluate(
        """() => new Promise((resolve) => {
             const req = indexedDB.open("warmstead-offline", 1);
             req.onupgradeneeded = () => { req.result.createObjectStore("outbox", {keyPath: "seq", autoIncrement: true}); };
             req.onsuccess = () => {
               const db = req.result;
               const n = db.transaction("outbox").objectStore("outbox").count();
               n.onsuccess = () => { db.close(); resolve(n.result); };
             };
           })"""
    )
    assert left == 0
    context.close()


def test_measure_kept_size_and_time_to_send_20_edits(  # type: ignore[no-untyped-def]
    browser, live_server: str, signed_in, live_db_url: str
) -> None:
    """Not a pass/fail figure: prints what is kept after opening the demo house, and how long
    20 waiting edits take to go out once the connection is back."""
    context = _context(browser, signed_in)
    page = context.new_page()
    page.goto(live_server + "/houses")
    _wait_controlled(page)
    ((demo_id,),) = _rows(live_db_url, "select id from houses where label = :l", l=DEMO_LABEL)
    page.goto(f"{live_server}/houses/{demo_id}")
    page.wait_for_timeout(500)  # the worker keeps the page after answering it
    sizes = page.evaluate(
        """async () => {
             const out = {};
             for (const name of await caches.keys()) {
               const c = await caches.open(name);
               let n = 0;
               for (const req of await c.keys()) { n += (await (await c.match(req)).arrayBuffer()).byteLength; }
               out[name] = n;
             }
             return out;
           }"""
    )
    shell = sum(v for k, v in sizes.items() if k.startswith("warmstead-shell"))
    pages = sum(v for k, v in sizes.items() if k.startswith("warmstead-pages-"))
    assert shell > 0 and pages > 0
    print(f"\nkept after opening the demo house: app shell {shell / 1024:.0f} KB, "
          f"house pages {pages / 1024:.0f} KB")  # fmt: skip

    _house_url, surface_url = _new_house(page, live_server)
    page.goto(surface_url)
    context.set_offline(True)
    page.locator("#details summary").click()
    for i in range(1, 21):
        page.locator("#s-name").fill(f"Rim joist, edit {i}")
        page.get_by_role("button", name="Save details").click()
        expect(page.locator(STATUS)).to_contain_text(f"{i} change")
    assert _waiting(page) == 20
    started = time.monotonic()
    context.set_offline(False)
    expect(page.locator(STATUS)).to_contain_text("All changes sent", timeout=60_000)
    elapsed = time.monotonic() - started
    print(f"20 waiting edits sent in {elapsed:.2f} s after the connection returned")
    names = _rows(live_db_url, "select name from surfaces where id = :s",
                  s=int(surface_url.rsplit("/", 1)[1]))  # fmt: skip
    assert names[0][0] == "Rim joist, edit 20"  # the last one made is the one that stands
    context.close()
