"""The route matrix: every route of the app, walked from ``app.routes``, against every kind of
visitor who must not get in.

- anonymous -> 303 to /login (pages) or 401 ``{"detail": "sign in first"}`` (/api/)
- Firm B's admin on Firm A's objects -> 404 (never 403), and no Firm A text in the body
- Firm B's lists (houses, library, price book, users) -> none of Firm A's rows
- a state-changing request without the CSRF token, or with a wrong one -> 403

Public on purpose (and nothing else): ``/login``, ``/healthz``, the stateless calculators under
``/api/v1/calc/`` and the homeowner's view under ``/s/``. Not routes of ours: ``/static``,
``/openapi.json``, ``/docs``, ``/redoc``. A new route is covered automatically; a new kind of
path parameter must get a Firm A value in :func:`tests.security.routes.param_values`
(a test says so). The cookie cases are in test_cookie_matrix.py.
"""

from __future__ import annotations

import pytest
from fastapi.testclient import TestClient

from server.security import CSRF_HEADER
from tests.security.conftest import SQLITE_ONLY, FirmAObjects, assert_no_firm_a_data
from tests.security.routes import (
    PARAM,
    PUBLIC_EXACT,
    SAMPLE,
    app_routes,
    assert_anonymous,
    fill,
    form_for,
    is_public_route,
    param_values,
    send,
    state_changing_routes,
)


@SQLITE_ONLY
def test_public_routes_are_exactly_the_listed_ones(app) -> None:  # type: ignore[no-untyped-def]
    from server.web.deps import is_public

    routes = app_routes(app)
    assert len(routes) >= 30  # the matrix really walks the app
    for method, path, _route in routes:
        sample = fill(path, {})
        expected = is_public_route(method, path)
        assert is_public(sample) == expected, f"{method} {path}: the app and this test disagree"
    public = {(m, p) for m, p, _ in routes if is_public_route(m, p)}
    outside_prefixes = {(m, p) for m, p in public if not p.startswith(("/api/v1/calc/", "/s/"))}
    assert outside_prefixes == PUBLIC_EXACT


@SQLITE_ONLY
def test_every_path_parameter_has_a_firm_a_value(app, firm_a_objects: FirmAObjects) -> None:  # type: ignore[no-untyped-def]
    values = param_values(firm_a_objects)
    missing = {
        (name, path)
        for _m, path, _r in app_routes(app)
        if not is_public_route(_m, path)
        for name in PARAM.findall(path)
        if name not in values
    }
    assert not missing, f"add a Firm A value for these path parameters: {sorted(missing)}"


def test_anonymous_is_sent_to_sign_in_everywhere(app, anon_client: TestClient,
                                                  firm_a_objects: FirmAObjects) -> None:  # type: ignore[no-untyped-def]  # fmt: skip
    values = param_values(firm_a_objects)
    checked = 0
    for method, path, route in app_routes(app):
        if is_public_route(method, path):
            continue
        response = send(anon_client, method, fill(path, values), route)
        assert_anonymous(response, method, path)
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


def test_other_firm_gets_404_for_firm_a_objects(app, client: TestClient, other_client: TestClient,
                                                firm_a_objects: FirmAObjects) -> None:  # type: ignore[no-untyped-def]  # fmt: skip
    values = param_values(firm_a_objects)
    object_params = set(values) - {"token"}
    checked_get = checked_post = 0
    for method, path, route in app_routes(app):
        if is_public_route(method, path) or not set(PARAM.findall(path)) & object_params:
            continue
        url = fill(path, values)
        if method == "GET":
            # Firm A itself can open it: the ids are real, so Firm B's 404 means "not yours"
            own = client.get(url, follow_redirects=False)
            assert own.status_code == 200, f"Firm A: GET {path} -> {own.status_code}"
        response = send(other_client, method, url, route)
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
    for method, path, _route in app_routes(app):
        if method != "GET" or is_public_route(method, path) or PARAM.search(path):
            continue
        response = other_client.get(path, follow_redirects=False)
        assert response.status_code in (200, 303), f"GET {path} -> {response.status_code}"
        assert_no_firm_a_data(response.text, f"Firm B: GET {path}")
        checked += 1
    assert checked >= 5


@SQLITE_ONLY
def test_state_changing_routes_need_the_csrf_token(app, client: TestClient, other_client: TestClient,
                                                   firm_a_objects: FirmAObjects) -> None:  # type: ignore[no-untyped-def]  # fmt: skip
    values = param_values(firm_a_objects)
    own = client.headers.pop(CSRF_HEADER)
    variants = {"missing": None, "empty": "", "wrong": "0" * 64,
                "another session's": other_client.headers[CSRF_HEADER],
                "own token, altered": own[:-1] + ("0" if own[-1] != "0" else "1")}  # fmt: skip
    checked = 0
    routes = state_changing_routes(app)
    for name, token in variants.items():
        full = name in ("missing", "wrong")  # the others on a sample (the same comparison)
        for method, path, route in (
            routes if full else [r for r in routes if (r[0], r[1]) in SAMPLE]
        ):
            form = form_for(route)
            if token is not None:
                form["data"] = {**form["data"], "csrf_token": token}
            response = client.request(method, fill(path, values), follow_redirects=False, **form)
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
