"""Signing in and out through the real /login form: cookies, CSRF on the form, rate limit,
password reset and deactivation ending sessions."""

from __future__ import annotations

import re

import pytest
from fastapi.testclient import TestClient
from sqlalchemy import select

from server import security
from server.config import Settings
from server.db import session_scope
from server.models import LoginAttempt, User
from server.security import ANON_CSRF_COOKIE, CSRF_HEADER, SESSION_COOKIE
from server.services import accounts
from tests.conftest import TEST_PASSWORD, Account, sign_in
from tests.security.conftest import SQLITE_ONLY

pytestmark = pytest.mark.usefixtures("fast_hashing")


def _form_token(client: TestClient, path: str = "/login") -> str:
    page = client.get(path)
    match = re.search(r'name="csrf_token" value="([0-9a-f]{64})"', page.text)
    assert match, "the form carries a CSRF token"
    return match.group(1)


def _login(
    client: TestClient, email: str, password: str, next_path: str = "", token: str | None = None
):  # type: ignore[no-untyped-def]
    token = token if token is not None else _form_token(client)
    data = {"email": email, "password": password, "next": next_path, "csrf_token": token}
    return client.post("/login", data=data, follow_redirects=False)


def _session_cookie_header(response) -> str:  # type: ignore[no-untyped-def]
    found = [
        c for c in response.headers.get_list("set-cookie") if c.startswith(SESSION_COOKIE + "=")
    ]
    assert len(found) == 1
    return found[0]


def test_sign_in_sets_a_safe_cookie_and_opens_the_app(
    anon_client: TestClient, firm_a: Account
) -> None:
    r = _login(anon_client, "  Admin@Firm-A.invalid ", TEST_PASSWORD, next_path="/library")
    assert r.status_code == 303 and r.headers["location"] == "/library"
    cookie = _session_cookie_header(r)
    for flag in ("HttpOnly", "SameSite=Lax", "Path=/"):
        assert flag in cookie
    assert "Secure" not in cookie  # plain http (the test server) and cookie_secure off
    # 7 days absolute: 604800 s (a second may pass between issuing and this header)
    max_age = int(re.search(r"Max-Age=(\d+)", cookie).group(1))  # type: ignore[union-attr]
    assert 604790 <= max_age <= 604800
    page = anon_client.get("/library")
    assert page.status_code == 200 and "Signed in as" in page.text and "Sign out" in page.text


@SQLITE_ONLY
def test_cookie_is_secure_over_https_or_when_configured(app, firm_a: Account, db_url: str) -> None:  # type: ignore[no-untyped-def]
    with TestClient(app, base_url="https://testserver") as https_client:
        r = _login(https_client, firm_a.email, TEST_PASSWORD)
        assert "; Secure" in _session_cookie_header(r)
    from server.app import create_app

    behind_proxy = create_app(Settings(environment="test", database_url=db_url, cookie_secure=True))
    with TestClient(behind_proxy) as proxied:
        first = proxied.get("/login")
        anon = [c for c in first.headers.get_list("set-cookie") if c.startswith(ANON_CSRF_COOKIE)]
        assert anon and "; Secure" in anon[0]
        # the client speaks plain http here, so it would not send a Secure cookie back: hand
        # it over as the browser on the other side of the TLS proxy would
        value = anon[0].split(";", 1)[0].split("=", 1)[1]
        proxied.cookies.set(ANON_CSRF_COOKIE, value, domain="testserver.local")
        token = re.search(r'name="csrf_token" value="([0-9a-f]{64})"', first.text).group(1)  # type: ignore[union-attr]
        r = _login(proxied, firm_a.email, TEST_PASSWORD, token=token)
        assert "; Secure" in _session_cookie_header(r)
    behind_proxy.state.engine.dispose()


@SQLITE_ONLY
def test_login_form_needs_its_csrf_token(anon_client: TestClient, firm_a: Account) -> None:
    r = _login(anon_client, firm_a.email, TEST_PASSWORD, token="")
    assert r.status_code == 403 and SESSION_COOKIE not in r.headers.get("set-cookie", "")
    r = _login(anon_client, firm_a.email, TEST_PASSWORD, token="f" * 64)
    assert r.status_code == 403
    # a token made for another visitor's anonymous cookie does not fit this one
    with TestClient(anon_client.app) as stranger:  # type: ignore[arg-type]
        theirs = _form_token(stranger)
    assert _login(anon_client, firm_a.email, TEST_PASSWORD, token=theirs).status_code == 403


