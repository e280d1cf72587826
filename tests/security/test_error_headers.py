"""Security headers on the answers the routes never make: an unhandled exception's 500 and the
admission gate's 413 and 503 (server/app.py SecurityMiddleware, server/admission.py)."""

from __future__ import annotations

import asyncio
import json
from typing import Any

import pytest
from fastapi.testclient import TestClient

from server.admission import AdmissionGate
from server.app import SecurityMiddleware, create_app
from server.config import Settings
from server.security import CONTENT_SECURITY_POLICY
from tests.conftest import Account, sign_in
from tests.security.conftest import SQLITE_ONLY
from tests.utils.loop import run

TEST_SECRET = "error-headers-test-secret-0123456789abcdef"


def _assert_security_headers(headers: Any, where: str) -> None:
    assert headers["Content-Security-Policy"] == CONTENT_SECURITY_POLICY, where
    assert "frame-ancestors 'none'" in headers["Content-Security-Policy"], where
    assert headers["X-Content-Type-Options"] == "nosniff", where
    assert headers["X-Frame-Options"] == "DENY", where
    assert headers["Cache-Control"] == "no-store", where
    assert headers["Referrer-Policy"] == "same-origin", where


@SQLITE_ONLY
def test_an_unhandled_exception_answers_500_with_the_headers(app: Any, firm_a: Account) -> None:
    # test-only routes, on this test's own app (never in production code)
    def page_that_fails() -> None:
        raise RuntimeError("a bug in a page (test only)")

    def api_that_fails() -> None:
        raise RuntimeError("a bug in an API route (test only)")

    app.add_api_route("/test-only/fails", page_that_fails)
    app.add_api_route("/api/v1/test-only/fails", api_that_fails)
    with TestClient(app, raise_server_exceptions=False) as client:
        sign_in(client, app, firm_a)
        page = client.get("/test-only/fails")
        api = client.get("/api/v1/test-only/fails")
        anonymous = TestClient(app, raise_server_exceptions=False)
        anon = anonymous.get("/test-only/fails", follow_redirects=False)
    assert page.status_code == 500 and api.status_code == 500
    _assert_security_headers(page.headers, "page 500")
    _assert_security_headers(api.headers, "API 500")
    assert page.text == "Internal Server Error"  # no trace, no exception text
    assert "a bug" not in page.text and "a bug" not in api.text
    assert json.loads(api.text) == {"detail": "internal server error", "errors": []}
    # the exception still goes on to the server (uvicorn logs it with its trace)
    with TestClient(app) as raising, pytest.raises(RuntimeError, match="a bug in a page"):
        sign_in(raising, app, firm_a)
        raising.get("/test-only/fails")
    # signed-out visitors are sent to sign in before the route runs (303, headers too)
    assert anon.status_code == 303
    _assert_security_headers(anon.headers, "redirect")


@SQLITE_ONLY
def test_the_gates_413_has_the_headers(db_url: str) -> None:
    app = create_app(Settings(environment="test", database_url=db_url, secret_key=TEST_SECRET,
                              max_body_bytes=1000))  # fmt: skip
    try:
        with TestClient(app) as client:
            for path in ("/login", "/api/v1/calc/assembly"):
                r = client.post(path, content=b"x" * 2000, headers={"content-type": "text/plain"})
                assert r.status_code == 413, path
                _assert_security_headers(r.headers, f"413 {path}")
    finally:
        app.state.engine.dispose()


def test_the_gates_503_has_the_headers() -> None:
    """The real app's order (SecurityMiddleware outside the gate) around an app the test holds:
    the second request waits past the queue timeout and gets 503."""
    release = asyncio.Event()

    async def held(scope: Any, receive: Any, send: Any) -> None:
        await release.wait()
        await send({"type": "http.response.start", "status": 204, "headers": []})
        await send({"type": "http.response.body", "body": b""})

    async def call(app: Any, path: str) -> tuple[int, dict[str, str]]:
        scope = {"type": "http", "method": "GET", "path": path, "raw_path": path.encode(),
                 "query_string": b"", "headers": [], "scheme": "http", "client": ("192.0.2.1", 1)}  # fmt: skip
        start: dict[str, Any] = {}

        async def receive() -> dict[str, Any]:
            return {"type": "http.request", "body": b"", "more_body": False}

        async def send(message: dict[str, Any]) -> None:
            if message["type"] == "http.response.start":
                start.update(message)

        await app(scope, receive, send)
        headers = {k.decode().title(): v.decode() for k, v in start["headers"]}
        return start["status"], headers

    async def scenario() -> tuple[int, dict[str, str]]:
        gate = AdmissionGate(held, limit=1, max_body_bytes=1000, queue_timeout_s=0.05)
        settings = Settings(environment="test", database_url="sqlite://", secret_key=TEST_SECRET)
        app = SecurityMiddleware(gate, settings=settings)
        first = asyncio.create_task(call(app, "/houses"))
        await asyncio.sleep(0.01)
        late = await call(app, "/houses")
        release.set()
        await first
        return late

    status, headers = run(scenario())
    assert status == 503 and headers["Retry-After"] == "5"
    _assert_security_headers(headers, "503")
