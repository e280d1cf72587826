"""Windows with the sun, internal gains and the balance point in POST /api/v1/calc/house.

Worked case (si, by hand): wall 100 m² × U 0.5 = 50 W/K, south window 10 m² × U 2.8 = 28 W/K
(UA 78 W/K), SHGC 0.6; internal gains 500 W typed; set-point 20 °C; HDD table 0, 500, 3,000,
6,500 K·day at 0, 10, 20, 30 °C. The solar table gives the south wall 240 kWh/m² per 100
heating days at each base (24·b kWh/m² over 10·b days), i.e. a mean of 240 / (100 × 24 h) =
0.1 kW/m² = 100 W/m² at every base. So solar gain = 0.6 × 10 × 100 = 600 W, balance point
t = 20 − (500 + 600) / 78 = 5.897436 °C, HDD = 294.8718 K·day, heat = 78 × 294.8718 × 24 h =
552 kWh at $0.20 = $110.40. Window replacement (U 1.4, SHGC 0.4): UA 64, gains 900 W,
t = 5.9375 °C, HDD 296.875, 456 kWh, $91.20: saves $19.20. The window's solar gain over the
heating days: 0.6 × 10 m² × 24 × 5.897436 kWh/m² = 849.23 kWh.
"""

from __future__ import annotations

import copy
from typing import Any

import pint
import pytest
from fastapi.testclient import TestClient

from server.app import create_app
from server.config import Settings
from server.services.gains import FIXED_BASE, TYPED_GAINS

client = TestClient(create_app(Settings(environment="test", database_url="sqlite://")))
URL = "/api/v1/calc/house"
Q = pint.UnitRegistry().Quantity


def _row(base: float, days: int, south: float) -> dict[str, Any]:
    vertical = [0.0] * 24
    vertical[12] = south  # azimuth 180°
    return {"base": base, "days": days, "beam_horizontal": 0.0, "diffuse_horizontal": 0.0,
            "global_horizontal": 0.0, "beam_vertical": vertical}  # fmt: skip


DOC: dict[str, Any] = {
    "units": "si",
    "climate": {
        "hdd": 3000,
        "variable_base": {
            "setpoint": 20,
            "table": [
                {"base": b, "hdd": h} for b, h in ((0, 0), (10, 500), (20, 3000), (30, 6500))
            ],
        },
        "solar": {"table": [_row(b, 10 * b, 24.0 * b) for b in (0, 10, 20, 30)]},
    },
    "heating": {"fuel": "electric_resistance", "efficiency": 1.0, "price": 0.20},
    "internal_gains": 500,
    "surfaces": [
        {"id": "wall", "kind": "wall", "area": 100, "u": 0.5},
        {"id": "win", "kind": "window", "area": 10, "u": 2.8, "shgc": 0.6, "orientation": "S"},
    ],
    "upgrades": [
        {
            "id": "new-window",
            "kind": "window",
            "surface": "win",
            "u": 1.4,
            "shgc": 0.4,
            "cost": {"per_area": 60},
        },
    ],  # fmt: skip
    "packages": [{"id": "windows", "upgrades": ["new-window"]}],
}


def post(doc: dict[str, Any]) -> dict[str, Any]:
    response = client.post(URL, json=doc)
    assert response.status_code == 200, response.text
    return response.json()


def refused(doc: dict[str, Any]) -> list[str]:
    response = client.post(URL, json=doc)
    assert response.status_code == 422, response.text
    return [e["field"] for e in response.json()["errors"]]


def test_window_upgrade_savings_by_hand() -> None:
    result = post(DOC)
    found = result["as_found"]
    assert found["balance_point"] == pytest.approx(20 - 1100 / 78, abs=1e-9)
    assert found["heating_degree_days"] == pytest.approx(294.871795, rel=1e-6)
    assert found["internal_gains"] == pytest.approx(500.0)
    assert found["solar_gains"] == pytest.approx(600.0)
    assert found["heating_fuel"] == pytest.approx(552.0, rel=1e-9)
    window = next(s for s in found["surfaces"] if s["id"] == "win")
    assert window["shgc"] == 0.6
    assert window["solar_gain"] == pytest.approx(0.6 * 10 * 24 * (20 - 1100 / 78), rel=1e-9)
    (package,) = result["packages"]
    assert package["balance_point"] == pytest.approx(5.9375, abs=1e-9)
    assert package["heating_fuel"] == pytest.approx(456.0, rel=1e-9)
    assert package["annual_savings"] == pytest.approx(19.20, rel=1e-9)
    assert package["installed_cost"] == pytest.approx(600.0)  # 60 per m² × 10 m²
    assert "solar gain" in result["degree_day_basis"]


