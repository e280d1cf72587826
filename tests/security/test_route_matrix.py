"""The route matrix: every route of the app, walked from ``app.routes``, against every kind of
visitor who must not get in.

- anonymous -> 303 to /login (pages) or 401 ``{"detail": "sign in first"}`` (/api/)
- a tampered, expired, too-old or revoked session cookie -> the same as anonymous
- Firm B's admin on Firm A's objects -> 404 (never 403), and no Firm A text in the body
- Firm B's lists (houses, library, price book, users) -> none of Firm A's rows
- a state-changing request without the CSRF token, or with a wrong one -> 403

Public on purpose (and nothing else): ``/login``, ``/healthz``, the stateless calculators under
``/api/v1/calc/`` and the homeowner's view under ``/s/``. Not routes of ours: ``/static``,
``/openapi.json``, ``/docs``, ``/redoc``. A new route is covered automatically; a new kind of
path parameter must get a Firm A value in :func:`_param_values` (a test says so).
"""

from __future__ import annotations

import re
from typing import Any

import pytest
from fastapi.routing import APIRoute
from fastapi.testclient import TestClient
from starlette.datastructures import UploadFile

from server import security
from server.db import session_scope
from server.models import User
from server.security import CSRF_HEADER, SESSION_COOKIE
from tests.conftest import Account
from tests.security.conftest import SQLITE_ONLY, FirmAObjects, assert_no_firm_a_data

METHODS = ("GET", "POST", "PUT", "PATCH", "DELETE")
NOT_OURS = {"/static", "/openapi.json", "/docs", "/docs/oauth2-redirect", "/redoc"}
PUBLIC_EXACT = {("GET", "/healthz"), ("GET", "/login"), ("POST", "/login")}
#: a page, a form post and a JSON route: the sample for the variants of one check
SAMPLE = {("GET", "/houses"), ("POST", "/houses"), ("GET", "/api/v1/houses/{house_id}/document")}
SIGN_IN_FIRST = {"detail": "sign in first", "errors": []}
PARAM = re.compile(r"{([^}:]+)(?::[^}]*)?}")


def _flat_routes(routes) -> list[Any]:  # type: ignore[no-untyped-def]
    """Every route, with routers included by ``include_router`` opened up (FastAPI keeps them
    as included-router entries that expose ``effective_route_contexts()``)."""
    out: list[Any] = []
    for route in routes:
        contexts = getattr(route, "effective_route_contexts", None)
        out.extend(contexts() if contexts is not None else [route])
    return out


def _routes(app) -> list[tuple[str, str, Any]]:  # type: ignore[no-untyped-def]
    """(method, path template, route) for every route of ours; ``route.dependant`` is set."""
    rows = []
    for route in _flat_routes(app.routes):
        if getattr(route, "dependant", None) is None:
            assert route.path in NOT_OURS, (
                f"unexpected route that is not an API route: {route.path}"
            )
            continue
        assert isinstance(route.original_route if hasattr(route, "original_route") else route,
                          APIRoute)  # fmt: skip
        for method in sorted(set(route.methods) & set(METHODS)):
            rows.append((method, route.path, route))
    return rows


def _is_public(method: str, path: str) -> bool:
    return (
        (method, path) in PUBLIC_EXACT or path.startswith("/api/v1/calc/") or path.startswith("/s/")
    )


def _param_values(objects: FirmAObjects) -> dict[str, Any]:
    from server.web.house_settings import SECTIONS

    return {
        "house_id": objects.house_id,
        "surface_id": objects.surface_id,
        "upgrade_id": objects.upgrade_id,
        "package_slug": objects.package_slug,
        "link_id": objects.link_id,
        "item_id": objects.item_id,
        "user_id": objects.user_id,
        "material_id": objects.material_id,
        "section": next(iter(SECTIONS)),
        "token": "A" * 43,
    }


def _fill(path: str, values: dict[str, Any]) -> str:
    return PARAM.sub(lambda m: str(values.get(m.group(1), 1)), path)


def _form_for(route: Any) -> dict[str, Any]:
    """Plausible form fields and files for the route's declared body, so that validation
    passes and the route itself decides (404 for someone else's object)."""
    data: dict[str, str] = {}
    files: dict[str, tuple[str, bytes]] = {}
    for field in route.dependant.body_params:
        name = field.alias or field.name
        annotation = getattr(field.field_info, "annotation", None)
        if annotation is UploadFile or "UploadFile" in str(annotation):
            files[name] = ("x.csv", b"1\n")
        else:
            data[name] = "1"
    out: dict[str, Any] = {"data": data}
    if files:
        out["files"] = files
    return out


def _request(client: TestClient, method: str, url: str, route: Any = None, **kw: Any):  # type: ignore[no-untyped-def]
    if method != "GET" and route is not None and "data" not in kw and "json" not in kw:
        kw.update(_form_for(route))
    return client.request(method, url, follow_redirects=False, **kw)


