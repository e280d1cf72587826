"""Saves racing on one house end as a saved change (303) or the conflict answer (409), never 500.

Real concurrent requests against ``warmstead serve`` (one worker, loopback), on SQLite and on
PostgreSQL, in four phases on one server per backend (a server start is most of a phase's
time on this two-core machine):

1. Two users of one firm, 30 rounds: in each round both post a change to the same house at
   the same instant, both with the version they loaded. Only one change can be made from
   that version: one answer is 303 and its change is stored, the other is 409 with the page's
   "Someone else saved ..." message and its change is not stored. The rounds go through the
   house's save paths in turn: add, edit and delete a surface, its layers, two settings
   sections, add and edit an upgrade and its layers, a pipe run, a package, the units switch.
2. 150 add-surface requests at once from the same loaded page (one version): one 303, 149
   conflicts that keep what was typed, one new surface. Then 150 at once without a version
   (nothing to be stale): each 303 is exactly one stored surface, each 409 stored nothing.
3. 150 layer-editor saves of one surface at once, one version: one 303, the stored layers
   are that request's, and each 409 shows the layer name its request typed.
4. 40 price-book items of the same name at once: the item's link name (slug) is unique in
   the firm, so two requests may pick the same one; the one that loses is a 409 and stores
   nothing, and every 303 is one stored item.

Every request gets an HTTP answer within the admission gate's 30 s queue limit (none
dropped, no 500 or 503). Bounded: about 800 requests per backend.
"""

from __future__ import annotations

import asyncio
import concurrent.futures
import json
import secrets
import threading
import time
from collections import Counter
from collections.abc import Callable, Iterator
from dataclasses import dataclass, field
from typing import Any

import httpx
import pytest
from sqlalchemy import func, select

from server.db import make_engine, make_session_factory, session_scope
from server.models import House, PriceBookItem, Surface, Upgrade
from server.services.accounts import create_user
from tests.utils.auth import create_signed_in_user, session_headers
from tests.utils.server import Server, server_env, start_server

ROUNDS = 30
BURST = 150
PRICE_BURST = 40
#: the admission gate answers 503 after 30 s in its queue (server/admission.py): a request not
#: answered by then has been dropped
CLIENT_TIMEOUT_S = 30.0
SAVED, CONFLICT = 303, 409
CONFLICT_TEXT = "Someone else"
WALL = "wall-2x4-16-r13"


@dataclass
class Tally:
    """Answers by status; ``dropped`` is no HTTP answer at all (reset, timeout)."""

    counts: Counter[str] = field(default_factory=Counter)
    bad: list[str] = field(default_factory=list)

    def add(self, status: int | str, what: str, body: str = "") -> None:
        self.counts[str(status)] += 1
        if status not in (SAVED, CONFLICT):
            self.bad.append(f"{what}: {status} {body[:160]!r}")
        elif status == CONFLICT and CONFLICT_TEXT not in body:
            self.bad.append(f"{what}: 409 without the conflict message")


@dataclass
class Site:
    """A running server on the test's database, one firm, two signed-in users of it."""

    server: Server
    backend: str
    users: list[dict[str, str]]
    organization_id: int
    factory: Any

    def client(self, user: int = 0) -> httpx.Client:
        return httpx.Client(base_url=self.server.base_url, headers=self.users[user],
                            timeout=CLIENT_TIMEOUT_S)  # fmt: skip

    def new_house(self, label: str) -> int:
        with self.client() as c:
            made = c.post("/houses", data={"label": label, "units": "ip"})
        assert made.status_code == SAVED, made.text[:300]
        return int(made.headers["location"].rsplit("/", 1)[1])

    def stored(self, house_id: int) -> dict[str, Any]:
        """What the database holds now for the house: columns, surfaces, upgrades, packages."""
        with session_scope(self.factory) as s:
            house = s.get(House, house_id)
            assert house is not None
            surfaces = s.scalars(select(Surface).where(Surface.house_id == house_id)).all()
            upgrades = s.scalars(select(Upgrade).where(Upgrade.house_id == house_id)).all()
            return {
                "version": house.version, "units": house.units, "climate": house.climate,
                "economics": house.economics, "packages": [p.name for p in house.packages],
                "surfaces": {x.id: (x.name, x.kind, json.dumps(x.assembly)) for x in surfaces},
                "upgrades": {u.id: (u.name, u.slug, json.dumps(u.document)) for u in upgrades},
            }  # fmt: skip


