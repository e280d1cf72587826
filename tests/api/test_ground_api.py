"""POST /api/v1/calc/ground and the ground surfaces of a house document (ISO 13370).

Hand values: tests/unit/test_ground.py works the same floor (A = 120 m², P = 46 m, w = 0.3 m,
λ = 2.0 W/(m·K), B' = 5.217391 m) through every branch of the standard's formulas.
"""

from __future__ import annotations

import copy
from typing import Any

import pint
import pytest
from fastapi.testclient import TestClient

from server.app import create_app
from server.config import Settings
from tests.utils.examples import API_GROUND_SI

client = TestClient(create_app(Settings(environment="test", database_url="sqlite://")))
URL = "/api/v1/calc/ground"
Q = pint.UnitRegistry().Quantity

#: API.md's example request
EXAMPLE: dict[str, Any] = API_GROUND_SI
SLAB: dict[str, Any] = {
    "units": "si",
    "type": "slab",
    "floor_area": 120.0,
    "exposed_perimeter": 46.0,
    "wall_thickness": 300,
    "soil_conductivity": 2.0,
    "floor_r": 0.0,
}
SUSPENDED: dict[str, Any] = {
    "units": "si",
    "type": "suspended_floor",
    "floor_area": 120.0,
    "exposed_perimeter": 46.0,
    "wall_thickness": 300,
    "floor_r": 2.0,
    "height_above_grade": 0.5,
    "underfloor_wall_u": 1.5,
    "vent_area_per_perimeter": 0.003,
    "wind_speed": 4.0,
    "shielding": "average",
}
EDGE = {"orientation": "horizontal", "width_or_depth": 1.0, "r": 2.0, "thickness": 60}

# pint conversions, SI -> ip
FT = Q(1, "m").to("ft").magnitude
FT2 = Q(1, "m**2").to("ft**2").magnitude
INCH_PER_MM = Q(1, "mm").to("inch").magnitude
K_IP = Q(1, "W/m/K").to("Btu_it*inch/hour/ft**2/delta_degF").magnitude
R_IP = Q(1, "m**2*K/W").to("hour*ft**2*delta_degF/Btu_it").magnitude
U_IP = 1.0 / R_IP
UA_IP = Q(1, "W/K").to("Btu_it/hour/delta_degF").magnitude
PSI_IP = Q(1, "W/m/K").to("Btu_it/hour/ft/delta_degF").magnitude
MPH = Q(1, "m/s").to("mph").magnitude


def _post(body: dict[str, Any]) -> dict[str, Any]:
    response = client.post(URL, json=body)
    assert response.status_code == 200, response.text
    return response.json()


def _with(base: dict[str, Any], **changes: Any) -> dict[str, Any]:
    body = copy.deepcopy(base)
    for key, value in changes.items():
        if value is ...:
            body.pop(key, None)
        else:
            body[key] = value
    return body


def test_api_example_heated_basement() -> None:
    # test_heated_basement_worked_case: U_bf 0.408066, U_bw 0.945911 (d_w 0.74 < d_t 1.72),
    # U' 0.641471, H_g 135.9917 W/K
    body = _post(EXAMPLE)
    assert body["method"] == "ISO 13370"
    assert body["characteristic_dimension"] == pytest.approx(5.217391, rel=1e-6)
    assert body["floor_equivalent_thickness"] == pytest.approx(1.72, rel=1e-12)
    assert body["wall_equivalent_thickness"] == pytest.approx(0.74, rel=1e-12)
    assert body["u_floor"] == pytest.approx(0.408066, rel=1e-5)
    assert body["u_wall"] == pytest.approx(0.945911, rel=1e-5)
    assert body["u_overall"] == pytest.approx(0.641471, rel=1e-5)
    assert body["heat_transfer_coefficient"] == pytest.approx(135.9917, rel=1e-5)
    assert body["wall_branch"] == "d_w < d_t"
    assert body["wall_area"] == pytest.approx(92.0)
    assert body["warnings"] == []


