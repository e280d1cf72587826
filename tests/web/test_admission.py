"""The admission gate (server/admission.py): bounded requests in flight, bounded bodies.

The first test is the failure the gate was built for: before it, 1,000 requests at once in one
process left every threadpool thread waiting for a pool connection held by a request waiting
for a thread, until SQLAlchemy's 30 s pool timeout turned them into 500s. The rest drive the
middleware around small ASGI apps whose timing the test controls.
"""

from __future__ import annotations

import asyncio
import json
from typing import Any

import pytest

from server.admission import AdmissionGate
from server.app import create_app
from server.config import Settings
from tests.utils.auth import signed_in_headers
from tests.utils.houses import big_house_document
from tests.utils.loop import run

# --- driving an ASGI app in-process ---------------------------------------------------------


def _scope(path: str, headers: dict[str, str] | None = None, method: str = "GET") -> dict[str, Any]:
    raw = [(k.lower().encode(), v.encode()) for k, v in (headers or {}).items()]
    return {
        "type": "http", "asgi": {"version": "3.0"}, "http_version": "1.1", "method": method,
        "scheme": "http", "path": path, "raw_path": path.encode(), "query_string": b"",
        "root_path": "", "headers": [(b"host", b"127.0.0.1"), *raw],
        "client": ("127.0.0.1", 1), "server": ("127.0.0.1", 80),
    }  # fmt: skip


async def call(
    app: Any, path: str, *, headers: dict[str, str] | None = None, method: str = "GET",
    chunks: list[bytes] | None = None, chunk_delay_s: float = 0.0,
) -> tuple[int, dict[bytes, bytes], bytes]:  # fmt: skip
    """(status, headers, body) of one request; the body is sent in ``chunks``."""
    parts = list(chunks or [b""])
    sent: list[dict[str, Any]] = []

    async def receive() -> dict[str, Any]:
        if not parts:
            await asyncio.sleep(3600)  # nothing more: a real server would wait for disconnect
        if chunk_delay_s:
            await asyncio.sleep(chunk_delay_s)
        body = parts.pop(0)
        return {"type": "http.request", "body": body, "more_body": bool(parts)}

    async def send(message: dict[str, Any]) -> None:
        sent.append(message)

    await app(_scope(path, headers, method), receive, send)
    start = next(m for m in sent if m["type"] == "http.response.start")
    body = b"".join(m.get("body", b"") for m in sent if m["type"] == "http.response.body")
    return start["status"], dict(start["headers"]), body


class Probe:
    """An ASGI app that counts how many requests are inside it, and can be held."""

    def __init__(self) -> None:
        self.inside = 0
        self.peak = 0
        self.hold = asyncio.Event()
        self.hold.set()
        self.after_start = asyncio.Event()
        self.after_start.set()
        self.bodies: list[bytes] = []

    async def __call__(self, scope: Any, receive: Any, send: Any) -> None:
        self.inside += 1
        self.peak = max(self.peak, self.inside)
        body = b""
        while True:
            message = await receive()
            body += message.get("body", b"")
            if not message.get("more_body"):
                break
        self.bodies.append(body)
        await self.hold.wait()
        self.inside -= 1
        await send({"type": "http.response.start", "status": 200, "headers": []})
        await self.after_start.wait()
        await send({"type": "http.response.body", "body": b"ok"})


# --- the real app under a burst ---------------------------------------------------------------


def test_a_burst_larger_than_the_pool_is_served_in_full(db_url: str) -> None:
    # 300 requests at once against 2 connections and 2 places: all answered 200, never more
    # than 2 inside the app. Without the gate the same burst (threadpool 40 > pool) blocked.
    settings = Settings(
        environment="test", database_url=db_url, db_pool_size=2, max_active_requests=2
    )
    app = create_app(settings)
    try:
        from server.db import session_scope
        from server.documents.house import HouseDocument
        from server.services.house_document import import_house

        headers = signed_in_headers(app, email="burst@example.com")
        org_id = _org_of(app, "burst@example.com")
        with session_scope(app.state.session_factory) as session:
            house = import_house(
                session=session, organization_id=org_id,
                document=HouseDocument.model_validate(big_house_document(surfaces=3)),
            )  # fmt: skip
            house_id = house.id
        gate = _gate_of(app)

        async def burst() -> list[int]:
            paths = [f"/houses/{house_id}/compare", f"/houses/{house_id}", "/houses"] * 100
            results = await asyncio.wait_for(
                asyncio.gather(*(call(app, p, headers=headers) for p in paths)), timeout=120
            )
            return [status for status, _h, _b in results]

        statuses = run(burst())
        assert statuses == [200] * 300
        assert gate.stats.peak_active <= 2
        assert gate.stats.waited > 0  # the burst did queue at the gate
        assert gate.stats.active == 0  # every place given back
    finally:
        app.state.engine.dispose()


