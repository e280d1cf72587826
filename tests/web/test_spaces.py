"""The House page's buffer spaces (ISO 13789) through the page, checked against calc/house.

Hand-worked case (ISO 13789:2017 clause 6.4 [b = H_ue / (H_iu + H_ue)], air's heat capacity
0.018 Btu/(ft³·°F), ASHRAE Handbook—Fundamentals ch. 16; the exposed parts are the example of
../shared/API.md):

    H_ue = Σ A·U + 0.018 · n · V
         = 300 ft² × 0.5 + 900 ft² × 0.12 + 0.018 × 1.0 /h × 4000 ft³
         = 150 + 108 + 72 = 330 Btu/(h·°F)
    H_iu = 900 ft² × U_floor (the floor's U as calc/house computes it, still air below)
    b    = 330 / (H_iu + 330)
    θ_u  = θ_i − b (θ_i − θ_e) at 70 °F inside and 32 °F outside (the page's freezing day)
"""

from __future__ import annotations

import re
from typing import Any

import pytest
from fastapi import FastAPI
from fastapi.testclient import TestClient

from server.db import session_scope
from server.models import Surface

CRAWL = {
    "kind": "crawlspace",
    "label": "Vented crawlspace",
    "method": "parts",
    "part_name_0": "Block walls",
    "part_area_0": "300",
    "part_u_0": "0.5",
    "part_name_1": "Earth floor",
    "part_area_1": "900",
    "part_u_1": "0.12",
    "part_name_2": "",
    "part_area_2": "",
    "part_u_2": "",
    "volume": "4,000",
    "air_changes": "",
    "air_preset": "iso-1",  # ISO 13789 "well sealed, small vent openings": 1 per hour
}


def _house(client: TestClient, units: str = "ip") -> tuple[str, int]:
    r = client.post(
        "/houses", data={"label": "Crawl house", "units": units}, follow_redirects=False
    )
    url = r.headers["location"]
    area = "900" if units == "ip" else "83,6"
    client.post(f"{url}/surfaces", data={"typical": "floor-2x10-16-empty", "area": area})
    return url, int(url.rsplit("/", 1)[1])


def _version(page: str) -> str:
    found = re.search(r'name="version" value="(\d+)"', page)
    assert found
    return found.group(1)


def _face(app: FastAPI, house_id: int, space_id: str) -> None:
    """What the Surface page's picker stores: the floor faces the space."""
    with session_scope(app.state.session_factory) as session:
        for row in session.query(Surface).filter(Surface.house_id == house_id):
            row.details = {**(row.details or {}), "adjacent": space_id}


def _document(client: TestClient, house_id: int) -> dict[str, Any]:
    doc: dict[str, Any] = client.get(f"/api/v1/houses/{house_id}/document").json()
    for space in doc.get("spaces") or []:  # the export spells out the fields not given
        for key in [k for k, v in space.items() if v is None]:
            del space[key]
    return doc


def _add(client: TestClient, url: str, form: dict[str, str]) -> Any:
    page = client.get(url).text
    return client.post(
        f"{url}/spaces", data={**form, "version": _version(page)}, follow_redirects=False
    )


def test_crawlspace_through_the_page_is_what_calc_house_reads(
    client: TestClient, app: FastAPI
) -> None:
    url, house_id = _house(client)
    r = _add(client, url, CRAWL)
    assert r.status_code == 303 and r.headers["location"].endswith("#spaces")
    doc = _document(client, house_id)
    assert doc["spaces"] == [
        {
            "id": "vented-crawlspace",
            "label": "Vented crawlspace",
            "kind": "crawlspace",
            "exposed": [
                {"name": "Block walls", "area": 300.0, "u": 0.5},
                {"name": "Earth floor", "area": 900.0, "u": 0.12},
            ],
            "volume": 4000.0,
            "air_changes": 1.0,
        }
    ]
    _face(app, house_id, "vented-crawlspace")
    doc = _document(client, house_id)
    result = client.post("/api/v1/calc/house", json=doc).json()
    floor = result["as_found"]["surfaces"][0]
    space = result["as_found"]["spaces"][0]
    h_iu = 900 * floor["u"]
    h_ue = 300 * 0.5 + 900 * 0.12 + 0.018 * 1.0 * 4000  # 330 Btu/(h·°F), by hand
    b = h_ue / (h_iu + h_ue)
    assert space["h_ue"] == pytest.approx(330.0, rel=1e-4)
    assert space["h_iu"] == pytest.approx(h_iu, rel=1e-6)
    assert space["b"] == pytest.approx(b, rel=1e-4)
    assert floor["adjacent"] == "vented-crawlspace" and floor["b"] == pytest.approx(b, rel=1e-4)

    page = client.get(url).text
    card = page[page.index('id="spaces"') :]
    assert f"<strong>{b:.2f}</strong>" in card
    theta = 70 - b * (70 - 32)  # °F on the freezing day
    assert f"{theta:.0f} °F" in card and "on a freezing day (70 °F inside, 32 °F outside)" in card
    assert f"{h_ue:,.1f} Btu/(h·°F)" in card
    assert f'href="/houses/{house_id}/surfaces/' in card  # the floor, linked