def test_slab_worked_case_and_unused_inputs_warned() -> None:
    # B' 5.217391, d_t 0.72, U = 4/17.110918 × ln(23.765164) = 0.740631; H = 88.8758 W/K
    body = _post(_with(SLAB, depth=2.0, wall_r=0.2))
    assert body["u_floor"] == pytest.approx(0.740631, rel=1e-6)
    assert body["u_overall"] == body["u_floor"]
    assert body["heat_transfer_coefficient"] == pytest.approx(88.8758, rel=1e-6)
    assert body["floor_branch"] == "d_t < B'"
    assert body["u_wall"] is None and body["wall_equivalent_thickness"] is None
    assert any(w.startswith("depth is used only for a heated_basement") for w in body["warnings"])
    assert any(w.startswith("wall_r is used only") for w in body["warnings"])


def test_slab_with_edge_insulation() -> None:
    # horizontal D 1 m, R_n 2.0, d_n 60 mm: Ψ = −0.430622 W/(m·K), U = 0.575560 W/(m²·K)
    body = _post(_with(SLAB, edge_insulation=EDGE))
    assert body["edge_psi"] == pytest.approx(-0.430622, rel=1e-5)
    assert body["u_floor_without_edge_insulation"] == pytest.approx(0.740631, rel=1e-6)
    assert body["u_floor"] == pytest.approx(0.575560, rel=1e-5)
    vertical = _post(_with(SLAB, edge_insulation={**EDGE, "orientation": "vertical"}))
    assert vertical["edge_psi"] == pytest.approx(-0.618815, rel=1e-5)


def test_floor_r_omitted_is_zero_with_a_warning() -> None:
    body = _post(_with(SLAB, floor_r=...))
    assert body["u_floor"] == pytest.approx(0.740631, rel=1e-6)
    assert any("floor_r not given" in w for w in body["warnings"])


def test_suspended_floor() -> None:
    # test_suspended_floor_worked_case: U_g 0.740631, U_x 0.45425, U_f 1/2.34, U 0.314772
    body = _post(SUSPENDED)
    assert body["u_underfloor_ground"] == pytest.approx(0.740631, rel=1e-6)
    assert body["u_ventilation"] == pytest.approx(0.45425, rel=1e-6)
    assert body["u_deck"] == pytest.approx(1 / 2.34, rel=1e-12)
    assert body["u_floor"] == pytest.approx(0.314772, rel=1e-5)
    assert body["shielding_factor"] == 0.05
    # a number for f_w: 0.05 gives the same; "exposed" (0.10) doubles the vent term:
    # U_x = 0.28750 + 2 × 0.16675 = 0.62100
    assert _post(_with(SUSPENDED, shielding=0.05))["u_floor"] == pytest.approx(body["u_floor"])
    assert _post(_with(SUSPENDED, shielding="exposed"))["u_ventilation"] == pytest.approx(0.621)
    defaulted = _post(_with(SUSPENDED, shielding=...))
    assert defaulted["u_floor"] == pytest.approx(body["u_floor"])
    assert any("shielding not given" in w for w in defaulted["warnings"])


def test_soil_category() -> None:
    # clay or silt: λ 1.5; same answer as giving the conductivity
    by_name = _post(_with(SLAB, soil_conductivity=..., soil="clay_silt"))
    by_value = _post(_with(SLAB, soil_conductivity=1.5))
    assert by_name["soil_conductivity"] == 1.5
    assert by_name["u_floor"] == pytest.approx(by_value["u_floor"], rel=1e-12)
    # both given and agreeing is fine; omitted is sand or gravel, 2.0
    assert _post(_with(SLAB, soil="rock", soil_conductivity=3.5))["soil_conductivity"] == 3.5
    assert _post(_with(SLAB, soil_conductivity=...))["soil_conductivity"] == 2.0


