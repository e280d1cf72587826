"""Sign-out ends the session on the server: a kept copy of the cookie opens nothing afterwards,
while the same user's other devices stay signed in (server/services/accounts.py
``revoke_session``, checked by the per-request user lookup). On SQLite and PostgreSQL."""

from __future__ import annotations

import re
from datetime import timedelta
from typing import Any

import pytest
from fastapi.testclient import TestClient
from sqlalchemy import event, select

from server import security
from server.db import session_scope
from server.models import RevokedSession, User, utcnow
from server.security import CSRF_HEADER, SESSION_COOKIE
from server.services import accounts
from tests.conftest import TEST_PASSWORD, Account

pytestmark = pytest.mark.usefixtures("fast_hashing")


def _sign_in(client: TestClient, email: str) -> None:
    """Through the real /login form, as a person would; the client then sends the page's token."""
    client.headers.pop(CSRF_HEADER, None)  # a token of an earlier session would be refused
    page = client.get("/login")
    token = re.search(r'name="csrf_token" value="([0-9a-f]{64})"', page.text).group(1)  # type: ignore[union-attr]
    data = {"email": email, "password": TEST_PASSWORD, "next": "", "csrf_token": token}
    assert client.post("/login", data=data, follow_redirects=False).status_code == 303
    signed_in = client.get("/houses")
    assert signed_in.status_code == 200
    client.headers[CSRF_HEADER] = re.search(  # type: ignore[union-attr]
        r'name="csrf_token" value="([0-9a-f]{64})"', signed_in.text
    ).group(1)


def test_sign_out_revokes_this_session_and_no_other(app: Any, firm_a: Account) -> None:
    with TestClient(app) as laptop, TestClient(app) as tablet:
        _sign_in(laptop, firm_a.email)
        _sign_in(tablet, firm_a.email)
        kept = laptop.cookies.get(SESSION_COOKIE)
        assert kept
        r = laptop.post("/logout", follow_redirects=False)
        assert r.status_code == 303 and r.headers["location"] == "/login"
        # someone who kept the old cookie value (a shared computer, a copied header)
        with TestClient(app) as replay:
            replay.cookies.set(SESSION_COOKIE, kept, domain="testserver.local")
            page = replay.get("/houses", follow_redirects=False)
            assert page.status_code == 303
            assert page.headers["location"] == "/login?next=%2Fhouses"
            api = replay.get("/api/v1/houses/1/document")
            assert api.status_code == 401 and api.json()["detail"] == "sign in first"
            # nor can it be used to act: the sign-out form itself sends it to sign in
            assert replay.post("/logout", follow_redirects=False).status_code == 303
        # the same user's other device is still signed in
        assert tablet.get("/houses").status_code == 200
        assert tablet.get("/account").status_code == 200
        # and the laptop signs in again with a new session
        _sign_in(laptop, firm_a.email)
        assert laptop.cookies.get(SESSION_COOKIE) != kept


def test_a_refreshed_copy_of_a_signed_out_session_is_refused_too(
    app: Any, firm_a: Account, monkeypatch: pytest.MonkeyPatch
) -> None:
    start = security.clock()
    monkeypatch.setattr(security, "clock", lambda: start)
    with TestClient(app) as browser:
        _sign_in(browser, firm_a.email)
        first = browser.cookies.get(SESSION_COOKIE)
        # 6 minutes on, the cookie is signed again (sliding idle limit, same session)
        monkeypatch.setattr(security, "clock", lambda: start + 6 * 60)
        assert browser.get("/houses").status_code == 200
        refreshed = browser.cookies.get(SESSION_COOKIE)
        assert refreshed and refreshed != first
        assert browser.post("/logout", follow_redirects=False).status_code == 303
    for value in (first, refreshed):
        with TestClient(app) as replay:
            replay.cookies.set(SESSION_COOKIE, value, domain="testserver.local")  # type: ignore[arg-type]
            assert replay.get("/houses", follow_redirects=False).status_code == 303


def test_revoked_rows_are_kept_until_the_session_would_have_ended(
    app: Any, firm_a: Account
) -> None:
    with TestClient(app) as browser:
        _sign_in(browser, firm_a.email)
        browser.post("/logout", follow_redirects=False)
    with session_scope(app.state.session_factory) as s:
        (row,) = s.scalars(select(RevokedSession)).all()
        assert row.user_id == firm_a.user_id
        # 7 days (604,800 s) after the sign-in, the cookie's own absolute limit
        left = (row.expires_at.replace(tzinfo=row.expires_at.tzinfo or utcnow().tzinfo)
                - utcnow()).total_seconds()  # fmt: skip
        assert 604_800 - 60 < left <= 604_800
        row.expires_at = utcnow() - timedelta(seconds=1)  # as if a week had passed
    with TestClient(app) as browser:
        _sign_in(browser, firm_a.email)
        browser.post("/logout", follow_redirects=False)
    with session_scope(app.state.session_factory) as s:
        rows = s.scalars(select(RevokedSession)).all()
        assert len(rows) == 1 and rows[0].nonce != row.nonce  # the expired row was pruned


def test_the_revocation_check_adds_no_query(app: Any, firm_a: Account) -> None:
    """A signed-in page costs the same statements as before: the user lookup (with its firm
    and the revocation, one join) is still one statement."""
    statements: list[str] = []

    def record(_conn, _cursor, statement, _params, _context, _many):  # type: ignore[no-untyped-def]
        statements.append(statement)

    with TestClient(app) as browser:
        _sign_in(browser, firm_a.email)
        event.listen(app.state.engine, "before_cursor_execute", record)
        try:
            assert browser.get("/account").status_code == 200
        finally:
            event.remove(app.state.engine, "before_cursor_execute", record)
    lookups = [s for s in statements if "FROM users" in s]
    assert len(lookups) == 1 and "revoked_sessions" in lookups[0]
    assert not any(s.lstrip().upper().startswith("SELECT") and "revoked_sessions" in s
                   and "FROM users" not in s for s in statements)  # fmt: skip


def test_signing_out_one_session_twice_is_harmless(app: Any, firm_a: Account) -> None:
    """Two sign-outs of one session (two tabs of one browser) both end well; one row."""
    signed_in_at = security.clock()
    with session_scope(app.state.session_factory) as s:
        user = s.get(User, firm_a.user_id)
        assert user is not None
        for _ in range(2):
            accounts.revoke_session(session=s, user=user, nonce="n" * 22, signed_in_at=signed_in_at)
    with session_scope(app.state.session_factory) as s:
        assert [r.nonce for r in s.scalars(select(RevokedSession))] == ["n" * 22]