def _org_of(app: Any, email: str) -> int:
    from sqlalchemy import select

    from server.models import User

    with app.state.session_factory() as session:
        return int(session.scalars(select(User.organization_id).where(User.email == email)).one())


def _gate_of(app: Any) -> AdmissionGate:
    """The gate instance inside the app's middleware stack (built on first call)."""
    run(call(app, "/healthz"))
    layer = app.middleware_stack
    while layer is not None and not isinstance(layer, AdmissionGate):
        layer = getattr(layer, "app", None)
    assert isinstance(layer, AdmissionGate)
    return layer


def test_the_limit_may_not_exceed_the_pool() -> None:
    with pytest.raises(ValueError, match="MAX_ACTIVE_REQUESTS"):
        Settings(environment="test", db_pool_size=4, max_active_requests=5)
    with pytest.raises(ValueError, match="MAX_ACTIVE_REQUESTS"):
        Settings(environment="test", max_active_requests=0)


# --- the middleware itself --------------------------------------------------------------------


def test_no_more_than_the_limit_inside_and_first_come_first_served() -> None:
    async def scenario() -> tuple[int, list[int]]:
        probe = Probe()
        gate = AdmissionGate(probe, limit=3, max_body_bytes=1000)
        order: list[int] = []

        async def one(i: int) -> None:
            await call(gate, f"/x/{i}")
            order.append(i)

        probe.hold.clear()
        tasks = [asyncio.create_task(one(i)) for i in range(10)]
        await asyncio.sleep(0.05)
        inside_while_held = probe.inside
        probe.hold.set()
        await asyncio.gather(*tasks)
        return inside_while_held, order

    inside, order = run(scenario())
    assert inside == 3
    assert order[3:] == list(range(3, 10))  # the queue is served in arrival order


def test_the_place_is_given_back_when_the_response_starts() -> None:
    # A slow reader of a big page holds no place: the next request gets in meanwhile.
    async def scenario() -> int:
        probe = Probe()
        gate = AdmissionGate(probe, limit=1, max_body_bytes=1000)
        probe.after_start.clear()  # the first response starts, its body does not come yet
        first = asyncio.create_task(call(gate, "/slow-reader"))
        await asyncio.sleep(0.02)
        probe.after_start.set()
        second_status, _h, _b = await asyncio.wait_for(call(gate, "/next"), timeout=2)
        await first
        return second_status

    assert run(scenario()) == 200


def test_a_slow_body_is_read_before_taking_a_place() -> None:
    async def scenario() -> tuple[int, int, list[bytes]]:
        probe = Probe()
        gate = AdmissionGate(probe, limit=1, max_body_bytes=1000)
        slow = asyncio.create_task(
            call(gate, "/upload", method="POST", chunks=[b"a", b"b", b"c"], chunk_delay_s=0.2)
        )
        await asyncio.sleep(0.05)
        inside_while_uploading = probe.inside
        status, _h, _b = await asyncio.wait_for(call(gate, "/other"), timeout=0.3)
        await slow
        return inside_while_uploading, status, probe.bodies

    inside, status, bodies = run(scenario())
    assert inside == 0
    assert status == 200  # served while the upload was still arriving
    assert b"abc" in bodies  # the app still got the whole body, in order


def test_a_body_over_the_limit_gets_413_by_header_or_by_count() -> None:
    async def scenario() -> list[tuple[int, dict[bytes, bytes], bytes]]:
        probe = Probe()
        gate = AdmissionGate(probe, limit=1, max_body_bytes=10)
        declared = await call(gate, "/api/v1/x", method="POST", headers={"Content-Length": "11"},
                              chunks=[b"x" * 11])  # fmt: skip
        counted = await call(gate, "/page", method="POST", chunks=[b"x" * 6, b"x" * 6])
        exact = await call(gate, "/page", method="POST", chunks=[b"x" * 10])
        return [declared, counted, exact]

    (s1, h1, b1), (s2, h2, b2), (s3, _h3, _b3) = run(scenario())
    assert s1 == 413
    assert h1[b"content-type"] == b"application/json"
    assert json.loads(b1)["detail"] == "the request body is larger than 10 bytes"
    assert s2 == 413 and h2[b"content-type"].startswith(b"text/plain")
    assert s3 == 200  # exactly at the limit is taken


