"""Buffer spaces (ISO 13789) in POST /api/v1/calc/house, still-air films, export and import.

The worked house (IP), by hand:
  attic floor 1000 ft² at U 0.2 facing a vented attic; walls 1400 ft² at U 0.08 outdoors;
  HDD 5400 °F·day; gas at 80 %, $1.45/therm; the attic floor is upgraded to U 0.025.
  The attic: roof 1200 ft² at U 0.1 and 5000 ft³ of air at 2 changes per hour;
    H_ue = 1200 × 0.1 + 0.018 × 2 × 5000 = 120 + 180 = 300 Btu/(h·°F).
  As found: H_iu = 1000 × 0.2 = 200;  b = 300 / 500 = 0.6;  UA_attic = 0.6 × 200 = 120;
            UA = 120 + 1400 × 0.08 = 120 + 112 = 232 Btu/(h·°F).
  Upgraded: H_iu = 1000 × 0.025 = 25;  b = 300 / 325 = 12/13 = 0.923077;
            UA_attic = 25 × 12/13 = 23.0769;  UA = 135.0769 Btu/(h·°F).
  ΔUA = 96.9231 -> savings = 96.9231 × 5400 × 24 / (0.80 × 100,000) × 1.45 = $227.6723/yr
  (as if the attic floor faced outdoor air: ΔUA = 175 -> $411.0750; keeping b = 0.6: ΔUA = 105).
"""

from __future__ import annotations

import copy
from typing import Any

import pint
import pytest
from fastapi.testclient import TestClient

from server.app import create_app
from server.config import Settings
from tests.utils.examples import API_WALL_IP

stateless = TestClient(create_app(Settings(environment="test", database_url="sqlite://")))
URL = "/api/v1/calc/house"
Q = pint.UnitRegistry().Quantity
FT2_M2 = Q(1, "ft**2").to("m**2").magnitude
FT3_M3 = Q(1, "ft**3").to("m**3").magnitude
U_IP_SI = Q(1, "Btu_it/(hr*ft**2*delta_degF)").to("W/(m**2*K)").magnitude  # 5.678263
UA_IP_W_K = Q(1, "Btu_it/hr/delta_degF").to("W/K").magnitude  # 0.527528
SAVINGS = 96.923077 * 5400 * 24 / 80_000 * 1.45  # $227.6723, see the module docstring

ATTIC_SPACE: dict[str, Any] = {
    "id": "attic",
    "label": "vented attic",
    "exposed": [{"name": "roof", "area": 1200, "u": 0.1}],
    "volume": 5000,
    "air_changes": 2.0,
}
DOC_IP: dict[str, Any] = {
    "units": "ip",
    "climate": {"hdd": 5400},
    "heating": {"fuel": "natural_gas", "efficiency": 0.80, "price": 1.45},
    "spaces": [ATTIC_SPACE],
    "surfaces": [
        {"id": "attic-floor", "kind": "ceiling", "area": 1000, "u": 0.2, "adjacent": "attic"},
        {"id": "walls", "kind": "wall", "area": 1400, "u": 0.08},
    ],
    "upgrades": [{"id": "attic-r40", "surface": "attic-floor", "u": 0.025}],
    "packages": [{"id": "attic", "upgrades": ["attic-r40"]}],
}


def post(doc: dict, client: TestClient = stateless) -> dict:
    response = client.post(
        URL, json={**doc, "detail": {"upgrades_alone": "full"}}
    )  # upgrades alone in full
    assert response.status_code == 200, response.text
    return response.json()


def refused(doc: dict, url: str = URL) -> list[str]:
    response = stateless.post(url, json=doc)
    assert response.status_code == 422, response.text
    return [e["field"] for e in response.json()["errors"]]


def si_twin(doc: dict) -> dict:
    """The same house in si (pint factors): m², W/(m²·K), m³, K·day."""
    out = copy.deepcopy(doc)
    out["units"] = "si"
    out["climate"] = {"hdd": 5400 / 1.8}
    for surface in out["surfaces"]:
        surface["area"] *= FT2_M2
        surface["u"] *= U_IP_SI
    for upgrade in out["upgrades"]:
        upgrade["u"] *= U_IP_SI
    for space in out["spaces"]:
        for part in space.get("exposed", []):
            part["area"] *= FT2_M2
            part["u"] *= U_IP_SI
        if "volume" in space:
            space["volume"] *= FT3_M3
    return out


