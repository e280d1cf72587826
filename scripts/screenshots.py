"""Screenshots of pages at tablet (1024x768) and phone (390x844) size with Debian's chromium.

Usage: python scripts/screenshots.py BASE_URL OUT_DIR PATH [PATH ...]

Signs in first as WARMSTEAD_SHOT_EMAIL / WARMSTEAD_SHOT_PASSWORD (default: the demo auditor that
`warmstead demo` creates in development).
"""

from __future__ import annotations

import os
import sys
from pathlib import Path

from playwright.sync_api import sync_playwright

CHROMIUM = "/usr/bin/chromium"
ARGS = ["--no-sandbox", "--disable-gpu", "--disable-background-networking",
        "--disable-component-update", "--no-first-run", "--disable-sync"]  # fmt: skip
VIEWPORTS = {"tablet": (1024, 768), "phone": (390, 844)}


def main() -> int:
    base, out, *paths = sys.argv[1:]
    Path(out).mkdir(parents=True, exist_ok=True)
    with sync_playwright() as p:
        browser = p.chromium.launch(executable_path=CHROMIUM, args=ARGS, headless=True)
        login = browser.new_page()
        login.goto(base + "/login")
        login.get_by_label("E-mail").fill(
            os.environ.get("WARMSTEAD_SHOT_EMAIL", "auditor@demo.invalid")
        )
        login.get_by_label("Password").fill(
            os.environ.get("WARMSTEAD_SHOT_PASSWORD", "warmstead-demo")
        )
        login.get_by_role("button", name="Sign in").click()
        login.wait_for_url("**/houses**")
        state = login.context.storage_state()
        login.close()
        for name, (w, h) in VIEWPORTS.items():
            page = browser.new_page(viewport={"width": w, "height": h}, storage_state=state)
            for path in paths:
                page.goto(base + path)
                slug = path.strip("/").replace("/", "_") or "home"
                page.screenshot(path=f"{out}/{slug}-{name}.png", full_page=True)
            page.close()
        browser.close()
    return 0


if __name__ == "__main__":
    sys.exit(main())