def _to_ip(body: dict[str, Any]) -> dict[str, Any]:
    ip = copy.deepcopy(body)
    ip["units"] = "ip"
    scale = {
        "floor_area": FT2,
        "exposed_perimeter": FT,
        "wall_thickness": INCH_PER_MM,
        "soil_conductivity": K_IP,
        "floor_r": R_IP,
        "depth": FT,
        "wall_r": R_IP,
        "height_above_grade": FT,
        "underfloor_wall_u": U_IP,
        "vent_area_per_perimeter": FT2 / FT,
        "wind_speed": MPH,
    }
    for key, factor in scale.items():
        if key in ip:
            ip[key] = ip[key] * factor
    if "edge_insulation" in ip:
        edge = ip["edge_insulation"]
        edge["width_or_depth"] *= FT
        edge["r"] *= R_IP
        edge["thickness"] *= INCH_PER_MM
    return ip


@pytest.mark.parametrize("body", [EXAMPLE, _with(SLAB, edge_insulation=EDGE), SUSPENDED])
def test_ip_and_si_agree(body: dict[str, Any]) -> None:
    si = _post(body)
    ip = _post(_to_ip(body))
    assert ip["units"] == "ip"
    back = {
        "characteristic_dimension": FT,
        "floor_equivalent_thickness": FT,
        "wall_equivalent_thickness": FT,
        "u_floor": U_IP,
        "u_wall": U_IP,
        "u_overall": U_IP,
        "heat_transfer_coefficient": UA_IP,
        "soil_conductivity": K_IP,
        "edge_psi": PSI_IP,
        "u_ventilation": U_IP,
        "wall_area": FT2,
    }
    for key, factor in back.items():
        if si[key] is None:
            assert ip[key] is None
        else:
            assert ip[key] == pytest.approx(si[key] * factor, rel=1e-9), key


@pytest.mark.parametrize(
    ("changes", "field"),
    [
        ({"exposed_perimeter": 0}, "exposed_perimeter"),
        ({"exposed_perimeter": -1}, "exposed_perimeter"),
        ({"floor_area": 0}, "floor_area"),
        ({"soil_conductivity": 0}, "soil_conductivity"),
        ({"soil": "rock"}, "soil_conductivity"),
        ({"soil": "peat"}, "soil"),
        ({"depth": ...}, "depth"),
        ({"depth": -2}, "depth"),
        ({"wall_r": ...}, "wall_r"),
        ({"wall_thickness": -300}, "wall_thickness"),
        ({"type": "crawlspace"}, "type"),
        ({"floor_r": "lots"}, "floor_r"),
        ({"colour": "grey"}, "colour"),
    ],
)
def test_bad_inputs_are_422_naming_the_field(changes: dict[str, Any], field: str) -> None:
    response = client.post(URL, json=_with(EXAMPLE, **changes))
    assert response.status_code == 422, response.text
    body = response.json()
    assert body["errors"][0]["field"] == field
    assert body["detail"]


def test_no_exposed_perimeter_says_why() -> None:
    response = client.post(URL, json=_with(SLAB, exposed_perimeter=0))
    assert response.status_code == 422
    assert "no exposed perimeter" in response.json()["errors"][0]["message"]


@pytest.mark.parametrize(
    ("changes", "field"),
    [
        ({"edge_insulation": {**EDGE, "r": 0.02}}, "edge_insulation.r"),
        ({"edge_insulation": {**EDGE, "width_or_depth": 0}}, "edge_insulation.width_or_depth"),
        ({"edge_insulation": {**EDGE, "orientation": "diagonal"}}, "edge_insulation.orientation"),
    ],
)
def test_bad_edge_insulation(changes: dict[str, Any], field: str) -> None:
    response = client.post(URL, json=_with(SLAB, **changes))
    assert response.status_code == 422, response.text
    assert response.json()["errors"][0]["field"] == field


@pytest.mark.parametrize(
    "missing", ["height_above_grade", "underfloor_wall_u", "vent_area_per_perimeter", "wind_speed"]
)
def test_suspended_floor_needs_its_inputs(missing: str) -> None:
    response = client.post(URL, json=_with(SUSPENDED, **{missing: ...}))
    assert response.status_code == 422
    assert response.json()["errors"][0]["field"] == missing


# --- ground surfaces in a house document ------------------------------------------------------

