"""Real browser: a photo taken with no signal (issue 17, points 2 and 4).

The photo is a 3000 × 2000 px JPEG made with Pillow (a tablet camera's size class), picked in
the photo form's file input with Playwright's ``set_input_files`` (what tapping the camera
button hands the page). static/photos.js shrinks it on a canvas to a long side of 2000 px
(3000 × 2000 → 2000 × 1333: 2000 × 2000 / 3000 = 1333.3) before it goes into the outbox, and
the outbox sends it when the connection returns; the server stores it at that size.
"""

from __future__ import annotations

import time
from pathlib import Path

import pytest
from PIL import Image
from playwright.sync_api import expect

from server.services.demo import DEMO_LABEL
from tests.browser.test_offline import (
    STATUS,
    _context,
    _new_house,
    _rows,
    _wait_controlled,
    _waiting,
)

pytestmark = pytest.mark.browser


def _camera_jpeg(path: Path, width: int = 3000, height: int = 2000) -> Path:
    image = Image.new("RGB", (width, height), (150, 110, 70))
    for x in range(0, width, 120):  # stripes, so the file is not trivially small
        image.paste((230, 220, 200), (x, 0, x + 40, height))
    exif = Image.Exif()
    exif[0x8825] = {1: "N", 2: (45.0, 30.0, 0.0), 3: "W", 4: (73.0, 34.0, 0.0)}  # GPS
    image.save(path, format="JPEG", quality=92, exif=exif)
    return path


def _kept_photo(page) -> list:  # type: ignore[no-untyped-def]
    """[width, height, type, bytes] of the photo Blob waiting in the outbox."""
    return page.evaluate(  # type: ignore[no-any-return]
        """async () => {
             const items = await window.WarmsteadOutbox.all();
             const entry = items[items.length - 1].entries.find((e) => e[0] === "photo");
             const bitmap = await createImageBitmap(entry[1]);
             return [bitmap.width, bitmap.height, entry[1].type, entry[1].size];
           }"""
    )


def test_a_photo_taken_offline_waits_shrunk_and_is_saved_when_back_online(  # type: ignore[no-untyped-def]
    browser, live_server: str, signed_in, live_db_url: str, tmp_path: Path, shot_dir: Path
) -> None:
    picture = _camera_jpeg(tmp_path / "IMG_2040.jpg")
    assert Image.open(picture).size == (3000, 2000)
    context = _context(browser, signed_in)
    page = context.new_page()
    page.goto(live_server + "/houses")
    _wait_controlled(page)
    ((house_id,),) = _rows(live_db_url, "select id from houses where label = :l", l=DEMO_LABEL)
    ((surface_id,),) = _rows(live_db_url, "select id from surfaces where house_id = :h and "
                             "kind <> 'pipe_run' order by position limit 1", h=house_id)  # fmt: skip
    surface_url = f"{live_server}/houses/{house_id}/surfaces/{surface_id}"
    page.goto(surface_url)  # opened online: kept by the worker
    page.wait_for_timeout(300)
    context.set_offline(True)
    page.reload()  # from the kept copy
    expect(page.locator("#net-status")).to_contain_text("No connection")
    caption = f"Attic floor: 3 in of fill on the ruler ({time.time_ns()})"
    page.locator("#photo-file").set_input_files(str(picture))
    page.locator("#photo-caption").fill(caption)
    page.get_by_role("button", name="Add photo").click()
    expect(page.locator(STATUS)).to_contain_text("1 change")
    expect(page.locator("form[data-photo-form] .outbox-note")).to_contain_text(
        "kept on this tablet"
    )
    width, height, kind, size = _kept_photo(page)
    assert (width, height, kind) == (2000, 1333, "image/jpeg")  # shrunk on the tablet
    assert size < picture.stat().st_size
    assert _rows(live_db_url, "select id from photos where caption = :c", c=caption) == []
    context.set_offline(False)
    expect(page.locator(STATUS)).to_contain_text("All changes sent", timeout=60_000)
    rows = _rows(live_db_url, "select width, height, surface_id, storage_key from photos "
                 "where caption = :c", c=caption)  # fmt: skip
    assert len(rows) == 1
    stored_w, stored_h, stored_surface, key = rows[0]
    assert max(stored_w, stored_h) <= 2000 and (stored_w, stored_h) == (2000, 1333)
    assert stored_surface == surface_id and "IMG" not in key
    stored = next(Path(live_db_url.removeprefix("sqlite:///")).parent.glob(f"photos/*/*/{key}.jpg"))
    assert dict(Image.open(stored).getexif()) == {}  # no GPS reached the disk
    page.goto(surface_url)  # the card as it stands now, online, at 1024 × 768
    card = page.locator("#photos")
    expect(card.get_by_role("img", name=caption)).to_be_visible()
    card.scroll_into_view_if_needed()
    image = card.get_by_role("img", name=caption)
    deadline = time.monotonic() + 10  # lazy: it loads once scrolled into view
    while not image.evaluate("(img) => img.complete && img.naturalWidth > 0"):
        assert time.monotonic() < deadline, "the photo did not load from its route"
        page.wait_for_timeout(50)
    assert image.evaluate("(img) => [img.naturalWidth, img.naturalHeight]") == [2000, 1333]
    page.screenshot(path=str(shot_dir / "photos-surface-1024x768.png"))
    context.close()


def test_measure_time_to_send_20_edits_and_3_photos(  # type: ignore[no-untyped-def]
    browser, live_server: str, signed_in, live_db_url: str, tmp_path: Path
) -> None:
    """Not a pass/fail figure: how long 20 waiting edits and 3 waiting photos take to go out
    once the connection is back (printed), and that all of it arrived in order."""
    picture = _camera_jpeg(tmp_path / "IMG_3000.jpg")
    context = _context(browser, signed_in)
    page = context.new_page()
    house_url, surface_url = _new_house(page, live_server)
    page.goto(surface_url)
    context.set_offline(True)
    page.locator("#details summary").click()
    waiting = 0
    for i in range(1, 21):
        page.locator("#s-name").fill(f"Rim joist, edit {i}")
        page.get_by_role("button", name="Save details").click()
        waiting += 1
        expect(page.locator(STATUS)).to_contain_text(f"{waiting} change")
        if i % 7 == 0 or i == 20:  # a photo after edits 7, 14 and 20
            page.locator("#photo-file").set_input_files(str(picture))
            page.locator("#photo-caption").fill(f"Rim joist photo after edit {i}")
            page.get_by_role("button", name="Add photo").click()
            waiting += 1
            expect(page.locator(STATUS)).to_contain_text(f"{waiting} change")
    assert waiting == 23 and _waiting(page) == 23
    started = time.monotonic()
    context.set_offline(False)
    expect(page.locator(STATUS)).to_contain_text("All changes sent", timeout=120_000)
    elapsed = time.monotonic() - started
    print(f"\n20 waiting edits and 3 photos sent in {elapsed:.2f} s after the connection returned")
    surface_id = int(surface_url.rsplit("/", 1)[1])
    names = _rows(live_db_url, "select name from surfaces where id = :s", s=surface_id)
    assert names[0][0] == "Rim joist, edit 20"
    photos = _rows(live_db_url, "select caption, width, height from photos where surface_id = :s "
                   "order by id", s=surface_id)  # fmt: skip
    assert [p[0] for p in photos] == [f"Rim joist photo after edit {i}" for i in (7, 14, 20)]
    assert all(max(w, h) <= 2000 for _c, w, h in photos)
    assert house_url.startswith(live_server)
    context.close()
