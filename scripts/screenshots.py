"""Screenshots of pages at tablet (1024x768) and phone (390x844) size with Debian's chromium.

Usage:
  python scripts/screenshots.py BASE_URL OUT_DIR PATH [PATH ...]
  python scripts/screenshots.py BASE_URL OUT_DIR --tour HOUSE_ID

The first form shoots each PATH as one full page. The second walks one house: each House page
section (reached from the section bar, one viewport shot each), its first surface and upgrade,
the Compare page (whole, and its range bars, bills chart, best-package frontier and charts),
the quote of its first package (and the quote printed to PDF, its pages rendered with
``pdftoppm -r 60`` when pdftoppm is installed), and the homeowner's shared view (a new share
link is made for it). For each shot it prints the page's sideways overflow (pixels wider than
the viewport, 0 is right) and, for House sections, the section's height against the screen.

Signs in first as WARMSTEAD_SHOT_EMAIL / WARMSTEAD_SHOT_PASSWORD (default: the demo auditor that
`warmstead demo` creates in development).
"""

from __future__ import annotations

import os
import re
import shutil
import subprocess
import sys
from pathlib import Path
from typing import Any

from playwright.sync_api import Browser, Page, sync_playwright

CHROMIUM = "/usr/bin/chromium"
ARGS = ["--no-sandbox", "--disable-gpu", "--disable-background-networking",
        "--disable-component-update", "--no-first-run", "--disable-sync"]  # fmt: skip
VIEWPORTS = {"tablet": (1024, 768), "phone": (390, 844)}
SECTIONS = ("house", "envelope", "air", "bills", "upgrades", "share")
#: the parts of the Compare page shot on their own (selector, file name)
COMPARE_PARTS = (
    (".range-chart", "compare-ranges"),
    (".bills-chart", "compare-bills"),
    (".frontier", "compare-frontier"),
    ("section[aria-labelledby=charts-h]", "compare-charts"),
)
OVERFLOW_JS = "document.documentElement.scrollWidth - document.documentElement.clientWidth"


def sign_in(browser: Browser, base: str) -> Any:
    login = browser.new_page()
    login.goto(base + "/login")
    login.get_by_label("E-mail").fill(
        os.environ.get("WARMSTEAD_SHOT_EMAIL", "auditor@demo.invalid")
    )
    login.get_by_label("Password").fill(os.environ.get("WARMSTEAD_SHOT_PASSWORD", "warmstead-demo"))
    login.get_by_role("button", name="Sign in").click()
    login.wait_for_url("**/houses**")
    state = login.context.storage_state()
    login.close()
    return state


def shoot(page: Page, out: str, name: str, *, full: bool = True) -> None:
    page.screenshot(path=f"{out}/{name}.png", full_page=full)
    print(f"{name}.png  sideways overflow {page.evaluate(OVERFLOW_JS)} px")


def first_href(page: Page, pattern: str) -> str | None:
    for href in page.eval_on_selector_all("a[href]", "els => els.map(e => e.getAttribute('href'))"):
        if href and re.fullmatch(pattern, href):
            return str(href)
    return None


def share_url(page: Page, base: str, house: str) -> str:
    page.goto(f"{base}/houses/{house}#sec-share")
    page.fill("#share-label", "Screenshots")
    page.get_by_role("button", name="Make a link").click()
    page.wait_for_selector("#share-url")
    return str(page.input_value("#share-url"))


def tour(page: Page, base: str, out: str, house: str, size: str, shared: str) -> None:
    page.goto(f"{base}/houses/{house}")
    surface = first_href(page, rf"/houses/{house}/surfaces/\d+")
    upgrade = first_href(page, rf"/houses/{house}/upgrades/\d+")
    for key in SECTIONS:
        page.click(f"a[href='#sec-{key}']")
        page.wait_for_timeout(300)
        box = page.locator(f"#sec-{key}").bounding_box()
        shoot(page, out, f"house-{key}-{size}", full=False)
        page.locator(f"#sec-{key}").screenshot(path=f"{out}/house-{key}-whole-{size}.png")
        if box:
            print(f"  section {key}: {box['height']:.0f} px tall, screen {page.viewport_size}")
    for path, name in ((surface, "surface"), (upgrade, "upgrade")):
        if path:
            page.goto(base + path)
            shoot(page, out, f"{name}-{size}")
    page.goto(f"{base}/houses/{house}/compare?objective=npv")
    quote = first_href(page, rf"/houses/{house}/quote/[\w-]+")
    shoot(page, out, f"compare-{size}")
    for selector, name in COMPARE_PARTS:
        part = page.locator(selector).first
        if part.count():
            part.scroll_into_view_if_needed()
            part.screenshot(path=f"{out}/{name}-{size}.png")
    page.goto(shared)
    shoot(page, out, f"shared-{size}")
    if quote:
        page.goto(base + quote)
        shoot(page, out, f"quote-{size}")
    if quote and size == "tablet":
        page.emulate_media(media="print")
        page.pdf(path=f"{out}/quote.pdf", format="Letter", print_background=True)
        page.emulate_media(media="screen")
        if shutil.which("pdftoppm"):
            subprocess.run(["pdftoppm", "-r", "60", "-png", f"{out}/quote.pdf", f"{out}/quote-pdf"],
                           check=True)  # fmt: skip


def main() -> int:
    base, out, *paths = sys.argv[1:]
    Path(out).mkdir(parents=True, exist_ok=True)
    with sync_playwright() as p:
        browser = p.chromium.launch(executable_path=CHROMIUM, args=ARGS, headless=True)
        state = sign_in(browser, base)
        shared = ""
        for name, (w, h) in VIEWPORTS.items():
            page = browser.new_page(viewport={"width": w, "height": h}, storage_state=state)
            if paths[:1] == ["--tour"]:
                shared = shared or share_url(page, base, paths[1])
                tour(page, base, out, paths[1], name, shared)
            else:
                for path in paths:
                    page.goto(base + path)
                    slug = path.strip("/").replace("/", "_") or "home"
                    shoot(page, out, f"{slug}-{name}")
            page.close()
        browser.close()
    return 0


if __name__ == "__main__":
    sys.exit(main())
