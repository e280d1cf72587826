"""Admission: how many requests run the app at once in one process, and how big a body may be.

Why a gate at all. A request holds its database connection from its first query to the end
of its route, across several threadpool hops. With more requests in flight than the pool has
connections, the threads that run those hops block waiting for a connection that only a
request waiting for a thread can give back: with 1,000 requests at once the process stopped
for the pool's 30 s timeout and answered 500s (measured before this gate existed). Letting in
at most as many requests as there are connections makes that impossible, and it is also the
fast choice on a small machine: the requests waiting here cost a coroutine each, served in
arrival order, instead of dozens of threads sharing the interpreter lock and finishing late
together.

What the gate does, per HTTP request outside :data:`EXEMPT_PREFIXES` (static files and the
health check touch no database):

1. Refuses a body larger than ``max_body_bytes`` (413), by its ``Content-Length`` or by
   counting what arrives.
2. Reads a body of up to :data:`PREBUFFER_BYTES` before taking a place, so a client that sends
   slowly holds no connection while it does (larger uploads are read inside the gate).
3. Waits for one of ``limit`` places (first come, first served). After
   ``queue_timeout_s`` the answer is 503 with ``Retry-After``, never an unbounded queue.
4. Gives the place back as soon as the response starts: the session has been committed and
   closed by then (``SessionDep`` has ``scope="function"``), so sending a large page to a slow
   reader does not hold a connection either.
"""

from __future__ import annotations

import asyncio
import json
from dataclasses import dataclass

from starlette.types import ASGIApp, Message, Receive, Scope, Send

EXEMPT_PREFIXES = ("/static/",)
EXEMPT_PATHS = frozenset({"/healthz"})
#: bodies up to this size are read before the request takes a place (every form and JSON
#: document the app takes; the largest test house exports to about 100 kB)
PREBUFFER_BYTES = 1024 * 1024


@dataclass
class GateStats:
    """Counters, per process (read by tests)."""

    admitted: int = 0
    waited: int = 0
    refused_busy: int = 0
    refused_too_large: int = 0
    peak_active: int = 0
    active: int = 0


class AdmissionGate:
    """ASGI middleware: at most ``limit`` requests inside ``app`` at once (see module doc)."""

    def __init__(
        self, app: ASGIApp, *, limit: int, max_body_bytes: int, queue_timeout_s: float = 30.0
    ) -> None:
        if limit < 1:
            raise ValueError("the admission limit must be at least 1")
        self.app = app
        self.limit = limit
        self.max_body_bytes = max_body_bytes
        self.queue_timeout_s = queue_timeout_s
        self.stats = GateStats()
        self._places: asyncio.Semaphore | None = None
        self._loop: asyncio.AbstractEventLoop | None = None

    def _semaphore(self) -> asyncio.Semaphore:
        # Made on first use inside the running loop (uvicorn builds the app before its loop
        # runs), and again if the app is served by a new loop (an in-process test client
        # starts one per session): an asyncio semaphore belongs to one loop.
        loop = asyncio.get_running_loop()
        if self._places is None or self._loop is not loop:
            self._places, self._loop = asyncio.Semaphore(self.limit), loop
        return self._places

    async def __call__(self, scope: Scope, receive: Receive, send: Send) -> None:
        path = scope.get("path", "")
        if scope["type"] != "http" or path in EXEMPT_PATHS or path.startswith(EXEMPT_PREFIXES):
            await self.app(scope, receive, send)
            return
        declared = _content_length(scope)
        if declared is not None and declared > self.max_body_bytes:
            self.stats.refused_too_large += 1
            await _refuse(send, scope, 413, self._too_large_text())
            return
        first, complete = await _read_prefix(receive, PREBUFFER_BYTES)
        if first is None:  # the client went away before sending its body
            return
        if len(first) > self.max_body_bytes:
            self.stats.refused_too_large += 1
            await _refuse(send, scope, 413, self._too_large_text())
            return
        replay = _Replay(first, complete, receive, self.max_body_bytes)

        places = self._semaphore()
        if places.locked():
            self.stats.waited += 1
        try:
            async with asyncio.timeout(self.queue_timeout_s):
                await places.acquire()
        except TimeoutError:
            self.stats.refused_busy += 1
            await _refuse(send, scope, 503, "the server is busy; try again in a few seconds",
                          headers=((b"retry-after", b"5"),))  # fmt: skip
            return
        stats = self.stats
        stats.admitted += 1
        stats.active += 1
        stats.peak_active = max(stats.peak_active, stats.active)
        held = True

        def release() -> None:
            nonlocal held
            if held:
                held = False
                stats.active -= 1
                places.release()

        async def send_and_release(message: Message) -> None:
            if message["type"] == "http.response.start":
                release()  # the route and its session are done; sending needs no place
            await send(message)

        try:
            await self.app(scope, replay, send_and_release)
        except BodyTooLarge:
            release()
            self.stats.refused_too_large += 1
            await _refuse(send, scope, 413, self._too_large_text())
        finally:
            release()

    def _too_large_text(self) -> str:
        return f"the request body is larger than {_size_text(self.max_body_bytes)}"


class BodyTooLarge(Exception):
    """More body arrived than the gate allows (raised inside the app's ``receive``)."""


class _Replay:
    """``receive`` for the app: the body read before admission, then the rest, counted."""

    def __init__(self, first: bytes, complete: bool, receive: Receive, limit: int) -> None:
        self._first: bytes | None = first
        self._complete = complete
        self._receive = receive
        self._seen = len(first)
        self._limit = limit

    async def __call__(self) -> Message:
        if self._first is not None:
            body, self._first = self._first, None
            return {"type": "http.request", "body": body, "more_body": not self._complete}
        message = await self._receive()
        if message["type"] == "http.request":
            self._seen += len(message.get("body", b""))
            if self._seen > self._limit:
                raise BodyTooLarge
        return message


async def _read_prefix(receive: Receive, limit: int) -> tuple[bytes | None, bool]:
    """(body read so far, whether it is all of it); None if the client disconnected."""
    chunks: list[bytes] = []
    size = 0
    while True:
        message = await receive()
        if message["type"] == "http.disconnect":
            return None, False
        chunk = message.get("body", b"")
        chunks.append(chunk)
        size += len(chunk)
        if not message.get("more_body", False):
            return b"".join(chunks), True
        if size >= limit:
            return b"".join(chunks), False


def _size_text(size: int) -> str:
    """25 MB, 64 kB, 900 bytes: what a person reads in the refusal."""
    for unit, factor in (("MB", 1024 * 1024), ("kB", 1024)):
        if size >= factor:
            return f"{size / factor:.3g} {unit}"
    return f"{size} bytes"


def _content_length(scope: Scope) -> int | None:
    for name, value in scope.get("headers", []):
        if name == b"content-length":
            try:
                return int(value)
            except ValueError:
                return None
    return None


async def _refuse(
    send: Send, scope: Scope, status: int, text: str, headers: tuple[tuple[bytes, bytes], ...] = ()
) -> None:
    """A short answer in the caller's language: JSON under /api/, plain text elsewhere."""
    if scope.get("path", "").startswith("/api/"):
        body = json.dumps({"detail": text, "errors": []}).encode()
        kind = b"application/json"
    else:
        body = (text + "\n").encode()
        kind = b"text/plain; charset=utf-8"
    await send({
        "type": "http.response.start",
        "status": status,
        "headers": [(b"content-type", kind), (b"content-length", str(len(body)).encode()),
                    (b"connection", b"close"), *headers],
    })  # fmt: skip
    await send({"type": "http.response.body", "body": body})