@SQLITE_ONLY
def test_wrong_password_keeps_the_email_never_the_password(
    anon_client: TestClient, firm_a: Account
) -> None:
    r = _login(anon_client, "admin@firm-a.invalid", "wrong-password-typed")
    assert r.status_code == 401
    assert 'value="admin@firm-a.invalid"' in r.text
    assert "wrong-password-typed" not in r.text
    assert "do not match an active account" in r.text
    # an unknown e-mail gets the very same message (no hint which part was wrong)
    r2 = _login(anon_client, "nobody@firm-a.invalid", "wrong-password-typed")
    assert r2.status_code == 401 and "do not match an active account" in r2.text


@SQLITE_ONLY
def test_unknown_email_still_runs_a_password_check(
    app, firm_a: Account, monkeypatch: pytest.MonkeyPatch
) -> None:  # type: ignore[no-untyped-def]
    calls: list[str] = []
    real = security.verify_password
    monkeypatch.setattr(
        accounts, "verify_password", lambda h, p: calls.append("user") or real(h, p)
    )
    monkeypatch.setattr(accounts, "dummy_verify", lambda p: calls.append("dummy"))
    with session_scope(app.state.session_factory) as s:
        assert (
            accounts.authenticate(
                session=s, email="nobody@x.invalid", password="x" * 12, client="c"
            )
            is None
        )
        assert (
            accounts.authenticate(session=s, email=firm_a.email, password="x" * 12, client="c")
            is None
        )
        assert accounts.authenticate(
            session=s, email=firm_a.email, password=TEST_PASSWORD, client="c"
        )
    assert calls == ["dummy", "user", "user"]


@SQLITE_ONLY
def test_open_redirects_are_refused(anon_client: TestClient, firm_a: Account) -> None:
    for target in ("//evil.example/x", "https://evil.example", "/\\evil.example", "/logout",
                   "javascript:alert(1)", "/houses\r\nSet-Cookie: x=1"):  # fmt: skip
        anon_client.cookies.clear()
        r = _login(anon_client, firm_a.email, TEST_PASSWORD, next_path=target)
        assert r.status_code == 303 and r.headers["location"] == "/houses", target
    anon_client.cookies.clear()
    r = _login(anon_client, firm_a.email, TEST_PASSWORD, next_path="/houses?q=lane")
    assert r.headers["location"] == "/houses?q=lane"


@SQLITE_ONLY
def test_sign_out_ends_the_cookie_and_everywhere_ends_every_session(app, client: TestClient,
                                                                    firm_a: Account) -> None:  # type: ignore[no-untyped-def]  # fmt: skip
    old_cookie = client.cookies.get(SESSION_COOKIE)
    r = client.post("/logout", follow_redirects=False)
    assert r.status_code == 303 and r.headers["location"] == "/login"
    assert "Max-Age=0" in _session_cookie_header(r)
    # plain sign-out ends this session on the server: a kept copy of the cookie is refused
    client.cookies.set(SESSION_COOKIE, old_cookie, domain="testserver.local")  # type: ignore[arg-type]
    assert client.get("/houses", follow_redirects=False).status_code == 303
    # "everywhere" ends every session of the user, this one and every other device's
    with TestClient(app) as other_device:
        sign_in(other_device, app, firm_a)
        assert other_device.get("/houses").status_code == 200
        r = other_device.post("/logout", data={"everywhere": "1"}, follow_redirects=False)
        assert r.status_code == 303
    with TestClient(app) as third_device:
        sign_in(third_device, app, firm_a)  # a cookie of the old session version
        assert third_device.get("/houses", follow_redirects=False).status_code == 303


