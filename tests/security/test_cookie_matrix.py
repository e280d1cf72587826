"""The route matrix, cookie cases: a tampered, idle-expired, too-old or revoked session cookie is
treated as no session on every route (303 to /login, or 401 for /api/)."""

from __future__ import annotations

import pytest
from fastapi.testclient import TestClient

from server import security
from server.db import session_scope
from server.models import User
from server.security import SESSION_COOKIE
from tests.conftest import Account
from tests.security.conftest import SQLITE_ONLY, FirmAObjects
from tests.security.routes import (
    SAMPLE,
    SIGN_IN_FIRST,
    assert_anonymous,
    fill,
    flip,
    only_cookie,
    param_values,
    protected_routes,
    send,
)


@SQLITE_ONLY
def test_tampered_cookie_is_anonymous(
    app, client: TestClient, firm_a_objects: FirmAObjects
) -> None:  # type: ignore[no-untyped-def]
    good = client.cookies.get(SESSION_COOKIE)
    assert good and client.get("/houses").status_code == 200
    signature = good.rsplit(".", 1)[1]
    variants = {
        "payload byte changed": flip(good, 3),
        "signature byte changed": flip(good, len(good) - len(signature) // 2),
        "signed with another key": security.issue_session(
            "another secret", user_id=1, session_version=1
        ),
        "not a cookie at all": "not-a-cookie",
    }
    values = param_values(firm_a_objects)
    routes = protected_routes(app)
    for name, bad in variants.items():
        assert bad != good
        # every route for one kind of tampering; a page, a form and the API for the others
        # (one code path decides: server.security.read_session, unit-tested per variant)
        sample = routes if name == "signature byte changed" else [
            r for r in routes if (r[0], r[1]) in SAMPLE
        ]  # fmt: skip
        assert sample
        for method, path, route in sample:
            only_cookie(client, bad)
            response = send(client, method, fill(path, values), route)
            assert_anonymous(response, method, path)
    # the dead cookie is deleted by the response
    only_cookie(client, variants["payload byte changed"])
    r = client.get("/houses", follow_redirects=False)
    assert any(
        c.startswith(f"{SESSION_COOKIE}=;") and "Max-Age=0" in c
        for c in r.headers.get_list("set-cookie")
    )


@SQLITE_ONLY
def test_idle_session_expires_after_12_hours(app, client: TestClient, firm_a: Account,
                                             monkeypatch: pytest.MonkeyPatch) -> None:  # type: ignore[no-untyped-def]  # fmt: skip
    start = security.clock()
    # 11 h 59 min later: still signed in (and the cookie is re-signed, moving the idle limit)
    monkeypatch.setattr(security, "clock", lambda: start + 12 * 3600 - 60)
    r = client.get("/houses", follow_redirects=False)
    assert r.status_code == 200
    assert any(c.startswith(f"{SESSION_COOKIE}=") for c in r.headers.get_list("set-cookie"))
    # a cookie 12 h + 1 s old is not accepted
    old = security.issue_session(
        app.state.settings.secret_key, user_id=firm_a.user_id, session_version=1
    )
    monkeypatch.setattr(security, "clock", lambda: start + 2 * 12 * 3600)
    only_cookie(client, old)
    r = client.get("/houses", follow_redirects=False)
    assert r.status_code == 303 and r.headers["location"].startswith("/login")


@SQLITE_ONLY
def test_expired_cookie_is_anonymous_on_every_route(app, client: TestClient,
                                                    firm_a_objects: FirmAObjects,
                                                    monkeypatch: pytest.MonkeyPatch) -> None:  # type: ignore[no-untyped-def]  # fmt: skip
    cookie = client.cookies.get(SESSION_COOKIE)
    assert cookie
    later = security.clock() + security.SESSION_IDLE_SECONDS + 1
    monkeypatch.setattr(security, "clock", lambda: later)
    values = param_values(firm_a_objects)
    for method, path, route in protected_routes(app):
        only_cookie(client, cookie)
        assert_anonymous(send(client, method, fill(path, values), route), method, path)


@SQLITE_ONLY
def test_absolute_limit_of_seven_days(app, client: TestClient, firm_a: Account) -> None:  # type: ignore[no-untyped-def]
    secret = app.state.settings.secret_key
    week_ago = security.clock() - security.SESSION_ABSOLUTE_SECONDS - 1
    # freshly signed (not idle) but signed in more than 7 days ago
    value = security.issue_session(secret, user_id=firm_a.user_id, session_version=1,
                                   signed_in_at=week_ago)  # fmt: skip
    only_cookie(client, value)
    assert client.get("/houses", follow_redirects=False).status_code == 303


def test_revoked_or_inactive_user_is_anonymous(app, client: TestClient, firm_a: Account) -> None:  # type: ignore[no-untyped-def]
    assert client.get("/houses").status_code == 200
    with session_scope(app.state.session_factory) as s:
        user = s.get(User, firm_a.user_id)
        assert user is not None
        user.session_version += 1
    assert client.get("/houses", follow_redirects=False).status_code == 303
    assert client.get("/api/v1/houses/1/document").json() == SIGN_IN_FIRST
    with session_scope(app.state.session_factory) as s:
        user = s.get(User, firm_a.user_id)
        assert user is not None
        user.session_version -= 1
        user.is_active = False
    assert client.get("/houses", follow_redirects=False).status_code == 303
