"""The one way a form's save ends (:func:`server.web.saving.save_or_rerender`).

First the helper alone: a stored save gets the success answer, the verb's InputError comes back
as every field's message and 422, a Conflict as the one conflict message and 409. Then the
pages whose stale form no other test posts: each answers 409 with its own words for what was
not done, and stores nothing.
"""

from __future__ import annotations

import re

from fastapi.testclient import TestClient

from server.db import session_scope
from server.errors import Conflict, FieldError, InputError
from server.models import House
from server.web.saving import save_or_rerender
from tests.web.test_bills_page import _bills as synthetic_bills
from tests.web.test_bills_page import _house as bills_house
from tests.web.test_bills_page import _post as post_bills
from tests.web.test_bills_page import _typed as typed_bills

#: the whole conflict message of a form (server/web/conflicts.py, stale_form's defaults)
STALE = ("Someone else saved this house after you opened it, so nothing was saved. What you "
         "typed is kept here: reload to see their change, then enter it again.")  # fmt: skip
WALL = "wall-2x4-16-r13"
CRAWL = {"kind": "crawlspace", "label": "Vented crawlspace", "method": "parts",
         "part_name_0": "Block walls", "part_area_0": "300", "part_u_0": "0.5",
         "volume": "4000", "air_preset": "iso-1"}  # fmt: skip


def _answer(call):  # type: ignore[no-untyped-def]
    """What save_or_rerender answers: ('saved', result) or ('rerender', errors, status)."""
    return save_or_rerender(call=call, saved=lambda result: ("saved", result),
                            rerender=lambda errors, status: ("rerender", errors, status))  # fmt: skip


def test_a_stored_save_gets_the_success_answer() -> None:
    assert _answer(lambda: 42) == ("saved", 42)


def test_an_input_error_is_every_field_message_and_422() -> None:
    def refuse() -> None:
        raise InputError("area", "must be greater than zero",
                         [FieldError("name", "required"), FieldError("area", "second word")])  # fmt: skip

    # the first message for a field is the one shown
    assert _answer(refuse) == (
        "rerender",
        {"area": "must be greater than zero", "name": "required"},
        422,
    )


def test_a_conflict_is_the_one_message_and_409() -> None:
    def lose() -> None:
        raise Conflict(7)

    assert _answer(lose) == ("rerender", {"form": STALE}, 409)
    answer = save_or_rerender(call=lose, saved=lambda _: "saved", conflict_key="units",
                              not_done="the units were not switched", then="Here it is as saved now.",
                              rerender=lambda errors, status: (errors, status))  # fmt: skip
    assert answer == ({"units": "Someone else saved this house after you opened it, so the "
                                "units were not switched. Here it is as saved now."}, 409)  # fmt: skip


def _house(client: TestClient) -> tuple[str, int]:
    r = client.post("/houses", data={"label": "Two tabs", "units": "ip"}, follow_redirects=False)
    assert r.status_code == 303
    return r.headers["location"], int(r.headers["location"].rsplit("/", 1)[1])


def _version(client: TestClient, url: str) -> str:
    match = re.search(r'name="version" value="(\d+)"', client.get(url).text)
    assert match
    return match.group(1)


def _stored_version(app, house_id: int) -> int:  # type: ignore[no-untyped-def]
    with session_scope(app.state.session_factory) as s:
        house = s.get(House, house_id)
        assert house is not None
        return house.version


def _someone_else_saves(client: TestClient, house: str, old: str) -> None:
    r = client.post(f"{house}/settings/climate", data={"hdd": "5000", "version": old},
                    follow_redirects=False)  # fmt: skip
    assert r.status_code == 303


def test_a_stale_weather_upload_is_refused_before_the_file_is_read(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    house, house_id = _house(client)
    old = _version(client, house)
    _someone_else_saves(client, house, old)
    saved = _stored_version(app, house_id)
    # not a weather file either: the stale version is the answer (409, not the file's 422)
    r = client.post(f"{house}/weather", data={"version": old},
                    files={"file": ("notes.txt", b"just some notes\n")})  # fmt: skip
    assert r.status_code == 409
    assert ("so the weather file was not used. Reload to see their change, then load the file "
            "again.") in r.text  # fmt: skip
    assert "The weather file was not used." not in r.text  # the file's own message is not shown
    assert _stored_version(app, house_id) == saved


def test_stale_removal_of_bills(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    house = bills_house(client)
    assert post_bills(client, house, typed_bills(synthetic_bills())).status_code == 303
    old = _version(client, house)
    _someone_else_saves(client, house, old)
    house_id = int(house.rsplit("/", 1)[1])
    saved = _stored_version(app, house_id)
    r = client.post(f"{house}/bills/remove", data={"version": old})
    assert r.status_code == 409
    assert "so the bills were not removed. Reload to see their change." in r.text
    assert _stored_version(app, house_id) == saved
    assert client.get(f"/api/v1/houses/{house_id}/document").json()["bills"] is not None


def test_stale_deletion_of_a_space(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    house, house_id = _house(client)
    client.post(f"{house}/surfaces", data={"typical": WALL, "area": "100"})
    r = client.post(f"{house}/spaces", data={**CRAWL, "version": _version(client, house)},
                    follow_redirects=False)  # fmt: skip
    assert r.status_code == 303
    space = re.search(r'action="[^"]*/spaces/([^"/]+)/delete"', client.get(house).text)
    assert space
    old = _version(client, house)
    _someone_else_saves(client, house, old)
    saved = _stored_version(app, house_id)
    r = client.post(f"{house}/spaces/{space.group(1)}/delete", data={"version": old})
    assert r.status_code == 409 and "so the space was not deleted." in r.text
    assert "Vented crawlspace" in r.text
    assert _stored_version(app, house_id) == saved


def test_stale_upgrade_delete_and_price_book_fill(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    house, house_id = _house(client)
    wall = client.post(f"{house}/surfaces", data={"typical": WALL, "area": "100"},
                       follow_redirects=False).headers["location"]  # fmt: skip
    r = client.post(f"{house}/upgrades", data={"surface_id": wall.rsplit("/", 1)[1],
                    "name": "Dense-pack", "start": "as_found"}, follow_redirects=False)  # fmt: skip
    assert r.status_code == 303
    upgrade = r.headers["location"]
    client.post("/price-book", data={"name": "Wall: dense-pack", "upgrade_type": "wall_fill",
                                     "basis": "per_area", "units": "ip", "unit_cost": "3.00",
                                     "fixed_cost": "0", "notes": ""})  # fmt: skip
    old = _version(client, house)
    _someone_else_saves(client, house, old)
    saved = _stored_version(app, house_id)
    r = client.post(upgrade, data={"action": "delete", "version": old})
    assert r.status_code == 409 and STALE in r.text
    r = client.post(f"{upgrade}/price-item", data={"price_item": "wall-dense-pack",
                                                   "version": old})  # fmt: skip
    assert r.status_code == 409
    assert f"Cost not filled for &#39;Dense-pack&#39;: {STALE}" in r.text
    assert _stored_version(app, house_id) == saved
