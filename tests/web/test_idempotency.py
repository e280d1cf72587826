"""Create forms carry a one-time key: the same post twice makes one row and gets one answer.

Every case runs on SQLite and PostgreSQL (the ``client`` fixture's ``db_url``). The concurrent
case sends two real requests at once through the whole app from two threads; a barrier after
each one's key lookup makes sure both have looked (and found nothing) before either writes, so
only the unique constraint can stop the second row.
"""

from __future__ import annotations

import re
import threading
from collections.abc import Callable
from concurrent.futures import ThreadPoolExecutor

import pytest
from fastapi.testclient import TestClient
from sqlalchemy import func, select

from server.models import House, IdempotencyKey, Package, ShareLink, Surface, Upgrade
from server.services import idempotency as idem

KEY_FIELD = re.compile(r'name="idempotency_key" value="([A-Za-z0-9_-]+)"')


def _key() -> str:
    return idem.new_key()


def _new_house(client: TestClient, label: str = "Key test house") -> int:
    """A house with its blower-door figure (air sealing needs one to start from)."""
    r = client.post("/houses", data={"label": label}, follow_redirects=False)
    assert r.status_code == 303, r.text[:300]
    house_id = int(r.headers["location"].rsplit("/", 1)[1])
    r = client.post(f"/houses/{house_id}/settings/air_leakage", follow_redirects=False,
                    data={"cfm50": "3200", "n_factor": "18", "volume": "12000"})  # fmt: skip
    assert r.status_code == 303, r.text[:300]
    return house_id


def _version(app, house_id: int) -> str:  # type: ignore[no-untyped-def]
    with app.state.session_factory() as s:
        return str(s.get(House, house_id).version)  # type: ignore[union-attr]


def _count(app, model, **where) -> int:  # type: ignore[no-untyped-def]
    with app.state.session_factory() as s:
        query = select(func.count()).select_from(model).filter_by(**where)
        return int(s.scalar(query) or 0)


PIPE = {"name": "Hot water to kitchen", "length": "40", "pipe_outer_diameter": "7/8",
        "fluid_temperature": "130", "ambient_temperature": "55", "hours_per_year": "3000",
        "thickness": "", "conductivity": ""}  # fmt: skip


def _with_surface(app, client: TestClient, house_id: int) -> int:  # type: ignore[no-untyped-def]
    r = client.post(f"/houses/{house_id}/surfaces", follow_redirects=False,
                    data={"typical": "rim-2x10-empty", "kind": "rim_joist", "area": "100",
                          "version": _version(app, house_id)})  # fmt: skip
    assert r.status_code == 303, r.text[:300]
    return int(r.headers["location"].rsplit("/", 1)[1])


def _with_air_sealing(app, client: TestClient, house_id: int) -> str:  # type: ignore[no-untyped-def]
    r = client.post(f"/houses/{house_id}/upgrades", follow_redirects=False,
                    data={"kind": "air_sealing", "cfm50_after": "2000", "cost_fixed": "600",
                          "life_years": "20", "version": _version(app, house_id)})  # fmt: skip
    assert r.status_code == 303, r.text[:300]
    with app.state.session_factory() as s:
        return s.scalars(select(Upgrade.slug).filter_by(house_id=house_id)).one()


# (what is made, how to post it: (app, client, house_id) -> (path, fields), what to count)
Case = tuple[str, Callable, Callable]
CASES: list[Case] = [
    ("house", lambda app, c, h: ("/houses", {"label": "Twice-sent house"}),
     lambda app, h: _count(app, House, label="Twice-sent house")),
    ("surface", lambda app, c, h: (f"/houses/{h}/surfaces", {"typical": "rim-2x10-empty", "kind": "rim_joist",
                                                           "area": "100", "version": _version(app, h)}),
     lambda app, h: _count(app, Surface, house_id=h)),
    ("pipe run", lambda app, c, h: (f"/houses/{h}/pipes", {**PIPE, "version": _version(app, h)}),
     lambda app, h: _count(app, Surface, house_id=h, kind="pipe_run")),
    ("air sealing", lambda app, c, h: (f"/houses/{h}/upgrades", {"kind": "air_sealing", "cfm50_after": "2000",
                                                               "cost_fixed": "600", "version": _version(app, h)}),
     lambda app, h: _count(app, Upgrade, house_id=h)),
    ("assembly upgrade", lambda app, c, h: (f"/houses/{h}/upgrades", {
        "kind": "assembly", "surface_id": str(_with_surface(app, c, h)), "name": "Foam the rim",
        "start": "as_found", "version": _version(app, h)}),
     lambda app, h: _count(app, Upgrade, house_id=h)),
    ("package", lambda app, c, h: (f"/houses/{h}/packages", {
        "name": "Air only", "upgrades": _with_air_sealing(app, c, h), "version": _version(app, h)}),
     lambda app, h: _count(app, Package, house_id=h)),
    ("share link", lambda app, c, h: (f"/houses/{h}/share-links", {"label": "Owner", "days_valid": "30"}),
     lambda app, h: _count(app, ShareLink, house_id=h)),
]  # fmt: skip