def test_email_rate_limit_then_success_after_the_window(app, anon_client: TestClient, firm_a: Account,
                                                        monkeypatch: pytest.MonkeyPatch) -> None:  # type: ignore[no-untyped-def]  # fmt: skip
    start = security.clock()
    monkeypatch.setattr(security, "clock", lambda: start)
    for _ in range(accounts.EMAIL_FAILURE_LIMIT):  # 5 wrong passwords: each an ordinary 401
        assert _login(anon_client, firm_a.email, "not-the-password").status_code == 401
    # the 6th try is refused before any check, even with the right password
    r = _login(anon_client, firm_a.email, TEST_PASSWORD)
    assert r.status_code == 429
    assert r.headers["Retry-After"] == str(15 * 60)  # the oldest failure leaves in 900 s
    assert "Too many tries" in r.text and 'value="admin@firm-a.invalid"' in r.text
    assert SESSION_COOKIE not in r.headers.get("set-cookie", "")
    # another e-mail from the same client is not blocked by the e-mail limit
    assert _login(anon_client, "nobody@firm-a.invalid", "x" * 12).status_code == 401
    # 14 min later: still refused, and the refused tries did not extend the wait
    monkeypatch.setattr(security, "clock", lambda: start + 14 * 60)
    r = _login(anon_client, firm_a.email, TEST_PASSWORD)
    assert r.status_code == 429 and r.headers["Retry-After"] == "60"
    # after the 15-minute window: the right password works
    monkeypatch.setattr(security, "clock", lambda: start + 15 * 60 + 1)
    assert _login(anon_client, firm_a.email, TEST_PASSWORD).status_code == 303
    with session_scope(app.state.session_factory) as s:
        rows = s.scalars(select(LoginAttempt).where(LoginAttempt.email == firm_a.email)).all()
        # 5 failures + 1 success recorded; the 2 refused tries were not
        assert sorted(r.succeeded for r in rows) == [False] * 5 + [True]


def test_a_success_resets_the_email_count(anon_client: TestClient, firm_a: Account) -> None:
    for _ in range(4):
        assert _login(anon_client, firm_a.email, "not-the-password").status_code == 401
    assert _login(anon_client, firm_a.email, TEST_PASSWORD).status_code == 303
    anon_client.cookies.clear()
    for _ in range(4):  # 4 more failures: 8 in the window, but only 4 since the success
        assert _login(anon_client, firm_a.email, "not-the-password").status_code == 401
    assert _login(anon_client, firm_a.email, TEST_PASSWORD).status_code == 303


def test_client_address_rate_limit(anon_client: TestClient, firm_a: Account) -> None:
    # one failure each for as many different e-mails as the limit allows (never hits the
    # e-mail limit): the address is spraying accounts
    for i in range(accounts.CLIENT_ACCOUNT_LIMIT):
        assert _login(anon_client, f"guess{i}@firm-a.invalid", "x" * 12).status_code == 401
    r = _login(anon_client, firm_a.email, TEST_PASSWORD)
    assert r.status_code == 429 and 0 < int(r.headers["Retry-After"]) <= 900


def test_one_users_typos_do_not_lock_out_the_office(app, anon_client: TestClient, firm_a: Account,
                                                    staff_a: Account) -> None:  # type: ignore[no-untyped-def]  # fmt: skip
    # One person behind the office's one address fails 32 times in a few minutes (4 wrong
    # passwords, then the right one, 8 times over: the per-account limit of 5 never trips).
    for _ in range(8):
        for _ in range(4):
            assert _login(anon_client, staff_a.email, "not-the-password").status_code == 401
        assert _login(anon_client, staff_a.email, TEST_PASSWORD).status_code == 303
        anon_client.cookies.clear()
    with session_scope(app.state.session_factory) as s:
        failed = s.scalars(select(LoginAttempt).where(LoginAttempt.succeeded.is_(False))).all()
        assert len(failed) == 32 and {row.client for row in failed} == {"testclient"}
    # a colleague at the same address signs in (before: 429 for 15 minutes, the whole office)
    assert _login(anon_client, firm_a.email, TEST_PASSWORD).status_code == 303
    # and the typist's own account is still limited after 5 failures in a row
    anon_client.cookies.clear()
    for _ in range(accounts.EMAIL_FAILURE_LIMIT):
        assert _login(anon_client, staff_a.email, "not-the-password").status_code == 401
    assert _login(anon_client, staff_a.email, TEST_PASSWORD).status_code == 429
    assert _login(anon_client, firm_a.email, TEST_PASSWORD).status_code == 303


