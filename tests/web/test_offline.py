"""Working offline, the server's side (issue 17): the service worker's script and fallback page,
the outbox's check-in, and sign-out clearing what the tablet kept.

The headers checked are those the W3C specifications name: ``Service-Worker-Allowed`` (Service
Workers, section "Service-Worker-Allowed", lets a script under any path claim the scope "/"),
``Clear-Site-Data`` with the types ``"cache"`` and ``"storage"`` (Clear Site Data, section 3.1:
"storage" covers IndexedDB, Cache API storage and service worker registrations).
"""

from __future__ import annotations

import re

from fastapi.testclient import TestClient

from server.security import CONTENT_SECURITY_POLICY, CSRF_HEADER, SESSION_COOKIE


def test_service_worker_is_served_from_the_root_with_the_usual_headers(
    anon_client: TestClient,
) -> None:
    r = anon_client.get("/sw.js")
    assert r.status_code == 200
    assert r.headers["content-type"].startswith("text/javascript")
    assert r.headers["service-worker-allowed"] == "/"
    assert r.headers["content-security-policy"] == CONTENT_SECURITY_POLICY
    assert r.headers["x-content-type-options"] == "nosniff"
    assert r.headers["cache-control"] == "no-store"  # a new worker is seen at the next load
    assert 'self.addEventListener("fetch"' in r.text


def test_the_csp_lets_the_worker_run() -> None:
    # CSP Level 3, "worker-src": absent, it falls back to script-src, then default-src; both
    # are 'self' here, so /sw.js (same origin) may run, and nothing else may.
    assert "worker-src" not in CONTENT_SECURITY_POLICY
    assert "script-src 'self'" in CONTENT_SECURITY_POLICY


def test_the_worker_never_keeps_shared_views_quotes_sign_in_or_posts(
    anon_client: TestClient,
) -> None:
    text = anon_client.get("/sw.js").text
    kept = re.search(r"var KEPT = (/.*/);", text)
    assert kept
    pattern = kept.group(1).strip("/").replace("\\/", "/")
    keeps = re.compile(pattern)
    for path in ("/houses", "/houses/3", "/houses/3/surfaces/12", "/houses/3/compare",
                 "/houses/3/upgrades/4"):  # fmt: skip
        assert keeps.match(path), path
    for path in ("/s/abc", "/houses/3/quote/best", "/login", "/logout", "/account",
                 "/api/v1/houses/3", "/houses/3/share-links", "/price-book"):  # fmt: skip
        assert not keeps.match(path), path
    assert 'if (req.method !== "GET") { return; }' in text


def test_fallback_page_is_public_and_names_nobody(client: TestClient) -> None:
    r = client.get("/offline")  # signed in: still no name, no token (it is kept for anyone)
    assert r.status_code == 200
    assert "No connection" in r.text
    assert "admin@firm-a.invalid" not in r.text
    assert "csrf" not in r.text.lower()
    assert 'name="warmstead-user"' not in r.text
    assert client.headers[CSRF_HEADER] not in r.text


def test_fallback_page_without_a_session(anon_client: TestClient) -> None:
    r = anon_client.get("/offline", follow_redirects=False)
    assert r.status_code == 200


def test_pages_name_their_user_for_the_worker(client: TestClient, firm_a) -> None:  # type: ignore[no-untyped-def]
    html = client.get("/houses").text
    assert f'<meta name="warmstead-user" content="u{firm_a.user_id}">' in html
    # within the first 4 KB, where the worker looks for it
    assert html.index('name="warmstead-user"') < 4096
    assert '<span id="outbox-status"' in html and 'aria-live="polite"' in html


def test_login_page_names_nobody(anon_client: TestClient) -> None:
    assert 'name="warmstead-user"' not in anon_client.get("/login").text


def test_state_gives_the_user_and_this_sessions_token(client: TestClient, firm_a) -> None:  # type: ignore[no-untyped-def]
    r = client.get("/offline/state")
    assert r.status_code == 200
    assert r.json() == {"user": f"u{firm_a.user_id}", "csrf_token": client.headers[CSRF_HEADER]}


def test_state_without_a_session_goes_to_sign_in(anon_client: TestClient) -> None:
    r = anon_client.get("/offline/state", follow_redirects=False)
    assert r.status_code == 303
    assert r.headers["location"].startswith("/login")


def test_take_this_house_with_me_is_offered_on_the_list_and_the_house(
    client: TestClient,
) -> None:
    r = client.post("/houses", data={"label": "Take-along", "units": "ip"}, follow_redirects=False)
    house_url = r.headers["location"]
    house_id = house_url.rsplit("/", 1)[1]
    page = client.get("/houses").text  # the list first (the house page needs a surface)
    assert f'data-take-house="{house_id}"' in page
    add = {"typical": "rim-2x10-empty", "kind": "", "area": "100"}
    assert client.post(f"{house_url}/surfaces", data=add, follow_redirects=False).status_code == 303
    assert f'data-take-house="{house_id}"' in client.get(house_url).text


def test_sign_out_clears_what_the_tablet_kept(client: TestClient) -> None:
    r = client.post("/logout", follow_redirects=False)
    assert r.status_code == 303
    assert r.headers["clear-site-data"] == '"cache", "storage"'
    assert SESSION_COOKIE in r.headers["set-cookie"]