def test_typical_part_takes_the_assembly_calculators_u(client: TestClient) -> None:
    url, house_id = _house(client)
    form = {**CRAWL, "part_typical_1": "rim-2x10-empty", "part_u_1": "", "part_name_1": ""}
    assert _add(client, url, form).status_code == 303
    stored = _document(client, house_id)["spaces"][0]["exposed"][1]
    rim = client.post(
        "/api/v1/calc/assembly", json={"units": "ip", **_typical_document("rim-2x10-empty")}
    ).json()
    assert stored["name"] == "Rim joist, 2x10, uninsulated"
    assert stored["u"] == pytest.approx(rim["u_factor"], rel=1e-9)


def _typical_document(slug: str) -> dict[str, Any]:
    from server.services.typical import typical_assemblies

    return typical_assemblies()[slug].assembly("ip").model_dump(exclude_none=True)


def test_typed_b_is_used_as_is(client: TestClient, app: FastAPI) -> None:
    url, house_id = _house(client)
    r = _add(client, url, {"kind": "garage", "label": "Garage", "method": "b", "b": "0.6"})
    assert r.status_code == 303
    assert _document(client, house_id)["spaces"] == [
        {"id": "garage", "label": "Garage", "kind": "garage", "b": 0.6}
    ]
    _face(app, house_id, "garage")
    result = client.post("/api/v1/calc/house", json=_document(client, house_id)).json()
    space = result["as_found"]["spaces"][0]
    assert space["b"] == 0.6 and space["b_given"] and space["h_ue"] is None
    assert space["ua"] == pytest.approx(0.6 * space["h_iu"], rel=1e-9)
    card = client.get(url).text
    assert "b, as found (typed)" in card and "<strong>0.60</strong>" in card
    theta = 70 - 0.6 * (70 - 32)  # 47.2 °F
    assert f"{theta:.0f} °F" in card


def test_deleting_a_faced_space_is_refused_then_released(client: TestClient, app: FastAPI) -> None:
    url, house_id = _house(client)
    _add(client, url, CRAWL)
    _face(app, house_id, "vented-crawlspace")
    version = _version(client.get(url).text)
    r = client.post(f"{url}/spaces/vented-crawlspace/delete", data={"version": version})
    assert r.status_code == 422
    assert (
        "Not deleted: it is still behind or around: Floor over crawlspace, 2x10 joists, uninsulated"
        in r.text
    )
    assert _document(client, house_id)["spaces"][0]["id"] == "vented-crawlspace"
    r = client.post(
        f"{url}/spaces/vented-crawlspace/delete",
        data={"version": version, "release": "1"},
        follow_redirects=False,
    )
    assert r.status_code == 303
    doc = _document(client, house_id)
    assert "spaces" not in doc or not doc["spaces"]
    assert doc["surfaces"][0]["adjacent"] == "outdoors"
    assert client.post("/api/v1/calc/house", json=doc).status_code == 200


def test_bad_input_is_422_with_the_typed_text_kept(client: TestClient) -> None:
    url, house_id = _house(client)
    form = {**CRAWL, "volume": "four thousand", "part_area_1": "9OO", "air_preset": ""}
    r = _add(client, url, form)
    assert r.status_code == 422
    assert 'value="four thousand"' in r.text and 'value="9OO"' in r.text
    assert 'id="sp-new-volume" name="volume"' in r.text
    assert 'aria-invalid="true" aria-describedby="sp-new-volume-err"' in r.text
    assert 'id="sp-new-volume-err">&#39;four thousand&#39; is not a number' in r.text
    assert "type the air changes per hour, or pick how airtight it is" in r.text
    assert not _document(client, house_id).get("spaces")
    # htmx gets the card alone, messages inside, with 200 so it swaps
    version = _version(client.get(url).text)
    r = client.post(f"{url}/spaces", data={**form, "version": version},
                    headers={"HX-Request": "true"})  # fmt: skip
    assert r.status_code == 200 and r.text.lstrip().startswith('<section id="spaces"')
    assert 'value="four thousand"' in r.text


