"""Security headers on real responses, and the admin's Users page (firm-scoped, staff 404)."""

from __future__ import annotations

import re

from fastapi.testclient import TestClient

from server.security import CONTENT_SECURITY_POLICY
from tests.conftest import Account
from tests.security.conftest import SQLITE_ONLY, assert_no_firm_a_data

EXACT_CSP = (
    "default-src 'self'; script-src 'self'; style-src 'self'; img-src 'self' data:; "
    "object-src 'none'; base-uri 'none'; form-action 'self'; frame-ancestors 'none'"
)


@SQLITE_ONLY
def test_every_kind_of_response_has_the_headers(
    client: TestClient, anon_client: TestClient
) -> None:
    assert CONTENT_SECURITY_POLICY == EXACT_CSP
    cases = [
        (client, "GET", "/houses", 200, "same-origin", True),
        (client, "GET", "/houses/999999", 404, "same-origin", True),
        (client, "POST", "/houses/999999/units", 404, "same-origin", True),
        (anon_client, "GET", "/login", 200, "same-origin", True),
        (anon_client, "GET", "/houses", 303, "same-origin", True),
        (anon_client, "GET", "/api/v1/houses/1/document", 401, "same-origin", True),
        (anon_client, "GET", "/s/" + "A" * 43, 404, "no-referrer", True),
        (anon_client, "GET", "/static/app.css", 200, "same-origin", False),
        (anon_client, "GET", "/healthz", 200, "same-origin", True),
    ]
    for c, method, path, status, referrer, no_store in cases:
        r = c.request(
            method, path, follow_redirects=False, data={"units": "si"} if method == "POST" else None
        )
        where = f"{method} {path}"
        assert r.status_code == status, where
        assert r.headers["Content-Security-Policy"] == EXACT_CSP, where
        assert r.headers["X-Content-Type-Options"] == "nosniff", where
        assert r.headers["X-Frame-Options"] == "DENY", where
        assert r.headers["Referrer-Policy"] == referrer, where
        assert (r.headers.get("Cache-Control") == "no-store") is no_store, where


@SQLITE_ONLY
def test_pages_have_no_inline_script_or_style(client: TestClient) -> None:
    from server.models import House
    from server.services.demo import load_demo_house

    with client.app.state.session_factory() as s:  # type: ignore[attr-defined]
        house_id = load_demo_house(session=s)
        s.commit()
        house = s.get(House, house_id)
        assert house is not None
        surface_id, upgrade_id = house.surfaces[0].id, house.upgrades[0].id
        package = house.packages[0].slug
    pages = ["/houses", f"/houses/{house_id}", f"/houses/{house_id}/compare", "/library",
             "/tools/pipe", "/admin/users", "/price-book", f"/houses/{house_id}/surfaces/{surface_id}",
             f"/houses/{house_id}/upgrades/{upgrade_id}", f"/houses/{house_id}/quote/{package}"]  # fmt: skip
    for path in pages:
        response = client.get(path)
        assert response.status_code == 200, path
        html = response.text
        assert not re.search(r"<script(?![^>]*\bsrc=)[^>]*>", html), f"inline <script> on {path}"
        assert not re.search(r"\sstyle\s*=", html), f"style attribute on {path} (blocked by CSP)"
        assert "<style" not in html, f"<style> element on {path}"
        assert not re.search(r"\son[a-z]+\s*=", html), f"inline event handler on {path}"
        assert "javascript:" not in html, path


def test_staff_get_404_on_the_users_page(staff_client: TestClient, firm_a: Account) -> None:
    for method, path in (("GET", "/admin/users"), ("POST", "/admin/users"),
                         ("POST", f"/admin/users/{firm_a.user_id}/password"),
                         ("POST", f"/admin/users/{firm_a.user_id}/active")):  # fmt: skip
        r = staff_client.request(method, path, data={"password": "x" * 12, "email": "a@b.cd"})
        assert r.status_code == 404, f"{method} {path}"
        assert "admin@firm-a.invalid" not in r.text
    # staff do not see the Users link either
    assert "/admin/users" not in staff_client.get("/houses").text


def test_admin_adds_users_with_typed_or_made_up_passwords(
    client: TestClient, fast_hashing: None
) -> None:
    r = client.post("/admin/users", data={"email": "new@firm-a.invalid", "name": "New person",
                                          "role": "staff", "password": "typed-temp-pass"},
                    follow_redirects=False)  # fmt: skip
    assert r.status_code == 303 and r.headers["location"] == "/admin/users?done=added"
    page = client.get(r.headers["location"]).text
    assert "new@firm-a.invalid" in page and "User added" in page
    # made-up password: shown once on the answer page, 12 URL-safe characters
    r = client.post("/admin/users", data={"email": "second@firm-a.invalid", "role": "admin"})
    assert r.status_code == 200
    shown = re.search(
        r"Temporary password for second@firm-a.invalid</h2>\s*<p><code[^>]*>([^<]+)</code>", r.text
    )
    assert shown and len(shown.group(1)) == 12
    assert shown.group(1) not in client.get("/admin/users").text
    assert r.headers["Cache-Control"] == "no-store"


def test_admin_form_errors_sit_beside_the_field_and_keep_input(
    client: TestClient, fast_hashing: None
) -> None:
    r = client.post("/admin/users", data={"email": "admin@firm-a.invalid", "name": "Dup",
                                          "password": "secret-typed-1"})  # fmt: skip
    assert r.status_code == 422
    assert 'id="u-email-err"' in r.text and "already an account" in r.text
    assert 'value="admin@firm-a.invalid"' in r.text and 'value="Dup"' in r.text
    assert "secret-typed-1" not in r.text
    r = client.post("/admin/users", data={"email": "ok@firm-a.invalid", "password": "short"})
    assert r.status_code == 422 and "at least 10 characters" in r.text
    assert 'value="short"' not in r.text
    r = client.post("/admin/users", data={"email": "not-an-email", "password": "long-enough-1"})
    assert r.status_code == 422 and "like name@example.com" in r.text


def test_admin_cannot_lock_themselves_out(client: TestClient, firm_a: Account) -> None:
    r = client.post(f"/admin/users/{firm_a.user_id}/active", data={"active": "0"})
    assert r.status_code == 422 and "cannot deactivate your own account" in r.text
    assert client.get("/houses").status_code == 200


def test_other_firms_admin_cannot_touch_firm_a_users(other_client: TestClient, staff_a: Account,
                                                     fast_hashing: None) -> None:  # fmt: skip
    for path, data in ((f"/admin/users/{staff_a.user_id}/password", {"password": "x" * 12}),
                       (f"/admin/users/{staff_a.user_id}/active", {"active": "0"})):  # fmt: skip
        r = other_client.post(path, data=data)
        assert r.status_code == 404, path
        assert_no_firm_a_data(r.text, path)
    page = other_client.get("/admin/users").text
    assert "admin@firm-b.invalid" in page
    assert_no_firm_a_data(page, "Firm B's Users page")