def test_worked_house_b_per_variant() -> None:
    result = post(DOC_IP)
    found = result["as_found"]
    (attic,) = found["spaces"]
    assert attic["b"] == pytest.approx(0.6, rel=1e-12)
    assert (attic["h_iu"], attic["h_ue"], attic["ua"]) == pytest.approx((200, 300, 120), rel=1e-12)
    assert attic["b_given"] is False and attic["surfaces"] == ["attic-floor"]
    assert attic["label"] == "vented attic"
    floor, walls = found["surfaces"]
    assert (floor["adjacent"], floor["b"], walls["adjacent"], walls["b"]) == (
        "attic",
        pytest.approx(0.6),
        "outdoors",
        1.0,
    )
    assert floor["u"] == pytest.approx(0.2) and floor["ua"] == pytest.approx(120.0)
    assert found["ua_by_surface"]["attic-floor"] == pytest.approx(120.0)
    assert found["ua"] == pytest.approx(232.0, rel=1e-12)
    assert floor["share_of_ua"] == pytest.approx(120 / 232, rel=1e-12)

    (package,) = result["packages"]
    (attic_after,) = package["spaces"]
    assert attic_after["b"] == pytest.approx(12 / 13, rel=1e-12)
    assert attic_after["h_iu"] == pytest.approx(25.0, rel=1e-12)
    assert attic_after["h_ue"] == pytest.approx(300.0, rel=1e-12)
    assert package["surfaces"][0]["ua"] == pytest.approx(25 * 12 / 13, rel=1e-12)
    assert package["ua"] == pytest.approx(135.076923, rel=1e-8)
    assert package["annual_savings"] == pytest.approx(SAVINGS, rel=1e-6)
    assert package["annual_savings"] == pytest.approx(227.6723, rel=1e-6)
    assert result["upgrades"][0]["spaces"][0]["b"] == pytest.approx(12 / 13, rel=1e-12)
    assert any("ISO 13789" in line for line in result["assumptions"])


def test_as_if_outdoors_saves_more() -> None:
    # the same house with nothing behind the attic floor but outdoor air: ΔUA 175 -> $411.0750
    doc = copy.deepcopy(DOC_IP)
    del doc["surfaces"][0]["adjacent"]
    result = post(doc)
    assert result["as_found"]["ua"] == pytest.approx(312.0, rel=1e-12)  # 200 + 112
    assert result["packages"][0]["annual_savings"] == pytest.approx(411.075, rel=1e-9)
    assert result["packages"][0]["annual_savings"] > post(DOC_IP)["packages"][0]["annual_savings"]


def test_si_and_ip_agree() -> None:
    ip, si = post(DOC_IP), post(si_twin(DOC_IP))
    for key in ("as_found",):
        a, b = ip[key]["spaces"][0], si[key]["spaces"][0]
        assert b["b"] == pytest.approx(a["b"], rel=1e-9)
        assert b["h_iu"] == pytest.approx(a["h_iu"] * UA_IP_W_K, rel=1e-9)
        assert b["h_ue"] == pytest.approx(a["h_ue"] * UA_IP_W_K, rel=1e-9)
        assert si[key]["ua"] == pytest.approx(ip[key]["ua"] * UA_IP_W_K, rel=1e-9)
    assert si["packages"][0]["spaces"][0]["b"] == pytest.approx(12 / 13, rel=1e-9)
    assert si["packages"][0]["annual_savings"] == pytest.approx(
        ip["packages"][0]["annual_savings"], rel=1e-9
    )


def test_b_given_directly_stays_put() -> None:
    # a garage given b = 0.5: wall 200 ft² at U 0.08 -> H_iu 16, UA 0.5 × 16 = 8; upgraded to
    # U 0.04 -> H_iu 8, UA 4 (a typed b is not recomputed: it has no H_ue to recompute from)
    doc = copy.deepcopy(DOC_IP)
    doc["spaces"].append({"id": "garage", "b": 0.5})
    doc["surfaces"].append(
        {"id": "garage-wall", "kind": "wall", "area": 200, "u": 0.08, "adjacent": "garage"}
    )
    doc["upgrades"].append({"id": "garage-wall-foam", "surface": "garage-wall", "u": 0.04})
    doc["packages"] = [{"id": "garage", "upgrades": ["garage-wall-foam"]}]
    result = post(doc)
    garage = result["as_found"]["spaces"][1]
    assert garage == {
        "id": "garage",
        "label": "",
        "b": 0.5,
        "b_given": True,
        "h_iu": pytest.approx(16.0),
        "h_ue": None,
        "ua": pytest.approx(8.0),
        "surfaces": ["garage-wall"],
    }
    after = result["packages"][0]["spaces"][1]
    assert (after["b"], after["h_iu"], after["ua"]) == (0.5, pytest.approx(8.0), pytest.approx(4.0))
    # savings: ΔUA 4 × 5400 × 24 / 80,000 × 1.45 = $9.396
    assert result["packages"][0]["annual_savings"] == pytest.approx(9.396, rel=1e-9)