def test_shgc_zero_means_no_solar_gain() -> None:
    doc = copy.deepcopy(DOC)
    doc["surfaces"][1]["shgc"] = 0.0
    found = post(doc)["as_found"]
    assert found["solar_gains"] == 0.0
    assert found["balance_point"] == pytest.approx(20 - 500 / 78, abs=1e-9)  # 13.589744 °C


def test_resnet_default_when_gains_are_not_typed() -> None:
    # 150 m², 3 bedrooms: 17,900 + 23.8 × 1,614.59 ft² + 12,312 = 68,638.3 Btu/day -> 838.17 W
    doc = copy.deepcopy(DOC)
    del doc["internal_gains"]
    doc["floor_area"], doc["bedrooms"] = 150, 3
    ft2 = Q(150, "m**2").to("ft**2").magnitude
    expected = Q((17_900 + 23.8 * ft2 + 4_104 * 3) / 24, "Btu_it/hr").to("W").magnitude
    found = post(doc)
    assert found["as_found"]["internal_gains"] == pytest.approx(expected, rel=1e-9)
    assert expected == pytest.approx(838.17, abs=0.01)
    assert "ANSI/RESNET/ICC 301" in found["degree_day_basis"]


def _ip_twin(doc: dict[str, Any]) -> dict[str, Any]:
    """The same house in ip (pint factors)."""
    out = copy.deepcopy(doc)
    out["units"] = "ip"
    f = lambda c: Q(c, "degC").to("degF").magnitude  # noqa: E731
    kday = Q(1, "delta_degC").to("delta_degF").magnitude
    irr = Q(1, "kWh/m**2").to("Btu_it/ft**2").magnitude
    m2 = Q(1, "m**2").to("ft**2").magnitude
    u = Q(1, "W/(m**2*K)").to("Btu_it/(hr*ft**2*delta_degF)").magnitude
    climate = out["climate"]
    climate["hdd"] *= kday
    climate["variable_base"]["setpoint"] = f(20)
    for row in climate["variable_base"]["table"]:
        row["base"], row["hdd"] = f(row["base"]), row["hdd"] * kday
    for row in climate["solar"]["table"]:
        row["base"] = f(row["base"])
        row["beam_vertical"] = [v * irr for v in row["beam_vertical"]]
    out["internal_gains"] = Q(500, "W").to("Btu_it/hr").magnitude
    for surface in out["surfaces"]:
        surface["area"] *= m2
        surface["u"] *= u
    out["upgrades"][0]["u"] *= u
    out["upgrades"][0]["cost"]["per_area"] /= m2
    return out


def test_si_and_ip_agree() -> None:
    si, ip = post(DOC), post(_ip_twin(DOC))
    assert ip["as_found"]["balance_point"] == pytest.approx(
        Q(si["as_found"]["balance_point"], "degC").to("degF").magnitude, rel=1e-9
    )
    assert ip["packages"][0]["annual_savings"] == pytest.approx(19.20, rel=1e-9)
    assert ip["as_found"]["total_cost"] == pytest.approx(si["as_found"]["total_cost"], rel=1e-9)
    window = next(s for s in ip["as_found"]["surfaces"] if s["id"] == "win")
    assert window["solar_gain"] == pytest.approx(
        Q(849.2308, "kWh").to("Btu_it").magnitude, rel=1e-6
    )


def test_without_a_degree_day_table_the_fixed_base_is_used() -> None:
    doc = copy.deepcopy(DOC)
    del doc["climate"]["variable_base"]
    result = post(doc)
    assert result["degree_day_basis"] == FIXED_BASE
    assert result["as_found"]["balance_point"] is None
    assert result["as_found"]["heating_degree_days"] == pytest.approx(3000.0)
    # 78 W/K × 3,000 K·day × 24 h = 5,616 kWh: the window's sun is not guessed
    assert result["as_found"]["heating_fuel"] == pytest.approx(5616.0, rel=1e-9)
    assert any("fixed base is used" in w for w in result["warnings"])