def test_a_body_beyond_the_prebuffer_is_counted_inside_the_app() -> None:
    # Uploads larger than PREBUFFER_BYTES stream through the gate, still counted: 413.
    from server import admission

    async def scenario() -> int:
        probe = Probe()
        gate = AdmissionGate(probe, limit=1, max_body_bytes=3 * 1024)
        chunks = [b"x" * 1024] * 4
        original = admission.PREBUFFER_BYTES
        admission.PREBUFFER_BYTES = 1024
        try:
            status, _h, _b = await call(gate, "/upload", method="POST", chunks=chunks)
        finally:
            admission.PREBUFFER_BYTES = original
        return status

    # The probe reads the body itself, so BodyTooLarge surfaces in it and the gate answers.
    assert run(scenario()) == 413


def test_waiting_too_long_is_answered_503_with_retry_after() -> None:
    async def scenario() -> tuple[int, dict[bytes, bytes]]:
        probe = Probe()
        gate = AdmissionGate(probe, limit=1, max_body_bytes=1000, queue_timeout_s=0.05)
        probe.hold.clear()
        first = asyncio.create_task(call(gate, "/busy"))
        await asyncio.sleep(0.01)
        status, headers, _b = await call(gate, "/api/v1/late")
        probe.hold.set()
        await first
        assert gate.stats.active == 0
        return status, headers

    status, headers = run(scenario())
    assert status == 503
    assert headers[b"retry-after"] == b"5"


def test_static_files_and_the_health_check_never_wait() -> None:
    async def scenario() -> int:
        probe = Probe()
        gate = AdmissionGate(probe, limit=1, max_body_bytes=1000, queue_timeout_s=0.05)
        probe.hold.clear()
        busy = asyncio.create_task(call(gate, "/busy"))  # takes the one place
        await asyncio.sleep(0.01)
        exempt = [asyncio.create_task(call(gate, p)) for p in ("/healthz", "/static/app.css")]
        await asyncio.sleep(0.1)  # longer than the queue timeout
        inside = probe.inside
        probe.hold.set()
        results = await asyncio.gather(busy, *exempt)
        assert [status for status, _h, _b in results] == [200, 200, 200]
        return inside

    assert run(scenario()) == 3  # both went in although the one place was taken


def test_the_app_answers_an_oversized_api_body_in_its_error_shape(db_url: str) -> None:
    # Through the whole app: 413 in the API's documented ErrorBody shape, security headers on.
    from fastapi.testclient import TestClient

    from server.api.errors import ErrorBody

    app = create_app(Settings(environment="test", database_url=db_url, max_body_bytes=1000))
    try:
        with TestClient(app) as client:
            response = client.post("/api/v1/calc/house", content=b"{" + b" " * 2000 + b"}",
                                   headers={"Content-Type": "application/json"})  # fmt: skip
            small = client.post("/api/v1/calc/assembly", json={"layers": []})
        assert response.status_code == 413
        body = ErrorBody.model_validate(response.json())
        assert body.detail == "the request body is larger than 1000 bytes"
        assert response.headers["x-content-type-options"] == "nosniff"
        assert small.status_code == 422  # under the limit: the route's own answer
        schema = app.openapi()["paths"]["/api/v1/calc/house"]["post"]["responses"]
        assert {"413", "422", "503"} <= set(schema)
    finally:
        app.state.engine.dispose()


def test_one_gate_serves_one_loop_after_another() -> None:
    # In-process test clients start a new event loop each time; the gate must follow (an
    # asyncio semaphore bound to the first loop would fail in the second under contention).
    gate = AdmissionGate(Probe(), limit=1, max_body_bytes=1000)

    async def contended() -> list[int]:
        probe = gate.app = Probe()  # its events belong to this loop; the gate is the same
        probe.hold.clear()
        tasks = [asyncio.create_task(call(gate, f"/x/{i}")) for i in range(3)]
        await asyncio.sleep(0.02)
        probe.hold.set()
        return [status for status, _h, _b in await asyncio.gather(*tasks)]

    assert run(contended()) == [200, 200, 200]
    assert run(contended()) == [200, 200, 200]