@pytest.fixture
def site(db_url: str) -> Iterator[Site]:
    secret = secrets.token_urlsafe(32)
    engine = make_engine(db_url)
    factory = make_session_factory(engine)
    org_id, user_id, version = create_signed_in_user(factory, email="first@race.invalid")
    with session_scope(factory) as s:
        second = create_user(session=s, organization_id=org_id, email="second@race.invalid",
                             password="not-used-by-these-tests", role="staff")  # fmt: skip
        second_id, second_version = second.id, second.session_version
    users = [
        session_headers(secret, user_id=user_id, session_version=version),
        session_headers(secret, user_id=second_id, session_version=second_version),
    ]
    server = start_server(server_env(db_url, secret))
    try:
        yield Site(server, db_url.split(":")[0], users, org_id, factory)
    finally:
        server.stop()
        engine.dispose()


def _post(client: httpx.Client, path: str, data: dict[str, str]) -> tuple[int | str, str]:
    try:
        r = client.post(path, data=data)
    except httpx.HTTPError as exc:
        return f"dropped ({type(exc).__name__})", ""
    return r.status_code, r.text


async def _burst(
    site: Site, requests: list[tuple[str, dict[str, str]]]
) -> tuple[list[tuple[int | str, str]], float]:
    """All ``requests`` at once, each on its own connection; (answers, seconds taken)."""
    n = len(requests)
    limits = httpx.Limits(max_connections=n, max_keepalive_connections=n)
    async with httpx.AsyncClient(base_url=site.server.base_url, headers=site.users[0],
                                 timeout=CLIENT_TIMEOUT_S, limits=limits) as client:  # fmt: skip

        async def one(path: str, data: dict[str, str]) -> tuple[int | str, str]:
            try:
                r = await client.post(path, data=data)
            except httpx.HTTPError as exc:
                return f"dropped ({type(exc).__name__})", ""
            return r.status_code, r.text

        started = time.perf_counter()
        answers = await asyncio.gather(*(one(p, d) for p, d in requests))
        return list(answers), time.perf_counter() - started


# --- 1. two users, the same version, thirty rounds ------------------------------------------

PIPE = {"length": "40", "pipe_outer_diameter": "7/8", "fluid_temperature": "130",
        "ambient_temperature": "55", "hours_per_year": "3000"}  # fmt: skip


def _layers(name: str, r: str) -> dict[str, str]:
    return {"layer_count": "1", "layers-0-type": "r", "layers-0-name": name, "layers-0-r": r,
            "heat_flow": "horizontal", "films": "ashrae", "method": "parallel_path"}  # fmt: skip


def _walls(st: dict[str, Any]) -> list[int]:
    return sorted(i for i, s in st["surfaces"].items() if s[1] == "wall")


def _upgrade(st: dict[str, Any]) -> int:
    return min(i for i, u in st["upgrades"].items() if '"assembly"' in u[2])


def _everything(st: dict[str, Any]) -> str:
    return json.dumps([st["surfaces"], st["upgrades"], st["packages"]])


@dataclass(frozen=True)
class Kind:
    """One save path: ``form(house, stored, who, tag) -> (path, fields)``, and where a saved
    change shows: ``seen(stored)`` holds the winner's ``token`` field and not the loser's."""

    what: str
    form: Callable[[int, dict[str, Any], str, str], tuple[str, dict[str, str]]]
    token: str = "name"
    seen: Callable[[dict[str, Any]], Any] = _everything


