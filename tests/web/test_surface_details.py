"""The Surface page's details form (no JavaScript): ground inputs, what lies behind, windows, doors.

Each save goes through the page as a plain POST; the test then reads the house back as calc/house
does (GET /api/v1/houses/{id}/document -> POST /api/v1/calc/house) and compares with
POST /api/v1/calc/ground for the same input, and with a hand-worked ISO 13370 case.

Hand-worked slab (ISO 13370:2017, slab-on-ground clause; R_si 0.17, R_se 0.04 m²·K/W; sand or
gravel λ = 2.0 W/(m·K), the standard's table of ground properties, from memory):
A = 100 m², P = 40 m, w = 0.3 m, R_f = 1.0 m²·K/W (the default "as found" layer of a new
surface, films excluded).
  B'  = A / (0.5 P) = 100 / 20 = 5 m
  d_t = w + λ (R_si + R_f + R_se) = 0.3 + 2.0 × (0.17 + 1.0 + 0.04) = 2.72 m  (< B')
  U   = 2λ / (π B' + d_t) · ln(π B' / d_t + 1)
      = 4 / (15.70796 + 2.72) · ln(5.77499 + 1) = 0.217062 × 1.913237 = 0.41529 W/(m²·K)
"""

from __future__ import annotations

import math
import re
from typing import Any

from fastapi.testclient import TestClient

from server.db import session_scope
from server.models import House, Surface

#: the hand-worked slab U above [W/(m²·K)]
SLAB_U_HAND = 2 * 2.0 / (math.pi * 5 + 2.72) * math.log(math.pi * 5 / 2.72 + 1)


def _house(client: TestClient, units: str = "si") -> tuple[str, int]:
    r = client.post("/houses", data={"label": "Details", "units": units}, follow_redirects=False)
    assert r.status_code == 303
    url = r.headers["location"]
    return url, int(url.rsplit("/", 1)[1])


def _surface(client: TestClient, house: str, kind: str, area: str) -> str:
    r = client.post(f"{house}/surfaces", data={"kind": kind, "area": area}, follow_redirects=False)
    assert r.status_code == 303, r.text[:400]
    return str(r.headers["location"])


def _version(html: str) -> str:
    match = re.search(r'name="version" value="(\d+)"', html)
    assert match
    return match.group(1)


def _save(client: TestClient, surface: str, **fields: str) -> Any:
    page = client.get(surface).text
    name = re.search(r'id="s-name" name="name" value="([^"]*)"', page)
    kind = re.search(
        r'<select id="s-kind" name="kind".*?<option value="(\w+)" selected', page, re.S
    )
    area = re.search(r'id="s-area" name="area" inputmode="decimal" value="([^"]*)"', page)
    assert name and kind and area
    data = {"version": _version(page), "name": name.group(1), "kind": kind.group(1),
            "area": area.group(1), **fields}  # fmt: skip
    return client.post(surface, data=data, follow_redirects=False)


def _figures(client: TestClient, house_id: int) -> dict[str, dict[str, Any]]:
    doc = client.get(f"/api/v1/houses/{house_id}/document")
    assert doc.status_code == 200, doc.text[:400]
    r = client.post("/api/v1/calc/house", json=doc.json())
    assert r.status_code == 200, r.text[:400]
    return {s["name"]: s for s in r.json()["as_found"]["surfaces"]}


def _details(app: Any, house_id: int) -> dict[str, dict[str, Any]]:
    with session_scope(app.state.session_factory) as s:
        house = s.get(House, house_id)
        assert house is not None
        return {x.name: dict(x.details or {}) for x in house.surfaces}


def test_slab_ground_inputs_si_match_calc_ground_and_the_hand_worked_case(
    app, client: TestClient
) -> None:  # type: ignore[no-untyped-def]
    house, house_id = _house(client, "si")
    slab = _surface(client, house, "slab", "100")
    page = client.get(slab).text
    assert "Against the ground (ISO 13370)" in page and "What lies behind it" not in page
    assert "Sand or gravel: λ 2 W/(m·K)" in page and "Clay or silt: λ 1.5 W/(m·K)" in page
    assert "Homogeneous rock: λ 3.5 W/(m·K)" in page
    r = _save(client, slab, g_exposed_perimeter="40", g_wall_thickness="300", g_soil="sand_gravel")
    assert r.status_code == 303, r.text[:600]
    assert _details(app, house_id)["Slab on ground"]["ground"] == {
        "exposed_perimeter": 40.0, "wall_thickness": 300.0, "soil": "sand_gravel"}  # fmt: skip
    api = client.post("/api/v1/calc/ground", json={
        "units": "si", "type": "slab", "floor_area": 100, "exposed_perimeter": 40,
        "wall_thickness": 300, "soil": "sand_gravel", "floor_r": 1.0}).json()  # fmt: skip
    assert math.isclose(api["u_floor"], SLAB_U_HAND, rel_tol=1e-9)
    assert math.isclose(api["characteristic_dimension"], 5.0)
    assert math.isclose(api["floor_equivalent_thickness"], 2.72)
    figures = _figures(client, house_id)["Slab on ground"]
    assert math.isclose(figures["u"], api["u_floor"], rel_tol=1e-9)
    assert math.isclose(figures["ua"], 100 * SLAB_U_HAND, rel_tol=1e-9)
    page = client.get(slab).text
    assert "ground U 0.42 W/(m²·K)" in page  # 0.41529 at the page's two decimals
    table = client.get(house).text
    row = re.search(r"Slab on ground</a>.*?</tr>", table, re.S)
    # the "Behind it" cell names the ground and carries its ISO 13370 U beneath
    assert row and ">Ground<span" in row.group(0) and ">U 0.42 (ISO 13370)<" in row.group(0)
    assert "41.5" in row.group(0)  # UA = 100 × 0.41529 W/K