HOUSE_URL = "/api/v1/calc/house"
SLAB_ASSEMBLY = {
    "heat_flow": "down",
    "films": "ashrae",  # the films are excluded from R_f whatever they are
    "layers": [{"name": "slab insulation", "r": 0.5}],
}
BASEMENT_WALL_ASSEMBLY = {
    "heat_flow": "horizontal",
    "films": "iso6946",  # R_si 0.13 + R_se 0.04: air-to-air R 0.37
    "layers": [{"name": "foundation wall", "r": 0.2}],
}
GROUND = {"exposed_perimeter": 46.0, "wall_thickness": 300, "soil_conductivity": 2.0}
HOUSE: dict[str, Any] = {
    "units": "si",
    "climate": {"hdd": 3000},
    "heating": {"fuel": "natural_gas", "efficiency": 0.9, "price": 1.0},
    "surfaces": [
        {"id": "slab", "kind": "slab", "area": 120, "assembly": SLAB_ASSEMBLY, "ground": GROUND},
        {
            "id": "bsmt",
            "kind": "basement_wall",
            "area": 120,
            "assembly": BASEMENT_WALL_ASSEMBLY,
            "ground": {**GROUND, "depth": 2.0, "floor_r": 0.5},
        },
    ],
    "upgrades": [
        {
            "id": "slab-edge",
            "surface": "slab",
            "ground": {"edge_insulation": EDGE},
            "cost": {"fixed": 1000},
        },
        {
            "id": "bsmt-interior",
            "surface": "bsmt",
            "assembly": {
                **BASEMENT_WALL_ASSEMBLY,
                "layers": [{"name": "foundation wall", "r": 0.2}, {"name": "board", "r": 2.0}],
            },
            "cost": {"fixed": 3000},
        },
    ],
}


def _house(doc: dict[str, Any]) -> dict[str, Any]:
    response = client.post(
        HOUSE_URL, json={**doc, "detail": {"upgrades_alone": "full"}}
    )  # upgrades alone in full
    assert response.status_code == 200, response.text
    return response.json()


def test_house_slab_and_basement_wall_use_the_ground_u() -> None:
    result = _house(HOUSE)
    ua = result["as_found"]["ua_by_surface"]
    # slab: R_f 0.5 → d_t = 0.3 + 2 × (0.17 + 0.5 + 0.04) = 1.72 < B' 5.217391:
    # U = 4/(16.390918 + 1.72) × ln(16.390918/1.72 + 1) = 0.220861 × 2.354191 = 0.519949;
    # UA = 120 × 0.519949 = 62.3939 W/K (the air-to-air U would be about 1/(0.5 + films))
    assert ua["slab"] == pytest.approx(62.3939, rel=1e-5)
    # basement wall: U_bw 0.945911 (test_heated_basement_worked_case) on z P = 2 × 46 = 92 m²,
    # the 28 m² above grade at the air-to-air 1/0.37: UA = 87.0239 + 75.6757 = 162.6995 W/K
    assert ua["bsmt"] == pytest.approx(162.6995, rel=1e-5)
    wall = next(s for s in result["as_found"]["surfaces"] if s["id"] == "bsmt")
    assert wall["u"] == pytest.approx(162.6995 / 120, rel=1e-5)
    upgrades = {o["id"]: o for o in result["upgrades"]}
    # edge insulation at d_t 1.72: Ψ = −(2/π)[ln(1/1.72 + 1) − ln(1/5.66 + 1)]
    #   = −0.636620 × (0.458308 − 0.162696) = −0.188192; U = 0.519949 − 2 × 0.188192/5.217391
    #   = 0.447809; UA = 53.7371 W/K
    assert upgrades["slab-edge"]["ua_by_surface"]["slab"] == pytest.approx(53.7371, rel=1e-5)
    assert upgrades["slab-edge"]["ua_by_surface"]["bsmt"] == pytest.approx(162.6995, rel=1e-5)
    # interior board: R_w 2.2 → d_w = 2 × 2.37 = 4.74 ≥ d_t 1.72:
    # U_bw = 0.636620 × (1 + 0.5 × 1.72/3.72) × ln(2/4.74 + 1) = 0.636620 × 1.231183 × 0.352023
    #      = 0.275914; UA = 92 × 0.275914 + 28/2.37 = 25.3841 + 11.8143 = 37.1984 W/K
    assert upgrades["bsmt-interior"]["ua_by_surface"]["bsmt"] == pytest.approx(37.1984, rel=1e-5)