def _assert_anonymous(response, method: str, path: str) -> None:  # type: ignore[no-untyped-def]
    where = f"{method} {path}"
    if path.startswith("/api/"):
        assert response.status_code == 401, f"{where}: {response.status_code}"
        assert response.json() == SIGN_IN_FIRST, where
    else:
        assert response.status_code == 303, f"{where}: {response.status_code}"
        assert response.headers["location"].startswith("/login"), where
    assert_no_firm_a_data(response.text, where)


@SQLITE_ONLY
def test_public_routes_are_exactly_the_listed_ones(app) -> None:  # type: ignore[no-untyped-def]
    from server.web.deps import is_public

    routes = _routes(app)
    assert len(routes) >= 30  # the matrix really walks the app
    for method, path, _route in routes:
        sample = _fill(path, {})
        expected = _is_public(method, path)
        assert is_public(sample) == expected, f"{method} {path}: the app and this test disagree"
    public = {(m, p) for m, p, _ in routes if _is_public(m, p)}
    outside_prefixes = {(m, p) for m, p in public if not p.startswith(("/api/v1/calc/", "/s/"))}
    assert outside_prefixes == PUBLIC_EXACT


@SQLITE_ONLY
def test_every_path_parameter_has_a_firm_a_value(app, firm_a_objects: FirmAObjects) -> None:  # type: ignore[no-untyped-def]
    values = _param_values(firm_a_objects)
    missing = {
        (name, path)
        for _m, path, _r in _routes(app)
        if not _is_public(_m, path)
        for name in PARAM.findall(path)
        if name not in values
    }
    assert not missing, f"add a Firm A value for these path parameters: {sorted(missing)}"


def test_anonymous_is_sent_to_sign_in_everywhere(app, anon_client: TestClient,
                                                  firm_a_objects: FirmAObjects) -> None:  # type: ignore[no-untyped-def]  # fmt: skip
    values = _param_values(firm_a_objects)
    checked = 0
    for method, path, route in _routes(app):
        if _is_public(method, path):
            continue
        response = _request(anon_client, method, _fill(path, values), route)
        _assert_anonymous(response, method, path)
        checked += 1
    assert checked >= 25


@SQLITE_ONLY
def test_htmx_request_of_anonymous_gets_a_redirect_header(anon_client: TestClient) -> None:
    r = anon_client.get("/houses", headers={"HX-Request": "true"}, follow_redirects=False)
    assert r.status_code == 401
    assert r.headers["HX-Redirect"] == "/login?next=%2Fhouses"


@SQLITE_ONLY
def test_next_is_the_page_asked_for(anon_client: TestClient) -> None:
    r = anon_client.get("/houses?q=lane", follow_redirects=False)
    assert r.headers["location"] == "/login?next=%2Fhouses%3Fq%3Dlane"


def _only_cookie(client: TestClient, value: str) -> None:
    """Make ``value`` the client's one session cookie (responses delete a bad one; put it
    back before each request so every route sees it)."""
    client.cookies.clear()
    client.cookies.set(SESSION_COOKIE, value, domain="testserver.local")


def _flip(value: str, index: int) -> str:
    ch = value[index]
    return value[:index] + ("B" if ch != "B" else "C") + value[index + 1 :]


def _protected(app) -> list[tuple[str, str, Any]]:  # type: ignore[no-untyped-def]
    return [(m, p, r) for m, p, r in _routes(app) if not _is_public(m, p)]