def test_limiting_cases() -> None:
    # H_ue -> ∞ (a huge, poorly insulated enclosure): b -> 1, the UA of the outdoors case
    open_doc = copy.deepcopy(DOC_IP)
    open_doc["spaces"][0]["exposed"] = [{"area": 1e7, "u": 100}]
    result = post(open_doc)
    assert result["as_found"]["spaces"][0]["b"] == pytest.approx(1.0, abs=1e-6)
    assert result["as_found"]["ua"] == pytest.approx(312.0, rel=1e-6)
    # no exposed part, no air change: b = 0, the attic floor loses nothing
    closed = copy.deepcopy(DOC_IP)
    closed["spaces"][0].update(exposed=[], air_changes=0)
    found = post(closed)["as_found"]
    assert found["spaces"][0]["b"] == 0.0 and found["spaces"][0]["h_ue"] == 0.0
    assert found["surfaces"][0]["ua"] == 0.0
    assert found["ua"] == pytest.approx(112.0, rel=1e-12)


# --- films follow what lies behind the surface ----------------------------------------------

#: a homogeneous attic floor, so the films add in series (heat flow up):
#: outdoors 0.61 + 19.0 + 0.45 + 0.17 = 20.23; facing the attic 0.61 + 19.45 + 0.61 = 20.67
CEILING: dict[str, Any] = {
    "heat_flow": "up",
    "layers": [{"name": "batts", "r": 19.0}, {"name": "drywall", "r": 0.45}],
}
#: with more fill: 0.61 + 49.45 + 0.61 = 50.67 facing the attic
CEILING_R49: dict[str, Any] = {
    "heat_flow": "up",
    "layers": [{"name": "fill", "r": 49.0}, {"name": "drywall", "r": 0.45}],
}


def films_doc(assembly: dict) -> dict:
    doc = copy.deepcopy(DOC_IP)
    doc["surfaces"][0] = {
        "id": "attic-floor",
        "kind": "ceiling",
        "area": 1000,
        "assembly": assembly,
        "adjacent": "attic",
    }
    doc["upgrades"] = [{"id": "fill", "surface": "attic-floor", "assembly": CEILING_R49}]
    doc["packages"] = [{"id": "fill", "upgrades": ["fill"]}]
    return doc


def test_surface_facing_a_space_takes_still_air_films() -> None:
    result = post(films_doc(CEILING))
    assert result["as_found"]["surfaces"][0]["r"] == pytest.approx(20.67, rel=1e-12)
    # the upgrade's assembly faces the same attic: still air too
    assert result["packages"][0]["surfaces"][0]["r"] == pytest.approx(50.67, rel=1e-12)
    # b then follows from H_iu = 1000 / 20.67 = 48.3793: b = 300 / 348.3793 = 0.861130
    assert result["as_found"]["spaces"][0]["b"] == pytest.approx(300 / (300 + 1000 / 20.67))


def test_assembly_saying_wind_keeps_the_wind_film() -> None:
    result = post(films_doc({**CEILING, "outside_film": "wind"}))
    assert result["as_found"]["surfaces"][0]["r"] == pytest.approx(20.23, rel=1e-12)
    # and facing the outdoors nothing changes: the 15 mph film
    doc = films_doc(CEILING)
    doc["surfaces"][0]["adjacent"] = "outdoors"
    assert post(doc)["as_found"]["surfaces"][0]["r"] == pytest.approx(20.23, rel=1e-12)


def test_calc_assembly_outside_film() -> None:
    wind = stateless.post("/api/v1/calc/assembly", json=API_WALL_IP).json()
    still = stateless.post(
        "/api/v1/calc/assembly", json={**API_WALL_IP, "outside_film": "still_air"}
    ).json()
    assert wind["r_parallel_path"] == pytest.approx(11.85, abs=0.01)  # API.md's example
    assert (wind["films"], wind["outside_film"]) == ({"inside": 0.68, "outside": 0.17}, "wind")
    assert still["films"] == {"inside": pytest.approx(0.68), "outside": pytest.approx(0.68)}
    assert still["outside_film"] == "still_air"
    # in series (isothermal planes) the film change adds exactly 0.68 - 0.17 = 0.51
    assert still["r_isothermal_planes"] - wind["r_isothermal_planes"] == pytest.approx(0.51)
    # ISO 6946, si, heat flow down over a crawlspace: Rsi 0.17 + 3.0 + Rse = Rsi 0.17 = 3.34
    iso = {"units": "si", "heat_flow": "down", "films": "iso6946", "layers": [{"r": 3.0}]}
    assert stateless.post("/api/v1/calc/assembly", json=iso).json()["r_total"] == pytest.approx(
        3.21
    )
    body = stateless.post("/api/v1/calc/assembly", json={**iso, "outside_film": "still_air"}).json()
    assert body["r_total"] == pytest.approx(3.34) and body["films"]["outside"] == pytest.approx(
        0.17
    )


