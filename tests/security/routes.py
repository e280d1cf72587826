"""Walking the app's routes for the matrix tests: every (method, path) of ours, Firm A values
for path parameters, plausible form bodies, and what "treated as anonymous" means."""

from __future__ import annotations

import re
from typing import Any

from fastapi.routing import APIRoute
from fastapi.testclient import TestClient
from starlette.datastructures import UploadFile

from server.security import SESSION_COOKIE
from tests.security.conftest import FirmAObjects, assert_no_firm_a_data

METHODS = ("GET", "POST", "PUT", "PATCH", "DELETE")
NOT_OURS = {"/static", "/openapi.json", "/docs", "/docs/oauth2-redirect", "/redoc"}
#: the service worker and its fallback page are public: no house data in either (the worker's
#: script is a static file; the fallback page says only that the page is not kept offline)
PUBLIC_EXACT = {("GET", "/healthz"), ("GET", "/login"), ("POST", "/login"), ("GET", "/sw.js"),
                ("GET", "/offline")}  # fmt: skip
#: a page, a form post and a JSON route: the sample for the variants of one check
SAMPLE = {("GET", "/houses"), ("POST", "/houses"), ("GET", "/api/v1/houses/{house_id}/document")}
SIGN_IN_FIRST = {"detail": "sign in first", "errors": []}
PARAM = re.compile(r"{([^}:]+)(?::[^}]*)?}")


def flat_routes(routes) -> list[Any]:  # type: ignore[no-untyped-def]
    """Every route, with routers included by ``include_router`` opened up (FastAPI keeps them
    as included-router entries that expose ``effective_route_contexts()``)."""
    out: list[Any] = []
    for route in routes:
        contexts = getattr(route, "effective_route_contexts", None)
        out.extend(contexts() if contexts is not None else [route])
    return out


def app_routes(app) -> list[tuple[str, str, Any]]:  # type: ignore[no-untyped-def]
    """(method, path template, route) for every route of ours; ``route.dependant`` is set."""
    rows = []
    for route in flat_routes(app.routes):
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


def is_public_route(method: str, path: str) -> bool:
    return (
        (method, path) in PUBLIC_EXACT or path.startswith("/api/v1/calc/") or path.startswith("/s/")
    )


def param_values(objects: FirmAObjects) -> dict[str, Any]:
    from server.web.settings_forms import SECTIONS
    from server.web.systems_forms import CARDS

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
        "card": next(iter(CARDS)),
        "space_id": objects.space_id,
        "photo_id": objects.photo_id,
        "token": "A" * 43,
    }


def fill(path: str, values: dict[str, Any]) -> str:
    return PARAM.sub(lambda m: str(values.get(m.group(1), 1)), path)


def form_for(route: Any) -> dict[str, Any]:
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


def send(client: TestClient, method: str, url: str, route: Any = None, **kw: Any):  # type: ignore[no-untyped-def]
    if method != "GET" and route is not None and "data" not in kw and "json" not in kw:
        kw.update(form_for(route))
    return client.request(method, url, follow_redirects=False, **kw)


def assert_anonymous(response, method: str, path: str) -> None:  # type: ignore[no-untyped-def]
    where = f"{method} {path}"
    if path.startswith("/api/"):
        assert response.status_code == 401, f"{where}: {response.status_code}"
        assert response.json() == SIGN_IN_FIRST, where
    else:
        assert response.status_code == 303, f"{where}: {response.status_code}"
        assert response.headers["location"].startswith("/login"), where
    assert_no_firm_a_data(response.text, where)


def only_cookie(client: TestClient, value: str) -> None:
    """Make ``value`` the client's one session cookie (responses delete a bad one; put it
    back before each request so every route sees it)."""
    client.cookies.clear()
    client.cookies.set(SESSION_COOKIE, value, domain="testserver.local")


def flip(value: str, index: int) -> str:
    ch = value[index]
    return value[:index] + ("B" if ch != "B" else "C") + value[index + 1 :]


def protected_routes(app) -> list[tuple[str, str, Any]]:  # type: ignore[no-untyped-def]
    return [(m, p, r) for m, p, r in app_routes(app) if not is_public_route(m, p)]


def state_changing_routes(app) -> list[tuple[str, str, Any]]:  # type: ignore[no-untyped-def]
    return [
        (m, p, r) for m, p, r in app_routes(app)
        if m != "GET" and not p.startswith("/api/v1/calc/")
    ]  # fmt: skip