@SQLITE_ONLY
def test_tampered_cookie_is_anonymous(
    app, client: TestClient, firm_a_objects: FirmAObjects
) -> None:  # type: ignore[no-untyped-def]
    good = client.cookies.get(SESSION_COOKIE)
    assert good and client.get("/houses").status_code == 200
    signature = good.rsplit(".", 1)[1]
    variants = {
        "payload byte changed": _flip(good, 3),
        "signature byte changed": _flip(good, len(good) - len(signature) // 2),
        "signed with another key": security.issue_session(
            "another secret", user_id=1, session_version=1
        ),
        "not a cookie at all": "not-a-cookie",
    }
    values = _param_values(firm_a_objects)
    routes = _protected(app)
    for name, bad in variants.items():
        assert bad != good
        # every route for one kind of tampering; a page, a form and the API for the others
        # (one code path decides: server.security.read_session, unit-tested per variant)
        sample = routes if name == "signature byte changed" else [
            r for r in routes if (r[0], r[1]) in SAMPLE
        ]  # fmt: skip
        assert sample
        for method, path, route in sample:
            _only_cookie(client, bad)
            response = _request(client, method, _fill(path, values), route)
            _assert_anonymous(response, method, path)
    # the dead cookie is deleted by the response
    _only_cookie(client, variants["payload byte changed"])
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
    _only_cookie(client, old)
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
    values = _param_values(firm_a_objects)
    for method, path, route in _protected(app):
        _only_cookie(client, cookie)
        _assert_anonymous(_request(client, method, _fill(path, values), route), method, path)


@SQLITE_ONLY
def test_absolute_limit_of_seven_days(app, client: TestClient, firm_a: Account) -> None:  # type: ignore[no-untyped-def]
    secret = app.state.settings.secret_key
    week_ago = security.clock() - security.SESSION_ABSOLUTE_SECONDS - 1
    # freshly signed (not idle) but signed in more than 7 days ago
    value = security.issue_session(secret, user_id=firm_a.user_id, session_version=1,
                                   signed_in_at=week_ago)  # fmt: skip
    _only_cookie(client, value)
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


def test_other_firm_gets_404_for_firm_a_objects(app, client: TestClient, other_client: TestClient,
                                                firm_a_objects: FirmAObjects) -> None:  # type: ignore[no-untyped-def]  # fmt: skip
    values = _param_values(firm_a_objects)
    object_params = set(values) - {"token"}
    checked_get = checked_post = 0
    for method, path, route in _routes(app):
        if _is_public(method, path) or not set(PARAM.findall(path)) & object_params:
            continue
        url = _fill(path, values)
        if method == "GET":
            # Firm A itself can open it: the ids are real, so Firm B's 404 means "not yours"
            own = client.get(url, follow_redirects=False)
            assert own.status_code == 200, f"Firm A: GET {path} -> {own.status_code}"
        response = _request(other_client, method, url, route)
        where = f"Firm B: {method} {path}"
        assert response.status_code == 404, (
            f"{where} -> {response.status_code}: {response.text[:200]}"
        )
        assert_no_firm_a_data(response.text, where)
        checked_get += method == "GET"
        checked_post += method != "GET"
    assert checked_get >= 5 and checked_post >= 10
    # Firm A's data is untouched by all of Firm B's tries
    page = client.get(f"/houses/{firm_a_objects.house_id}")
    assert page.status_code == 200 and "Quillfeather" in page.text


def test_other_firm_lists_show_none_of_firm_a(app, other_client: TestClient,
                                             firm_a_objects: FirmAObjects) -> None:  # type: ignore[no-untyped-def]  # fmt: skip
    checked = 0
    for method, path, _route in _routes(app):
        if method != "GET" or _is_public(method, path) or PARAM.search(path):
            continue
        response = other_client.get(path, follow_redirects=False)
        assert response.status_code in (200, 303), f"GET {path} -> {response.status_code}"
        assert_no_firm_a_data(response.text, f"Firm B: GET {path}")
        checked += 1
    assert checked >= 5


def _state_changing(app) -> list[tuple[str, str, Any]]:  # type: ignore[no-untyped-def]
    return [
        (m, p, r) for m, p, r in _routes(app)
        if m != "GET" and not p.startswith("/api/v1/calc/")
    ]  # fmt: skip


@SQLITE_ONLY
def test_state_changing_routes_need_the_csrf_token(app, client: TestClient, other_client: TestClient,
                                                   firm_a_objects: FirmAObjects) -> None:  # type: ignore[no-untyped-def]  # fmt: skip
    values = _param_values(firm_a_objects)
    own = client.headers.pop(CSRF_HEADER)
    variants = {"missing": None, "empty": "", "wrong": "0" * 64,
                "another session's": other_client.headers[CSRF_HEADER],
                "own token, altered": own[:-1] + ("0" if own[-1] != "0" else "1")}  # fmt: skip
    checked = 0
    routes = _state_changing(app)
    for name, token in variants.items():
        full = name in ("missing", "wrong")  # the others on a sample (the same comparison)
        for method, path, route in (
            routes if full else [r for r in routes if (r[0], r[1]) in SAMPLE]
        ):
            form = _form_for(route)
            if token is not None:
                form["data"] = {**form["data"], "csrf_token": token}
            response = client.request(method, _fill(path, values), follow_redirects=False, **form)
            where = f"{name} token: {method} {path}"
            assert response.status_code == 403, f"{where} -> {response.status_code}"
            assert (
                ("CSRF" in response.text)
                if path.startswith("/api/")
                else ("Not sent" in response.text)
            )
            checked += 1
    assert checked >= 2 * 15 + len(variants) - 2
    # JSON routes say so in JSON, the header is checked as well as the field
    r = client.post("/api/v1/houses", json={}, headers={CSRF_HEADER: "0" * 64})
    assert r.status_code == 403 and "CSRF" in r.json()["detail"]
    # nothing was changed by any of them: Firm A's house is as it was
    page = client.get(f"/houses/{firm_a_objects.house_id}")
    assert page.status_code == 200 and "Quillfeather" in page.text


@SQLITE_ONLY
def test_csrf_token_in_the_form_field_is_accepted(client: TestClient) -> None:
    token = client.headers.pop(CSRF_HEADER)
    r = client.post("/houses", data={"label": "Form-field token", "csrf_token": token},
                    follow_redirects=False)  # fmt: skip
    assert r.status_code == 303


@SQLITE_ONLY
def test_calculators_stay_public_and_need_no_token(anon_client: TestClient) -> None:
    body = {"units": "ip", "heat_flow": "horizontal", "films": "none", "layers": [{"r": 13.0}]}
    r = anon_client.post("/api/v1/calc/assembly", json=body)
    # one homogeneous layer, no films: R = 13 exactly (sum of layer R, Fourier's law)
    assert r.status_code == 200 and r.json()["r_total"] == pytest.approx(13.0, abs=1e-9)
