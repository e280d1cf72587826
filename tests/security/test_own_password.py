"""A signed-in user changes their own password on /account.

What must hold: the current password is required (a device left signed in is not enough) and
wrong tries count against the sign-in rate limit; the rules for a new password are the admin's
(10 to 1024 characters), typed twice; on success this device stays signed in with a fresh
cookie, every other session of the user ends, the old password stops working and the new one
works; typed passwords are never echoed back into the page.
"""

from __future__ import annotations

import re

import pytest
from fastapi.testclient import TestClient

from server.security import CSRF_HEADER, SESSION_COOKIE
from tests.conftest import TEST_PASSWORD, Account, sign_in

pytestmark = pytest.mark.usefixtures("fast_hashing")
NEW = "a-new-password-for-firm-a"


def _change(client: TestClient, current: str, new: str, repeat: str | None = None):  # type: ignore[no-untyped-def]
    data = {"current_password": current, "new_password": new,
            "repeat_password": new if repeat is None else repeat}  # fmt: skip
    return client.post("/account/password", data=data, follow_redirects=False)


def _login(client: TestClient, email: str, password: str) -> int:
    page = client.get("/login")
    token = re.search(r'name="csrf_token" value="([0-9a-f]{64})"', page.text).group(1)  # type: ignore[union-attr]
    data = {"email": email, "password": password, "csrf_token": token}
    return client.post("/login", data=data, follow_redirects=False).status_code


def test_the_account_page_shows_who_and_the_form(client: TestClient, firm_a: Account) -> None:
    page = client.get("/account")
    assert page.status_code == 200
    assert firm_a.email in page.text and 'action="/account/password"' in page.text
    assert 'autocomplete="current-password"' in page.text
    assert 'href="/account" aria-current="page"' in page.text  # the header link, current


@pytest.mark.parametrize(
    ("current", "new", "repeat", "field", "message"),
    [
        ("wrong-password-0", NEW, NEW, "current_password", "not your current password"),
        (TEST_PASSWORD, "short", "short", "new_password", "at least 10 characters"),
        (TEST_PASSWORD, NEW, NEW + "x", "repeat_password", "the two new passwords differ"),
        (TEST_PASSWORD, TEST_PASSWORD, TEST_PASSWORD, "new_password", "other than your current"),
    ],
)
def test_refusals_say_which_field_and_echo_no_password(
    client: TestClient, current: str, new: str, repeat: str, field: str, message: str
) -> None:
    response = _change(client, current, new, repeat)
    assert response.status_code == 422
    assert message in response.text
    assert f'id="{field}-err"' in response.text
    for typed in {current, new, repeat}:
        assert f'value="{typed}"' not in response.text
    assert _change(client, TEST_PASSWORD, NEW).status_code == 303  # nothing was changed before


def test_a_change_keeps_this_device_and_ends_the_others(
    app, client: TestClient, anon_client: TestClient, firm_a: Account
) -> None:  # type: ignore[no-untyped-def]
    with TestClient(app) as other_device:
        sign_in(other_device, app, firm_a)
        assert other_device.get("/houses", follow_redirects=False).status_code == 200
        response = _change(client, TEST_PASSWORD, NEW)
        assert response.status_code == 303
        assert response.headers["location"] == "/account?done=password"
        cookies = [c for c in response.headers.get_list("set-cookie")
                   if c.startswith(SESSION_COOKIE + "=")]  # fmt: skip
        assert len(cookies) == 1 and "HttpOnly" in cookies[0]
        # this device: the new cookie (the test client keeps it); a new CSRF token with it
        page = client.get("/account?done=password", follow_redirects=False)
        assert page.status_code == 200 and "Password changed" in page.text
        token = re.search(r'name="csrf_token" value="([0-9a-f]{64})"', page.text).group(1)  # type: ignore[union-attr]
        assert token != client.headers[CSRF_HEADER]
        # the other device is signed out
        assert other_device.get("/houses", follow_redirects=False).status_code == 303
    assert _login(anon_client, firm_a.email, TEST_PASSWORD) == 401
    assert _login(anon_client, firm_a.email, NEW) == 303


def test_wrong_current_passwords_hit_the_sign_in_rate_limit(client: TestClient) -> None:
    statuses = [_change(client, f"wrong-password-{i}", NEW).status_code for i in range(12)]
    assert statuses[0] == 422
    assert 429 in statuses, statuses
    limited = _change(client, TEST_PASSWORD, NEW)  # even the right one waits now
    assert limited.status_code == 429 and int(limited.headers["retry-after"]) > 0
    assert "too many wrong tries" in limited.text


def test_anonymous_visitors_are_sent_to_sign_in(anon_client: TestClient) -> None:
    assert anon_client.get("/account", follow_redirects=False).status_code == 303
    response = anon_client.post("/account/password", data={}, follow_redirects=False)
    assert response.status_code in (303, 403)  # no CSRF token and no session: never a change