def test_slab_ip_agrees_with_si(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    """The same slab typed in US units: 1000 ft², P 130 ft, 8 in walls, clay (λ 1.5 W/(m·K)),
    R-1 layer; calc/ground in SI with the inputs converted (pint-free exact factors: 1 ft =
    0.3048 m, 1 in = 25.4 mm, R-1 = 0.176110 m²·K/W, U 1 Btu/(h·ft²·°F) = 5.678263 W/(m²·K),
    NIST SP 811) gives the same U."""
    house, house_id = _house(client, "ip")
    slab = _surface(client, house, "slab", "1000")
    r = _save(client, slab, g_exposed_perimeter="130", g_wall_thickness='8"', g_soil="clay_silt")
    assert r.status_code == 303, r.text[:600]
    u_ip = _figures(client, house_id)["Slab on ground"]["u"]
    si = client.post("/api/v1/calc/ground", json={
        "units": "si", "type": "slab", "floor_area": 1000 * 0.3048**2,
        "exposed_perimeter": 130 * 0.3048, "wall_thickness": 8 * 25.4, "soil": "clay_silt",
        "floor_r": 0.17611}).json()  # fmt: skip
    assert math.isclose(u_ip * 5.678263, si["u_floor"], rel_tol=2e-5)
    ip = client.post("/api/v1/calc/ground", json={
        "units": "ip", "type": "slab", "floor_area": 1000, "exposed_perimeter": 130,
        "wall_thickness": 8, "soil": "clay_silt", "floor_r": 1.0}).json()  # fmt: skip
    assert math.isclose(u_ip, ip["u_floor"], rel_tol=1e-9)
    page = client.get(slab).text
    assert "Btu·in/(h·ft²·°F)" in page and f"ground U {u_ip:.3f} Btu/(h·ft²·°F)" in page


def test_basement_wall_and_floor_match_calc_ground(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    house, house_id = _house(client, "si")
    wall = _surface(client, house, "basement_wall", "80")  # 2 m × 40 m: all below grade
    floor = _surface(client, house, "basement_floor", "100")
    page = client.get(wall).text
    assert 'id="above-grade"' in page and "whole area, below and above ground" in page
    r = _save(client, wall, g_exposed_perimeter="40", g_depth="2", g_wall_thickness="300",
              g_floor_r="0.5", g_soil="clay_silt")  # fmt: skip
    assert r.status_code == 303, r.text[:600]
    r = _save(client, floor, g_exposed_perimeter="40", g_depth="2", g_wall_thickness="300",
              g_soil="clay_silt")  # fmt: skip
    assert r.status_code == 303, r.text[:600]
    api = client.post("/api/v1/calc/ground", json={
        "units": "si", "type": "heated_basement", "floor_area": 100, "exposed_perimeter": 40,
        "wall_thickness": 300, "soil": "clay_silt", "depth": 2, "wall_r": 1.0,
        "floor_r": 0.5}).json()  # fmt: skip
    figures = _figures(client, house_id)
    assert math.isclose(figures["Basement wall"]["u"], api["u_wall"], rel_tol=1e-9)
    floor_api = client.post("/api/v1/calc/ground", json={
        "units": "si", "type": "heated_basement", "floor_area": 100, "exposed_perimeter": 40,
        "wall_thickness": 300, "soil": "clay_silt", "depth": 2, "wall_r": 1.0,
        "floor_r": 1.0}).json()  # fmt: skip
    assert math.isclose(figures["Basement floor"]["u"], floor_api["u_floor"], rel_tol=1e-9)
    assert "(80 m² below grade)" in client.get(wall).text


def test_window_and_door_details_are_what_calc_house_reads(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    house, house_id = _house(client, "ip")
    window = _surface(client, house, "window", "15")
    door = _surface(client, house, "door", "20")
    page = client.get(window).text
    assert "SHGC" in page and "Azimuth (°)" in page and "Tilt (°)" in page
    r = _save(client, window, u="0.30", w_shgc="0.40", w_orientation="S", adjacent="outdoors")
    assert r.status_code == 303, r.text[:600]
    r = _save(client, door, u="0.5")
    assert r.status_code == 303, r.text[:600]
    stored = _details(app, house_id)
    assert stored["Window"] == {"window": {"shgc": 0.4, "orientation": "S"}}
    figures = _figures(client, house_id)
    assert math.isclose(figures["Window"]["u"], 0.30, rel_tol=1e-12)
    assert figures["Window"]["shgc"] == 0.4
    assert math.isclose(figures["Door"]["u"], 0.5, rel_tol=1e-12)
    assert math.isclose(figures["Door"]["ua"], 10.0, rel_tol=1e-12)  # 0.5 × 20 ft²
    # an azimuth and a tilt instead of a compass point (a skylight facing SSW at 30°)
    r = _save(client, window, u="0.30", w_shgc="0.40", w_orientation="azimuth",
              w_azimuth="200", w_tilt="30")  # fmt: skip
    assert r.status_code == 303, r.text[:600]
    assert _details(app, house_id)["Window"]["window"] == {
        "shgc": 0.4,
        "azimuth": 200.0,
        "tilt": 30.0,
    }
    doc = client.get(f"/api/v1/houses/{house_id}/document").json()
    win = next(s for s in doc["surfaces"] if s["name"] == "Window")
    assert (win["azimuth"], win["tilt"], win["shgc"]) == (200.0, 30.0, 0.4)


def test_surface_facing_a_space_gets_its_b(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    house, house_id = _house(client, "ip")
    floor = _surface(client, house, "floor", "500")
    with session_scope(app.state.session_factory) as s:
        row = s.get(House, house_id)
        assert row is not None
        row.spaces = [{"id": "crawl", "label": "Crawlspace", "b": 0.6}]
    page = client.get(floor).text
    assert '<option value="crawl"' in page and "Crawlspace (unheated space)" in page
    r = _save(client, floor, adjacent="crawl")
    assert r.status_code == 303, r.text[:600]
    assert _details(app, house_id)["Floor over unheated space"] == {"adjacent": "crawl"}
    figures = _figures(client, house_id)["Floor over unheated space"]
    assert figures["adjacent"] == "crawl" and figures["b"] == 0.6
    assert math.isclose(figures["ua"], 0.6 * figures["u"] * 500, rel_tol=1e-9)
    table = client.get(house).text
    row = re.search(r"Floor over unheated space</a>.*?</tr>", table, re.S)
    # the "Behind it" cell names the space and carries its b beneath
    assert row and ">Crawlspace<span" in row.group(0) and ">b 0.60<" in row.group(0)
    assert "b 0.60 (behind it: Crawlspace)" in client.get(floor).text


def test_bad_input_is_422_with_the_text_kept(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    house, house_id = _house(client, "si")
    slab = _surface(client, house, "slab", "100")
    r = _save(client, slab, g_exposed_perimeter="forty", g_wall_thickness="300")
    assert r.status_code == 422
    assert 'value="forty"' in r.text and 'value="300"' in r.text
    assert 'aria-invalid="true" aria-describedby="d-g_exposed_perimeter-err"' in r.text
    assert 'id="d-g_exposed_perimeter-err">&#39;forty&#39; is not a number' in r.text
    r = _save(client, slab, g_exposed_perimeter="40")  # wall thickness missing
    assert r.status_code == 422 and 'id="d-g_wall_thickness-err">required' in r.text
    window = _surface(client, house, "window", "2")
    r = _save(client, window, u="1,4", w_shgc="1,5")  # a decimal comma in a metric house
    assert r.status_code == 422 and 'value="1,5"' in r.text
    assert 'id="d-w_shgc-err">must be at most 1' in r.text
    assert "ground" not in _details(app, house_id)["Slab on ground"]
    assert _details(app, house_id)["Window"] == {}


def test_stale_version_is_409_with_the_text_kept(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    house, house_id = _house(client, "ip")
    slab = _surface(client, house, "slab", "1000")
    old = _version(client.get(slab).text)
    assert _save(client, slab, g_exposed_perimeter="130", g_wall_thickness="8").status_code == 303
    r = client.post(slab, data={"version": old, "name": "Slab", "kind": "slab", "area": "1000",
                                "g_exposed_perimeter": "99", "g_wall_thickness": "10"})  # fmt: skip
    assert r.status_code == 409
    assert "Someone else saved this house" in r.text and 'value="99"' in r.text
    assert _details(app, house_id)["Slab on ground"]["ground"]["exposed_perimeter"] == 130.0


def test_kind_change_drops_details_the_new_kind_cannot_take(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    house, house_id = _house(client, "ip")
    slab = _surface(client, house, "slab", "1000")
    assert _save(client, slab, g_exposed_perimeter="130", g_wall_thickness="8").status_code == 303
    assert _save(client, slab, kind="wall").status_code == 303
    with session_scope(app.state.session_factory) as s:
        row = s.query(Surface).filter_by(house_id=house_id).one()
        assert row.kind == "wall" and "ground" not in (row.details or {})
    assert _figures(client, house_id)  # the house still computes