def test_outside_film_is_in_the_openapi_schema() -> None:
    schema = stateless.get("/openapi.json").json()["components"]["schemas"]
    field = schema["AssemblyRequest"]["properties"]["outside_film"]
    assert "still_air" in str(field) and "adjacent" in field["description"]


# --- 422s name the field --------------------------------------------------------------------


def variant(**changes: object) -> dict:
    doc = copy.deepcopy(DOC_IP)
    for path, value in changes.items():
        *where, last = path.split("__")
        holder: object = doc
        for key in where:
            holder = holder[int(key)] if key.isdigit() else holder[key]  # type: ignore[index]
        holder[int(last) if last.isdigit() else last] = value  # type: ignore[index]
    return doc


@pytest.mark.parametrize(
    ("changes", "field"),
    [
        ({"surfaces__0__adjacent": "attik"}, "surfaces[0].adjacent"),
        ({"spaces__0__id": "outdoors", "surfaces__0__adjacent": "outdoors"}, "spaces[0].id"),
        ({"spaces__0__b": 0.5}, "spaces[0].b"),
        ({"spaces__0__b": 1.5, "spaces__0": {"id": "attic", "b": 1.5}}, "spaces[0].b"),
        ({"spaces__0": {"id": "attic", "exposed": []}}, "spaces[0].volume"),
        ({"spaces__0": {"id": "attic", "volume": 10}}, "spaces[0].air_changes"),
        ({"spaces__0__air_changes": -1}, "spaces[0].air_changes"),
        ({"spaces__0__volume": 0}, "spaces[0].volume"),
        ({"spaces__0__exposed": [{"area": 10, "u": 0}]}, "spaces[0].exposed[0].u"),
        ({"spaces__0__exposed": [{"area": 10}]}, "spaces[0].exposed[0].u"),
        ({"spaces": [ATTIC_SPACE, ATTIC_SPACE]}, "spaces[1].id"),
        ({"surfaces__1__adjacent": "no spaces here"}, "surfaces[1].adjacent"),
    ],
)
def test_bad_spaces_name_the_field(changes: dict, field: str) -> None:
    assert field in refused(variant(**changes))


def test_pipe_run_cannot_face_a_space() -> None:
    doc = copy.deepcopy(DOC_IP)
    doc["surfaces"].append(
        {
            "id": "hot-water",
            "kind": "pipe_run",
            "length": 30,
            "hours_per_year": 2000,
            "adjacent": "attic",
            "pipe": {
                "pipe_outer_diameter": 0.875,
                "fluid_temperature": 130,
                "ambient_temperature": 50,
            },
        }
    )
    assert refused(doc) == ["surfaces[2].adjacent"]


def test_bad_outside_film_names_the_field() -> None:
    assert refused({**API_WALL_IP, "outside_film": "breeze"}, "/api/v1/calc/assembly") == [
        "outside_film"
    ]


def test_unused_space_is_a_warning() -> None:
    doc = copy.deepcopy(DOC_IP)
    doc["spaces"].append({"id": "garage", "b": 0.5})
    assert any("'garage'" in w for w in post(doc)["warnings"])


# --- a saved house keeps its spaces (SQLite and PostgreSQL) ---------------------------------


def saved_doc() -> dict:
    doc = films_doc(CEILING)
    doc["surfaces"][1] = {
        "id": "walls",
        "kind": "wall",
        "area": 1400,
        "assembly": {k: v for k, v in API_WALL_IP.items() if k != "units"},
    }
    doc["spaces"].append({"id": "garage", "label": "garage", "b": 0.7})
    doc["surfaces"][1]["adjacent"] = "garage"
    return doc


def test_export_import_keeps_spaces(client: TestClient) -> None:
    doc = saved_doc()
    created = client.post("/api/v1/houses", json=doc)
    assert created.status_code == 201, created.text
    exported = client.get(f"/api/v1/houses/{created.json()['id']}/document").json()
    assert exported["spaces"] == [
        {**ATTIC_SPACE, "kind": None, "exposed": [{"name": "roof", "area": 1200, "u": 0.1}], "b": None},
        {"id": "garage", "label": "garage", "kind": None, "exposed": None, "volume": None,
         "air_changes": None, "b": 0.7},
    ]  # fmt: skip
    assert [s["adjacent"] for s in exported["surfaces"]] == ["attic", "garage"]
    again = client.post("/api/v1/houses", json=exported)
    assert again.status_code == 201
    assert client.get(f"/api/v1/houses/{again.json()['id']}/document").json() == exported
    # and the saved house computes as the document did
    saved, typed = post(exported, client)["as_found"], post(doc, client)["as_found"]
    assert saved["spaces"] == typed["spaces"] and saved["ua"] == typed["ua"]
    assert saved["surfaces"][0]["r"] == pytest.approx(20.67)  # still air under the attic