def test_an_address_spraying_many_accounts_is_limited(app, anon_client: TestClient,
                                                      firm_a: Account) -> None:  # type: ignore[no-untyped-def]  # fmt: skip
    limit = accounts.CLIENT_ACCOUNT_LIMIT
    # one fewer account than the limit, each tried up to its own limit: not yet limited
    for i in range(limit - 1):
        for _ in range(accounts.EMAIL_FAILURE_LIMIT):
            assert _login(anon_client, f"person{i}@firm-a.invalid", "x" * 12).status_code == 401
    assert _login(anon_client, firm_a.email, TEST_PASSWORD).status_code == 303
    anon_client.cookies.clear()
    # the limit-th different account: every account is refused from this address, even with
    # the right password, until the window has passed
    assert _login(anon_client, "person-last@firm-a.invalid", "x" * 12).status_code == 401
    r = _login(anon_client, firm_a.email, TEST_PASSWORD)
    refused_at = security.clock()  # Retry-After counts from this answer, not from the start
    assert r.status_code == 429 and "Too many tries" in r.text
    assert 0 < int(r.headers["Retry-After"]) <= accounts.WINDOW_SECONDS
    # the same account from another address is not affected
    with TestClient(app, client=("198.51.100.20", 50000)) as elsewhere:
        assert _login(elsewhere, firm_a.email, TEST_PASSWORD).status_code == 303
    # once the oldest account's last failure has left the window, the address may try again
    wait = int(r.headers["Retry-After"])
    with pytest.MonkeyPatch.context() as mp:
        mp.setattr(security, "clock", lambda: refused_at + wait + 1)
        assert _login(anon_client, firm_a.email, TEST_PASSWORD).status_code == 303


def test_password_reset_by_admin_kills_old_sessions(app, client: TestClient, staff_client: TestClient,
                                                   staff_a: Account, anon_client: TestClient) -> None:  # type: ignore[no-untyped-def]  # fmt: skip
    assert staff_client.get("/houses").status_code == 200
    r = client.post(f"/admin/users/{staff_a.user_id}/password",
                    data={"password": "brand-new-password"}, follow_redirects=False)  # fmt: skip
    assert r.status_code == 303
    # the staff member's open session is over, on pages and in the API
    assert staff_client.get("/houses", follow_redirects=False).status_code == 303
    assert staff_client.get("/api/v1/houses/1/document").status_code == 401
    # the old password no longer works, the new one does
    assert _login(anon_client, staff_a.email, TEST_PASSWORD).status_code == 401
    assert _login(anon_client, staff_a.email, "brand-new-password").status_code == 303
    with session_scope(app.state.session_factory) as s:
        user = s.get(User, staff_a.user_id)
        assert user is not None and user.session_version == 2
        assert user.password_hash.startswith("$argon2id$")


def test_deactivated_user_is_out_and_cannot_sign_in(client: TestClient, staff_client: TestClient,
                                                    staff_a: Account, anon_client: TestClient) -> None:  # fmt: skip
    r = client.post(f"/admin/users/{staff_a.user_id}/active", data={"active": "0"},
                    follow_redirects=False)  # fmt: skip
    assert r.status_code == 303
    assert staff_client.get("/houses", follow_redirects=False).status_code == 303
    assert _login(anon_client, staff_a.email, TEST_PASSWORD).status_code == 401
    client.post(f"/admin/users/{staff_a.user_id}/active", data={"active": "1"})
    assert _login(anon_client, staff_a.email, TEST_PASSWORD).status_code == 303


@SQLITE_ONLY
def test_demo_sign_ins_are_shown_in_development_only(db_url: str, firm_a: Account) -> None:
    from server.app import create_app

    for environment, shown in (("development", True), ("test", False), ("production", False)):
        settings = Settings(environment=environment, database_url=db_url, secret_key="s" * 40)
        application = create_app(settings)
        with TestClient(application) as c:
            page = c.get("/login").text
        application.state.engine.dispose()
        assert ("auditor@demo.invalid" in page) is shown, environment


@SQLITE_ONLY
def test_signed_in_visitor_is_sent_on_from_login(client: TestClient) -> None:
    r = client.get("/login?next=/library", follow_redirects=False)
    assert r.status_code == 303 and r.headers["location"] == "/library"


@SQLITE_ONLY
def test_htmx_pages_carry_the_token_for_every_request(client: TestClient) -> None:
    page = client.get("/houses").text
    token = client.headers[CSRF_HEADER]
    assert f"""hx-headers='{{"X-CSRF-Token": "{token}"}}'""" in page
    assert f'name="csrf_token" value="{token}"' in page