KINDS = [
    Kind("add surface", lambda h, st, who, tag: (f"/houses/{h}/surfaces",
         {"name": f"{who} wall {tag}", "typical": WALL, "area": "100"})),
    Kind("edit surface", lambda h, st, who, tag: (f"/houses/{h}/surfaces/{_walls(st)[0]}",
         {"name": f"{who} renamed {tag}", "kind": "wall", "area": "120"})),
    Kind("layers", lambda h, st, who, tag: (f"/houses/{h}/surfaces/{_walls(st)[0]}/assembly",
         _layers(f"{who} layer {tag}", "7")), token="layers-0-name"),
    Kind("climate", lambda h, st, who, tag: (f"/houses/{h}/settings/climate",
         {"hdd": f"{5000 + 10 * int(tag[1:3]) + (0 if who == 'alpha' else 5)}"}),
         token="hdd", seen=lambda st: st["climate"].get("hdd")),
    Kind("money", lambda h, st, who, tag: (f"/houses/{h}/settings/economics",
         {"discount_rate": "3", "fuel_escalation": "2", "years": "20" if who == "alpha" else "25"}),
         token="years", seen=lambda st: st["economics"].get("years")),
    Kind("add upgrade", lambda h, st, who, tag: (f"/houses/{h}/upgrades",
         {"surface_id": str(_walls(st)[0]), "name": f"{who} upgrade {tag}", "start": "as_found"})),
    Kind("edit upgrade", lambda h, st, who, tag: (f"/houses/{h}/upgrades/{_upgrade(st)}",
         {"name": f"{who} priced {tag}", "cost_fixed": "100", "cost_per_area": "1", "rebate": "0"})),
    Kind("upgrade layers", lambda h, st, who, tag: (f"/houses/{h}/upgrades/{_upgrade(st)}/assembly",
         _layers(f"{who} new layer {tag}", "20")), token="layers-0-name"),
    Kind("add pipe run", lambda h, st, who, tag: (f"/houses/{h}/pipes",
         {"name": f"{who} pipe {tag}", **PIPE})),
    Kind("add package", lambda h, st, who, tag: (f"/houses/{h}/packages",
         {"name": f"{who} package {tag}", "upgrades": st["upgrades"][_upgrade(st)][1]})),
    # both click the other unit system: one converts the house, the other is stale
    Kind("units", lambda h, st, who, tag: (f"/houses/{h}/units",
         {"units": "si" if st["units"] == "ip" else "ip"}), token="units",
         seen=lambda st: st["units"]),
    # each deletes a different wall: the first to save deletes its wall, the other wall stays
    Kind("delete surface", lambda h, st, who, tag: (
         f"/houses/{h}/surfaces/{_walls(st)[-1 if who == 'alpha' else -2]}", {"action": "delete"}),
         token="", seen=lambda st: sorted(_walls(st))),
]  # fmt: skip


def _at_once(
    clients: list[httpx.Client], posts: list[tuple[str, dict[str, str]]]
) -> list[tuple[int | str, str]]:
    """Client ``i`` posts ``posts[i]``; a barrier lets them all go at the same instant."""
    answers: list[tuple[int | str, str]] = [("none", "")] * len(posts)
    barrier = threading.Barrier(len(posts))

    def send(i: int) -> None:
        barrier.wait()
        answers[i] = _post(clients[i], *posts[i])

    threads = [threading.Thread(target=send, args=(i,)) for i in range(len(posts))]
    for thread in threads:
        thread.start()
    for thread in threads:
        thread.join()
    return answers