def test_house_ip_matches_si() -> None:
    doc = copy.deepcopy(HOUSE)
    doc["units"] = "ip"
    doc["climate"] = {"hdd": 3000 * 1.8}
    doc["upgrades"] = []
    for surface in doc["surfaces"]:
        surface["area"] *= FT2
        for layer in surface["assembly"]["layers"]:
            layer["r"] *= R_IP
        ground = surface["ground"]
        ground["exposed_perimeter"] *= FT
        ground["wall_thickness"] *= INCH_PER_MM
        ground["soil_conductivity"] *= K_IP
        if "depth" in ground:
            ground["depth"] *= FT
            ground["floor_r"] *= R_IP
    ua = _house(doc)["as_found"]["ua_by_surface"]
    assert ua["slab"] == pytest.approx(62.3939 * UA_IP, rel=1e-5)
    assert ua["bsmt"] == pytest.approx(162.6995 * UA_IP, rel=1e-5)


def test_basement_wall_smaller_than_its_buried_area_is_warned() -> None:
    doc = copy.deepcopy(HOUSE)
    doc["surfaces"][1]["area"] = 80  # < z P = 92 m²
    doc["upgrades"] = []
    result = _house(doc)
    # UA counts the below-grade 92 m² at U_bw: 92 × 0.945911 = 87.0238 W/K
    assert result["as_found"]["ua_by_surface"]["bsmt"] == pytest.approx(87.0238, rel=1e-5)
    assert any("less than the below-grade area" in w for w in result["warnings"])


def test_house_without_ground_objects_is_unchanged() -> None:
    # a basement_wall without a ground object keeps the air-to-air U: 120 m² / 0.37 = 324.324
    doc = copy.deepcopy(HOUSE)
    del doc["surfaces"][1]["ground"]
    doc["upgrades"] = [doc["upgrades"][0]]
    result = _house(doc)
    assert result["as_found"]["ua_by_surface"]["bsmt"] == pytest.approx(120 / 0.37, rel=1e-9)


@pytest.mark.parametrize(
    ("change", "field"),
    [
        (
            lambda d: d["surfaces"][0]["ground"].pop("exposed_perimeter"),
            "surfaces[0].ground.exposed_perimeter",
        ),
        (
            lambda d: d["surfaces"][0]["ground"].update(exposed_perimeter=0),
            "surfaces[0].ground.exposed_perimeter",
        ),
        (lambda d: d["surfaces"][1]["ground"].pop("depth"), "surfaces[1].ground.depth"),
        (lambda d: d["surfaces"][0]["ground"].update(floor_r=1.0), "surfaces[0].ground.floor_r"),
        (
            lambda d: d["surfaces"][0]["ground"].update(soil="rock"),
            "surfaces[0].ground.soil_conductivity",
        ),
        (lambda d: d["surfaces"][0].update(kind="wall"), "surfaces[0]"),
        (
            lambda d: d["upgrades"][0]["ground"]["edge_insulation"].update(r=0.02),
            "upgrades[0].ground.edge_insulation.r",
        ),
        (lambda d: d["upgrades"][0].update(surface="bsmt"), "upgrades[0].ground"),
    ],
)
def test_house_ground_422s(change: Any, field: str) -> None:
    doc = copy.deepcopy(HOUSE)
    change(doc)
    if field == "upgrades[0].ground":
        # a ground change on a wall that is not against the ground
        doc["surfaces"][1].pop("ground")
        doc["surfaces"][1]["kind"] = "wall"
        doc["upgrades"] = [doc["upgrades"][0]]
    response = client.post(HOUSE_URL, json=doc)
    assert response.status_code == 422, response.text
    assert response.json()["errors"][0]["field"] == field