def test_typed_total_gains_keep_todays_meaning() -> None:
    doc = copy.deepcopy(DOC)
    doc["climate"]["variable_base"]["internal_gains"] = 1100  # internal + solar, typed
    result = post(doc)
    assert result["degree_day_basis"] == TYPED_GAINS
    assert result["as_found"]["balance_point"] == pytest.approx(20 - 1100 / 78, abs=1e-9)
    # the window upgrade changes UA only: t = 20 − 1,100 / 64 = 2.8125, HDD 140.625,
    # 64 × 140.625 × 24 / 1,000 = 216 kWh
    assert result["packages"][0]["heating_fuel"] == pytest.approx(216.0, rel=1e-9)


def _with(**changes: Any) -> dict[str, Any]:
    doc = copy.deepcopy(DOC)
    for path, value in changes.items():
        *where, last = path.split("__")
        holder: Any = doc
        for key in where:
            holder = holder[int(key)] if key.isdigit() else holder[key]
        if value is None:
            del holder[int(last) if last.isdigit() else last]
        else:
            holder[int(last) if last.isdigit() else last] = value
    return doc


@pytest.mark.parametrize(
    ("changes", "field"),
    [
        ({"surfaces__1__shgc": 1.5}, "surfaces[1].shgc"),
        ({"surfaces__1__shgc": -0.1}, "surfaces[1].shgc"),
        ({"surfaces__0__shgc": 0.5}, "surfaces[0].shgc"),
        ({"surfaces__1__orientation": "SSW"}, "surfaces[1].orientation"),
        ({"surfaces__1__azimuth": 200}, "surfaces[1].azimuth"),
        ({"surfaces__1__orientation": None}, "surfaces[1].orientation"),
        ({"surfaces__1__tilt": 120}, "surfaces[1].tilt"),
        ({"surfaces__1__azimuth": 400, "surfaces__1__orientation": None}, "surfaces[1].azimuth"),
        ({"upgrades__0__shgc": 2}, "upgrades[0].shgc"),
        ({"upgrades__0__surface": "wall"}, "upgrades[0].surface"),
        ({"upgrades__0__u": None}, "upgrades[0]"),
        ({"internal_gains": None}, "internal_gains"),
        ({"internal_gains": None, "floor_area": 150}, "bedrooms"),
        ({"bedrooms": -1}, "bedrooms"),
        ({"climate__solar__ground_reflectance": 1.2}, "climate.solar.ground_reflectance"),
        (
            {"climate__solar__table__0__beam_vertical": [0.0]},
            "climate.solar.table[0].beam_vertical",
        ),
    ],
)
def test_bad_window_and_gains_inputs_name_the_field(changes: dict[str, Any], field: str) -> None:
    assert field in refused(_with(**changes))


def test_export_import_keeps_the_new_fields(client_db: TestClient) -> None:
    doc = copy.deepcopy(DOC)
    doc["floor_area"], doc["bedrooms"] = 150, 3
    del doc["surfaces"][0]["u"], doc["surfaces"][1]["u"]
    wall = {"heat_flow": "horizontal", "films": "none", "layers": [{"name": "w", "r": 2.0}]}
    glass = {"heat_flow": "horizontal", "films": "none", "layers": [{"name": "g", "r": 1 / 2.8}]}
    doc["surfaces"][0]["assembly"], doc["surfaces"][1]["assembly"] = wall, glass
    saved = client_db.post("/api/v1/houses", json=doc)
    assert saved.status_code == 201, saved.text
    exported = client_db.get(f"/api/v1/houses/{saved.json()['id']}/document").json()
    assert (exported["floor_area"], exported["bedrooms"], exported["internal_gains"]) == (
        150,
        3,
        500,
    )
    window = next(s for s in exported["surfaces"] if s["id"] == "win")
    assert (window["shgc"], window["orientation"]) == (0.6, "S")
    assert exported["climate"]["solar"]["table"][1]["beam_vertical"][12] == 240.0
    assert post(exported)["packages"][0]["annual_savings"] == pytest.approx(19.20, rel=1e-9)


@pytest.fixture
def client_db(client: TestClient) -> TestClient:
    return client
