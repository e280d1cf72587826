"""Acknowledged saves survive a SIGKILL of the server, and the SQLite file stays sound.

Two proofs:

1. In-process, deterministic: for a JSON save (POST /api/v1/houses, 201) and a page save
   (POST /houses, 303) the database COMMIT happens before the response's first byte is sent.
   If the commit ran after the acknowledgement (as a default-scoped FastAPI ``yield``
   dependency's exit code does), a crash in between would lose a save the client was told
   was made.
2. End to end: ``warmstead serve`` on a temp SQLite file (migrated, demo loaded) takes a burst
   of saves from 8 concurrent clients; after 60 acknowledged saves it is SIGKILLed while
   requests are still in flight. After a restart every acknowledged save is there (its export
   names it) and ``PRAGMA integrity_check`` says ``ok``. Bounded: at most 300 requests; about
   5 s.
"""

from __future__ import annotations

import secrets
import sqlite3
import threading
from pathlib import Path
from typing import Any

import httpx
from fastapi.testclient import TestClient
from sqlalchemy import event

from server.app import create_app
from server.cli import demo, migrate
from server.config import Settings
from tests.utils.auth import signed_in_headers, signed_in_headers_for_url
from tests.utils.houses import big_house_document
from tests.utils.server import server_env, start_server

CLIENTS = 8
MAX_REQUESTS = 300
KILL_AFTER_ACKS = 60


def small_house(name: str) -> dict[str, Any]:
    return big_house_document(surfaces=2, upgrades_per_surface=1, packages=1, name=name)


# --- 1. the commit comes before the acknowledgement ----------------------------------------


class _Spy:
    """ASGI wrapper that notes when a response starts, beside the engine's commits."""

    def __init__(self, app: Any, events: list[str]) -> None:
        self.app, self.events = app, events

    async def __call__(self, scope: Any, receive: Any, send: Any) -> None:
        async def spy_send(message: dict[str, Any]) -> None:
            if message["type"] == "http.response.start":
                self.events.append(f"response {message['status']}")
            await send(message)

        await self.app(scope, receive, spy_send)


def test_saves_are_committed_before_they_are_acknowledged(tmp_path: Path) -> None:
    url = f"sqlite:///{tmp_path / 'ack.db'}"
    migrate(url)
    app = create_app(Settings(environment="test", database_url=url))
    headers = signed_in_headers(app, email="ack@example.com")
    events: list[str] = []
    event.listen(app.state.engine, "commit", lambda _conn: events.append("commit"))
    with TestClient(_Spy(app, events), follow_redirects=False) as client:
        saved = client.post("/api/v1/houses", json=small_house("ack json"), headers=headers)
        assert saved.status_code == 201, saved.text
        assert events[-2:] == ["commit", "response 201"], events
        events.clear()
        page = client.post("/houses", data={"label": "ack page", "units": "ip"}, headers=headers)
        assert page.status_code == 303, page.text
        assert events[-2:] == ["commit", "response 303"], events
    app.state.engine.dispose()


# --- 2. SIGKILL in the middle of a burst ---------------------------------------------------


def test_acknowledged_saves_survive_sigkill_mid_burst(tmp_path: Path) -> None:
    db = tmp_path / "crash.db"
    url = f"sqlite:///{db}"
    secret = secrets.token_urlsafe(32)
    migrate(url)
    demo(url)
    _org, headers = signed_in_headers_for_url(url, secret, email="crash@example.com")
    env = server_env(url, secret)
    server = start_server(env)
    # The server runs on uvloop and httptools (see ../shared/STYLE.md, habit 10).
    maps = Path(f"/proc/{server.process.pid}/maps").read_text()
    assert "uvloop" in maps and "httptools" in maps

    lock = threading.Lock()
    enough = threading.Event()
    acked: dict[int, str] = {}
    refused: list[str] = []
    cut_off: list[str] = []
    sent = 0

    def client_loop() -> None:
        nonlocal sent
        with httpx.Client(base_url=server.base_url, headers=headers, timeout=10) as client:
            while True:
                with lock:
                    if sent >= MAX_REQUESTS:
                        return
                    sent += 1
                    name = f"crash save {sent}"
                try:
                    response = client.post("/api/v1/houses", json=small_house(name))
                except httpx.HTTPError as exc:  # the server is gone: this save was in flight
                    with lock:
                        cut_off.append(f"{name}: {type(exc).__name__}")
                    return
                with lock:
                    if response.status_code == 201:
                        acked[response.json()["id"]] = name
                        if len(acked) >= KILL_AFTER_ACKS:
                            enough.set()
                    else:
                        refused.append(f"{name}: {response.status_code} {response.text[:100]}")

    threads = [threading.Thread(target=client_loop) for _ in range(CLIENTS)]
    for thread in threads:
        thread.start()
    try:
        assert enough.wait(timeout=20), f"only {len(acked)} saves acknowledged in 20 s"
    finally:
        server.kill()
        for thread in threads:
            thread.join(timeout=15)
    assert not refused, refused[:3]
    assert cut_off, "the kill should land while saves are in flight"
    assert sent <= MAX_REQUESTS

    # The file first, before anything opens it through the app.
    with sqlite3.connect(db) as connection:
        assert connection.execute("PRAGMA integrity_check").fetchone()[0] == "ok"
        stored = dict(connection.execute("SELECT id, label FROM houses").fetchall())
    missing = {i: n for i, n in acked.items() if stored.get(i) != n}
    assert not missing, f"acknowledged but lost after SIGKILL: {sorted(missing.values())[:5]}"

    restarted = start_server(env)
    try:
        with httpx.Client(base_url=restarted.base_url, headers=headers, timeout=10) as client:
            for house_id, name in sorted(acked.items()):
                document = client.get(f"/api/v1/houses/{house_id}/document")
                assert document.status_code == 200, (house_id, document.text[:200])
                assert document.json()["name"] == name
                assert len(document.json()["surfaces"]) == 2
    finally:
        restarted.stop()