def test_stale_version_is_409_and_keeps_the_text(client: TestClient) -> None:
    url, house_id = _house(client)
    stale = _version(client.get(url).text)
    assert _add(client, url, CRAWL).status_code == 303  # someone else saves first
    r = client.post(f"{url}/spaces", data={**CRAWL, "label": "Second crawl", "version": stale})
    assert r.status_code == 409
    assert "Someone else saved this house" in r.text and 'value="Second crawl"' in r.text
    assert len(_document(client, house_id)["spaces"]) == 1
    r = client.post(
        f"{url}/spaces/vented-crawlspace", data={**CRAWL, "volume": "5000", "version": stale}
    )
    assert r.status_code == 409 and 'value="5000"' in r.text
    assert _document(client, house_id)["spaces"][0]["volume"] == 4000.0


def test_edit_switches_to_typed_b_and_back(client: TestClient) -> None:
    url, house_id = _house(client)
    _add(client, url, CRAWL)
    version = _version(client.get(url).text)
    r = client.post(f"{url}/spaces/vented-crawlspace",
                    data={**CRAWL, "method": "b", "b": "0.45", "version": version},
                    follow_redirects=False)  # fmt: skip
    assert r.status_code == 303
    assert _document(client, house_id)["spaces"][0] == {
        "id": "vented-crawlspace", "label": "Vented crawlspace", "kind": "crawlspace", "b": 0.45,
    }  # fmt: skip


def test_metric_house_hand_worked(client: TestClient, app: FastAPI) -> None:
    """SI: H_ue = 30 m² × 2.0 + 1207 J/(m³·K) × 1.0 /h × 100 m³ / 3600 s = 60 + 33.53 W/K
    (1207 = 0.018 Btu/(ft³·°F) in SI); decimal commas as a metric house reads them."""
    url, house_id = _house(client, "si")
    form = {"kind": "crawlspace", "label": "Crawl", "method": "parts", "part_name_0": "Walls",
            "part_area_0": "30", "part_u_0": "2,0", "volume": "100", "air_changes": "1,0"}  # fmt: skip
    assert _add(client, url, form).status_code == 303
    _face(app, house_id, "crawl")
    result = client.post("/api/v1/calc/house", json=_document(client, house_id)).json()
    space = result["as_found"]["spaces"][0]
    h_ue = 30 * 2.0 + 0.018 * 1055.056 / (0.3048**3 * 5 / 9) * 1.0 * 100 / 3600
    assert h_ue == pytest.approx(93.53, abs=0.01)
    assert space["h_ue"] == pytest.approx(h_ue, rel=1e-6)
    b = h_ue / (space["h_iu"] + h_ue)
    card = client.get(url).text
    assert f"<strong>{b:.2f}</strong>" in card and "W/K" in card
    theta = 21 - b * (21 - 0)  # °C, 21 °C inside, 0 °C outside
    assert f"{theta:.0f} °C" in card and "m³" in card


def test_switching_units_converts_the_space(client: TestClient, app: FastAPI) -> None:
    url, house_id = _house(client)
    _add(client, url, CRAWL)
    _face(app, house_id, "vented-crawlspace")
    before = client.post("/api/v1/calc/house", json=_document(client, house_id)).json()
    version = _version(client.get(url).text)
    client.post(f"{url}/units", data={"units": "si", "version": version})
    doc = _document(client, house_id)
    space = doc["spaces"][0]
    assert space["volume"] == pytest.approx(4000 * 0.3048**3, rel=1e-9)  # 113.27 m³
    assert space["exposed"][0]["area"] == pytest.approx(300 * 0.3048**2, rel=1e-9)
    assert space["exposed"][0]["u"] == pytest.approx(0.5 * 5.678263, rel=1e-6)  # Btu→W/(m²·K)
    after = client.post("/api/v1/calc/house", json=doc).json()
    assert after["as_found"]["spaces"][0]["b"] == pytest.approx(
        before["as_found"]["spaces"][0]["b"], rel=1e-6
    )
