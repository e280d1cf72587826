"""A form loaded before someone else's save gets the conflict answer (409), never a 500.

The first tests post from a "second tab" whose version is old: the units switch, deleting a
surface, a pipe run and a package each answer 409 with the conflict message and change
nothing. The last ones drive the one mechanism every save goes through,
:func:`server.services.houses.touch`, into the race it is for: the version changes in the
database between this request's read and its write (what a simultaneous save does), and
real database refusals are told apart from real errors (SQLite and PostgreSQL).
"""

from __future__ import annotations

import re
import sqlite3
from pathlib import Path

import pytest
from fastapi.testclient import TestClient
from sqlalchemy import create_engine, select, text, update
from sqlalchemy.exc import DBAPIError, IntegrityError

from server.db import lost_race, session_scope
from server.models import House, PriceBookItem, Surface
from server.services import houses as svc
from tests.conftest import Account

WALL = "wall-2x4-16-r13"
PIPE = {"name": "Hot water", "length": "40", "pipe_outer_diameter": "7/8",
        "fluid_temperature": "130", "ambient_temperature": "55", "hours_per_year": "3000"}  # fmt: skip


def _house(client: TestClient) -> tuple[str, int]:
    r = client.post("/houses", data={"label": "Two tabs", "units": "ip"}, follow_redirects=False)
    assert r.status_code == 303
    return r.headers["location"], int(r.headers["location"].rsplit("/", 1)[1])


def _version(client: TestClient, url: str) -> str:
    match = re.search(r'name="version" value="(\d+)"', client.get(url).text)
    assert match
    return match.group(1)


def _add_wall(client: TestClient, house: str, area: str = "100") -> str:
    r = client.post(f"{house}/surfaces", data={"typical": WALL, "area": area},
                    follow_redirects=False)  # fmt: skip
    assert r.status_code == 303, r.text[:300]
    return str(r.headers["location"])


def _stored(app, house_id: int) -> tuple[int, str, int]:  # type: ignore[no-untyped-def]
    """(version, units, surface count) as the database holds them."""
    with session_scope(app.state.session_factory) as s:
        house = s.get(House, house_id)
        assert house is not None
        return house.version, house.units, len(house.surfaces)


def test_units_switch_from_a_stale_tab_is_a_conflict(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    house, house_id = _house(client)
    _add_wall(client, house)
    old = _version(client, house)  # both tabs show this version
    first = client.post(f"{house}/units", data={"units": "si", "version": old},
                        follow_redirects=False)  # fmt: skip
    assert first.status_code == 303
    saved = _stored(app, house_id)
    # the second tab, still on the old version: back to US units, and the same button again
    for units in ("ip", "si"):
        r = client.post(f"{house}/units", data={"units": units, "version": old})
        assert r.status_code == 409
        assert "Someone else saved this house" in r.text and "units were not switched" in r.text
        assert _stored(app, house_id) == saved  # nothing converted, no version bump
    assert saved[1] == "si"


def test_deleting_a_surface_from_a_stale_tab_is_a_conflict(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    house, house_id = _house(client)
    first = _add_wall(client, house, "100")
    old = _version(client, first)
    _add_wall(client, house, "200")  # someone else's save: the version moves on
    r = client.post(first, data={"action": "delete", "version": old})
    assert r.status_code == 409 and "nothing was deleted" in r.text
    assert _stored(app, house_id)[2] == 2  # both walls still there


def test_stale_pipe_run_and_package_forms_are_conflicts(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    house, house_id = _house(client)
    wall = _add_wall(client, house)
    r = client.post(f"{house}/upgrades", data={"surface_id": wall.rsplit("/", 1)[1],
                    "name": "Dense-pack", "start": "as_found"}, follow_redirects=False)  # fmt: skip
    assert r.status_code == 303
    old = _version(client, house)
    client.post(f"{house}/settings/climate", data={"hdd": "5000", "version": old})
    before = _stored(app, house_id)
    r = client.post(f"{house}/pipes", data={**PIPE, "version": old})
    assert r.status_code == 409 and "Someone else saved this house" in r.text
    r = client.post(f"{house}/packages", data={"name": "Walls", "upgrades": "dense-pack",
                                               "version": old})  # fmt: skip
    assert r.status_code == 409 and "Someone else saved this house" in r.text
    assert _stored(app, house_id) == before


def test_a_save_that_loses_the_race_is_a_conflict_and_stores_nothing(  # type: ignore[no-untyped-def]
    app, client: TestClient, firm_a: Account
) -> None:
    """Read at version v, then another request commits v + 1, then this one writes: the
    UPDATE ... WHERE version = v matches no row, and ``touch`` answers Conflict."""
    _url, house_id = _house(client)
    factory = app.state.session_factory
    with factory() as mine:
        house = svc.get_house(session=mine, organization_id=firm_a.organization_id,
                              house_id=house_id)  # fmt: skip
        read_version = house.version
        with session_scope(factory) as theirs:  # the other save, committed in between
            theirs.execute(update(House).where(House.id == house_id)
                           .values(version=House.version + 1, label="Theirs"))  # fmt: skip
        with pytest.raises(svc.Conflict) as raised:
            svc.add_surface(session=mine, house=house, name="Mine", kind="wall", area=10.0,
                            expected_version=read_version)  # fmt: skip
        assert raised.value.current_version == read_version + 1
        # rolled back, and usable for the conflict page, which shows what is stored now
        assert house.label == "Theirs" and house.version == read_version + 1
        mine.commit()
    with session_scope(factory) as s:
        assert s.scalars(select(Surface).where(Surface.house_id == house_id)).all() == []


def test_lost_race_tells_refusals_from_real_errors(  # type: ignore[no-untyped-def]
    app, firm_a: Account, db_url: str, tmp_path: Path
) -> None:
    """Real errors of the backend under test: a unique value just taken (a race) against a
    missing table (a bug); on SQLite also "database is locked" while another writer holds it."""
    item = {"organization_id": firm_a.organization_id, "slug": "same", "upgrade_type": "attic_fill",
            "basis": "per_area"}  # fmt: skip
    with session_scope(app.state.session_factory) as s:
        s.add(PriceBookItem(name="A", **item))
    with app.state.session_factory() as s:
        s.add(PriceBookItem(name="B", **item))
        with pytest.raises(IntegrityError) as unique:
            s.flush()
        assert lost_race(unique.value)
        s.rollback()
        with pytest.raises(DBAPIError) as missing:
            s.execute(text("SELECT * FROM no_such_table"))
        assert not lost_race(missing.value)
    if not db_url.startswith("sqlite"):
        return
    path = tmp_path / "locked.db"
    holder = sqlite3.connect(path)
    holder.execute("CREATE TABLE t (x INTEGER)")
    holder.commit()
    holder.execute("BEGIN IMMEDIATE")  # holds the write lock
    engine = create_engine(f"sqlite:///{path}", connect_args={"timeout": 0.05})
    try:
        with engine.connect() as conn, pytest.raises(DBAPIError) as locked:
            conn.execute(text("INSERT INTO t VALUES (1)"))
        assert "database is locked" in str(locked.value) and lost_race(locked.value)
    finally:
        engine.dispose()
        holder.rollback()
        holder.close()