@pytest.mark.parametrize("made, build, count", CASES, ids=[c[0] for c in CASES])
def test_same_key_twice_makes_one_row(app, client: TestClient, made, build, count) -> None:  # type: ignore[no-untyped-def]
    house_id = _new_house(client)
    path, fields = build(app, client, house_id)
    fields = {**fields, "idempotency_key": _key()}
    before = count(app, house_id)
    first = client.post(path, data=fields, follow_redirects=False)
    again = client.post(path, data=fields, follow_redirects=False)  # the same form, sent again
    assert count(app, house_id) == before + 1, made
    if made == "share link":  # answered in the page (the token is shown once), never a redirect
        assert first.status_code == again.status_code == 200
        assert re.search(r"/s/[A-Za-z0-9_-]{20,}", first.text)
        assert not re.search(r"/s/[A-Za-z0-9_-]{20,}", again.text)  # only its hash is stored
        assert "only one link was made" in again.text
    else:  # the same redirect, not a conflict over the version the first post moved on
        assert first.status_code == again.status_code == 303, again.text[:300]
        assert again.headers["location"] == first.headers["location"]
    # a fresh key (the form rendered again) makes a new row
    fresh = {**fields, "idempotency_key": _key()}
    if "version" in fresh:
        fresh["version"] = _version(app, house_id)
    if made == "package":
        fresh["name"] = "Air only, again"
    client.post(path, data=fresh, follow_redirects=False)
    assert count(app, house_id) == before + 2, made


def test_create_forms_carry_a_fresh_key(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    one = KEY_FIELD.findall(client.get("/houses").text)
    two = KEY_FIELD.findall(client.get("/houses").text)
    assert len(one) == 1 and len(two) == 1 and one != two
    assert len(one[0]) == 22  # 16 random bytes, URL-safe base64 without padding: ceil(16*4/3)
    house_id = _new_house(client)
    house_page = client.get(f"/houses/{house_id}").text
    # add a surface + one quick-add form per typical assembly, pipe run, air sealing
    assert len(KEY_FIELD.findall(house_page)) >= 4
    share = client.get(f"/houses/{house_id}/share-links", headers={"HX-Request": "true"}).text
    assert len(KEY_FIELD.findall(share)) == 1


def test_key_is_the_users_own(app, client: TestClient, firm_a) -> None:  # type: ignore[no-untyped-def]
    """Another user of the same firm posting a key someone used gets no answer of theirs."""
    from tests.conftest import make_account, sign_in

    key = _key()
    first = client.post("/houses", data={"label": "Mine", "idempotency_key": key},
                        follow_redirects=False)  # fmt: skip
    colleague = make_account(app, firm=None, email="staff@firm-a.invalid", role="staff",
                             organization_id=firm_a.organization_id)  # fmt: skip
    with TestClient(app) as other:
        sign_in(other, app, colleague)
        theirs = other.post("/houses", data={"label": "Theirs", "idempotency_key": key},
                            follow_redirects=False)  # fmt: skip
    assert theirs.status_code == 303 and theirs.headers["location"] != first.headers["location"]
    assert _count(app, IdempotencyKey, key=key) == 2


@pytest.mark.parametrize("made", ["house", "surface", "share link"])
def test_concurrent_posts_of_one_key_make_one_row(
    app, client: TestClient, monkeypatch, made
) -> None:  # type: ignore[no-untyped-def]
    house_id = _new_house(client)
    case = next(c for c in CASES if c[0] == made)
    path, fields = case[1](app, client, house_id)
    fields = {**fields, "idempotency_key": _key()}
    before = case[2](app, house_id)
    barrier = threading.Barrier(2, timeout=20)
    waited: set[int] = set()
    real_find = idem.find

    def find_then_meet(**kwargs):  # type: ignore[no-untyped-def]
        found = real_find(**kwargs)
        if found is None and threading.get_ident() not in waited:
            waited.add(threading.get_ident())
            barrier.wait()  # both requests have looked and found nothing
        return found

    monkeypatch.setattr(idem, "find", find_then_meet)
    with ThreadPoolExecutor(2) as pool:
        answers = list(
            pool.map(lambda _: client.post(path, data=fields, follow_redirects=False), range(2))
        )
    assert not barrier.broken
    assert case[2](app, house_id) == before + 1
    assert _count(app, IdempotencyKey, key=fields["idempotency_key"]) == 1
    codes = sorted(a.status_code for a in answers)
    if made == "share link":
        assert codes == [200, 200]
        assert sum(bool(re.search(r"/s/[A-Za-z0-9_-]{20,}", a.text)) for a in answers) == 1
    else:
        assert codes == [303, 303]
        assert answers[0].headers["location"] == answers[1].headers["location"]