def _prepare(site: Site, house_id: int) -> None:
    """Three walls and an upgrade, so every kind of save has something to work on."""
    with site.client() as c:
        for area in ("100", "200", "300"):
            r = c.post(f"/houses/{house_id}/surfaces", data={"typical": WALL, "area": area})
            assert r.status_code == SAVED, r.text[:300]
        wall = _walls(site.stored(house_id))[0]
        r = c.post(f"/houses/{house_id}/upgrades",
                   data={"surface_id": str(wall), "name": "Dense-pack", "start": "as_found"})  # fmt: skip
        assert r.status_code == SAVED, r.text[:300]


def _two_users(site: Site) -> None:
    house = site.new_house("Two users")
    _prepare(site, house)
    tally, wrong = Tally(), []
    clients = [site.client(0), site.client(1)]
    try:
        for n in range(ROUNDS):
            kind = KINDS[n % len(KINDS)]
            if kind.what == "delete surface" and len(_walls(site.stored(house))) < 3:
                _prepare(site, house)
            before = site.stored(house)
            tag = f"#{n:02d}."  # no tag is a substring of another
            forms = [kind.form(house, before, who, tag) for who in ("alpha", "bravo")]
            version = str(before["version"])
            answers = _at_once(
                clients, [(path, {**data, "version": version}) for path, data in forms]
            )
            for (status, body), who in zip(answers, ("alpha", "bravo"), strict=True):
                tally.add(status, f"round {n} {kind.what} ({who})", body)
            statuses = [a[0] for a in answers]
            if sorted(map(str, statuses)) != [str(SAVED), str(CONFLICT)]:
                continue  # in the tally
            after = site.stored(house)
            won, lost = (0, 1) if statuses[0] == SAVED else (1, 0)
            if after["version"] != before["version"] + 1:
                wrong.append(f"round {n} {kind.what}: version {before['version']} -> "
                             f"{after['version']}")  # fmt: skip
            if kind.what == "delete surface":
                gone = int(forms[won][0].rsplit("/", 1)[1])
                kept = int(forms[lost][0].rsplit("/", 1)[1])
                ok = gone not in after["surfaces"] and kept in after["surfaces"]
            elif kind.what == "units":
                ok = after["units"] == forms[won][1]["units"] != before["units"]
            else:
                stored = json.dumps(kind.seen(after))
                ok = (forms[won][1][kind.token] in stored
                      and forms[lost][1][kind.token] not in stored)  # fmt: skip
            if not ok:
                wrong.append(f"round {n} {kind.what}: stored {kind.seen(after)!r}")
    finally:
        for c in clients:
            c.close()
    print(f"\n{site.backend}: two users x {ROUNDS} rounds: {dict(tally.counts)}")
    assert not tally.bad, tally.bad[:5]
    assert not wrong, wrong[:5]
    assert tally.counts[str(SAVED)] == ROUNDS and tally.counts[str(CONFLICT)] == ROUNDS


# --- 2.-4. bursts ---------------------------------------------------------------------------


def _add_surface_bursts(site: Site) -> None:
    house = site.new_house("Add-surface burst")
    path = f"/houses/{house}/surfaces"
    version = str(site.stored(house)["version"])
    same_page = [(path, {"name": f"tab {i}.", "typical": WALL, "area": "100", "version": version})
                 for i in range(BURST)]  # fmt: skip
    answers, seconds = _in_thread(_burst(site, same_page))
    tally = Tally()
    for (status, body), (_p, data) in zip(answers, same_page, strict=True):
        tally.add(status, data["name"], body)
        if status == CONFLICT and f'value="{data["name"]}"' not in body:
            tally.bad.append(f"{data['name']}: the 409 lost what was typed")
    saved = {d["name"] for (st, _b), (_p, d) in zip(answers, same_page, strict=True) if st == SAVED}
    names = {s[0] for s in site.stored(house)["surfaces"].values()}
    print(f"\n{site.backend}: {BURST} add-surface at once, one version: {dict(tally.counts)} "
          f"in {seconds:.1f} s")  # fmt: skip
    assert not tally.bad, (len(tally.bad), tally.bad[:5])
    assert len(saved) == 1 and names == saved, (saved, names)

    free = [(path, {"name": f"no version {i}.", "typical": WALL, "area": "50"})
            for i in range(BURST)]  # fmt: skip
    answers, seconds = _in_thread(_burst(site, free))
    tally = Tally()
    for (status, body), (_p, data) in zip(answers, free, strict=True):
        tally.add(status, data["name"], body)
    saved = {d["name"] for (st, _b), (_p, d) in zip(answers, free, strict=True) if st == SAVED}
    stored = [
        s[0] for s in site.stored(house)["surfaces"].values() if s[0].startswith("no version")
    ]
    print(f"{site.backend}: {BURST} add-surface at once, no version: {dict(tally.counts)} "
          f"in {seconds:.1f} s")  # fmt: skip
    assert not tally.bad, (len(tally.bad), tally.bad[:5])
    assert saved and sorted(stored) == sorted(saved)  # each 303 stored once, no 409 stored


