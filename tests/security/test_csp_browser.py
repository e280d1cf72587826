"""Real browser: the main pages under the strict Content-Security-Policy log no violation.

Chromium writes every blocked inline style, inline script or foreign resource to the console as
"Refused to ... because it violates the following Content Security Policy directive"; the test
listens to the console (and to page errors) while it opens each page and uses htmx on some.
"""

from __future__ import annotations

import re

import pytest

pytestmark = pytest.mark.browser


def _watch(page) -> list[str]:  # type: ignore[no-untyped-def]
    problems: list[str] = []

    def on_console(msg) -> None:  # type: ignore[no-untyped-def]
        # a 4xx answer (the favicon, a wrong password) is logged as a failed load: not ours
        if "Content Security Policy" in msg.text or (
            msg.type == "error" and "Failed to load resource" not in msg.text
        ):
            problems.append(f"console {msg.type}: {msg.text}")

    page.on("console", on_console)
    page.on("pageerror", lambda exc: problems.append(f"page error: {exc}"))
    return problems


def _links(page, pattern: str) -> list[str]:  # type: ignore[no-untyped-def]
    hrefs = page.eval_on_selector_all("a[href]", "els => els.map(e => e.getAttribute('href'))")
    return sorted({h for h in hrefs if re.fullmatch(pattern, h)})


def test_no_csp_violation_on_the_main_pages(browser, live_server: str, signed_in) -> None:  # type: ignore[no-untyped-def]
    page = browser.new_page(viewport={"width": 1024, "height": 768}, storage_state=signed_in)
    problems = _watch(page)
    visited: list[str] = []

    def visit(path: str) -> None:
        response = page.goto(live_server + path)
        assert response is not None and response.status < 500, path
        assert response.headers["content-security-policy"].startswith("default-src 'self'")
        page.wait_for_load_state("networkidle")
        visited.append(path)

    visit("/houses")
    house = _links(page, r"/houses/\d+")[0]
    visit(house)
    for path in _links(page, re.escape(house) + r"/(surfaces|upgrades)/\d+")[:3]:
        visit(path)
    visit(house + "/compare")
    box = page.locator("input[type=checkbox]").first
    if box.count():
        box.check()  # htmx swaps the comparison with the new package
        page.wait_for_load_state("networkidle")
    for path in _links(page, re.escape(house) + r"/quote/[a-z0-9-]+")[:1]:
        visit(path)
    for path in ("/library", "/tools/pipe", "/price-book", "/admin/users"):
        visit(path)
    visit("/tools/pipe")
    page.locator("#p-length").fill("55")
    page.locator("#p-length").press("Tab")  # htmx recomputes the result
    page.wait_for_load_state("networkidle")
    assert not problems, "\n".join(problems)
    assert len(visited) >= 8
    page.close()


def test_no_csp_violation_for_visitors_without_an_account(browser, live_server: str) -> None:  # type: ignore[no-untyped-def]
    page = browser.new_page(viewport={"width": 390, "height": 844})
    problems = _watch(page)
    page.goto(live_server + "/houses")
    assert page.url.startswith(live_server + "/login")
    page.get_by_label("E-mail").fill("nobody@demo.invalid")
    page.get_by_label("Password").fill("not-a-password")
    page.get_by_role("button", name="Sign in").click()
    page.wait_for_selector("#login-err")
    page.goto(live_server + "/s/" + "A" * 43)  # unknown link: the plain not-found page
    page.wait_for_load_state("networkidle")
    assert not problems, "\n".join(problems)
    page.close()