def _layer_burst(site: Site) -> None:
    house = site.new_house("Layer burst")
    _prepare(site, house)
    wall = _walls(site.stored(house))[0]
    path = f"/houses/{house}/surfaces/{wall}/assembly"
    version = site.stored(house)["version"]
    requests = [(path, {**_layers(f"from tab {i}.", f"{5 + i / 100:.2f}"), "version": str(version)})
                for i in range(BURST)]  # fmt: skip
    answers, seconds = _in_thread(_burst(site, requests))
    tally = Tally()
    for (status, body), (_p, data) in zip(answers, requests, strict=True):
        tally.add(status, data["layers-0-name"], body)
        if status == CONFLICT and f'value="{data["layers-0-name"]}"' not in body:
            tally.bad.append(f"{data['layers-0-name']}: the 409 lost what was typed")
    print(f"{site.backend}: {BURST} layer saves at once, one version: {dict(tally.counts)} "
          f"in {seconds:.1f} s")  # fmt: skip
    assert not tally.bad, (len(tally.bad), tally.bad[:5])
    won = [d for (st, _b), (_p, d) in zip(answers, requests, strict=True) if st == SAVED]
    after = site.stored(house)
    layers = json.loads(after["surfaces"][wall][2])["layers"]
    assert len(won) == 1 and after["version"] == version + 1
    assert [(x["name"], x["r"]) for x in layers] == [
        (won[0]["layers-0-name"], float(won[0]["layers-0-r"]))
    ]


def _price_book_burst(site: Site) -> None:
    form = {"name": "Attic fill", "upgrade_type": "attic_fill", "basis": "per_area",
            "units": "ip", "unit_cost": "1.25", "fixed_cost": "0"}  # fmt: skip
    answers, seconds = _in_thread(_burst(site, [("/price-book", form)] * PRICE_BURST))
    tally = Tally()
    for status, body in answers:
        tally.add(status, "price item", body)
    with session_scope(site.factory) as s:
        stored = s.scalar(select(func.count()).select_from(PriceBookItem)
                          .where(PriceBookItem.organization_id == site.organization_id))  # fmt: skip
    print(f"{site.backend}: {PRICE_BURST} price items of one name at once: {dict(tally.counts)} "
          f"in {seconds:.1f} s")  # fmt: skip
    assert not tally.bad, (len(tally.bad), tally.bad[:5])
    assert stored == tally.counts[str(SAVED)]


def _in_thread(coroutine):  # type: ignore[no-untyped-def]
    """Run ``coroutine`` on an event loop of its own thread: the browser tests' Playwright keeps
    a loop running on the main thread for the whole session, where asyncio.run() refuses."""
    with concurrent.futures.ThreadPoolExecutor(max_workers=1) as pool:
        return pool.submit(asyncio.run, coroutine).result()


def test_racing_saves_end_as_saved_or_conflict(site: Site) -> None:
    _two_users(site)
    _add_surface_bursts(site)
    _layer_burst(site)
    _price_book_burst(site)
