"""A house document with ducts, a rated heat pump over temperature bins, mechanical
ventilation, elevation, the N-factor table and a domestic-hot-water pipe run survives import
and export (POST /api/v1/houses, GET /api/v1/houses/{id}/document) and computes the same
figures afterwards; a document without them exports as before. Saved houses run on SQLite and
PostgreSQL through the fixtures.
"""

from __future__ import annotations

import copy

from fastapi.testclient import TestClient

from tests.api.test_house_api import DOC_IP
from tests.api.test_house_systems import DUCTS, PIPE


def _document() -> dict:
    doc = copy.deepcopy(DOC_IP)
    doc["heating"] = {
        "fuel": "heat_pump",
        "efficiency": 2.4,
        "price": 0.15,
        "output_capacity": 36000.0,
        "heat_pump": {"hspf2": 7.5, "capacity_17": 22000.0, "cop_17": 2.3},
        "ducts": copy.deepcopy(DUCTS),
    }
    doc["heating"]["ducts"]["supply_location"] = "outdoors"
    doc["climate"].update(
        heating_design_temperature=5.0,
        elevation=3000.0,
        temperature_bins=[{"temperature": float(t), "hours": 150.0} for t in range(0, 66, 2)],
    )
    doc["air_leakage"] = {
        "cfm50": 3200,
        "volume": 12000,
        "n_factor_table": {"zone": 3, "stories": 1.5},
    }
    doc["mechanical_ventilation"] = {"kind": "erv", "air_flow": 90, "sensible_recovery": 0.65}
    doc["surfaces"].append(
        {"id": "dhw", "kind": "pipe_run", "length": 40, "pipe": PIPE, "hours_per_year": 3000}
    )
    doc["upgrades"] += [
        {"id": "duct-seal", "supply_leakage_after": 0.03, "cost": {"fixed": 600}},
        {"id": "duct-wrap", "return_r_after": 8.0, "cost": {"per_area": 1.5}},
        {
            "id": "wrap",
            "surface": "dhw",
            "pipe_layers": [{"thickness": 0.5, "conductivity": 0.25}],
            "emissivity": 0.85,
        },
    ]
    doc["packages"].append({"id": "ducts", "upgrades": ["duct-seal", "duct-wrap", "wrap"]})
    return doc


def test_systems_round_trip_through_a_saved_house(client: TestClient) -> None:
    doc = _document()
    direct = client.post("/api/v1/calc/house", json=doc)
    assert direct.status_code == 200, direct.text
    saved = client.post("/api/v1/houses", json=doc)
    assert saved.status_code == 201, saved.text
    exported = client.get(f"/api/v1/houses/{saved.json()['id']}/document").json()
    assert exported["heating"]["ducts"]["supply_leakage"] == 0.10
    assert exported["heating"]["heat_pump"]["hspf2"] == 7.5
    assert exported["mechanical_ventilation"]["kind"] == "erv"
    assert exported["air_leakage"]["n_factor_table"]["zone"] == 3
    assert exported["climate"]["elevation"] == 3000.0
    assert len(exported["climate"]["temperature_bins"]) == 33
    pipe = next(s for s in exported["surfaces"] if s["id"] == "dhw")["pipe"]
    assert pipe["water_heater"]["efficiency"] == 0.6 and pipe["material"] == "copper"
    again = client.post("/api/v1/calc/house", json=exported)
    assert again.status_code == 200, again.text
    a, b = direct.json(), again.json()
    for key in ("as_found",):
        for figure in ("ua", "ua_ventilation", "heating_fuel", "total_cost", "design_heat_loss",
                       "water_heating_cost", "n_factor"):  # fmt: skip
            assert a[key][figure] == b[key][figure], figure
        assert a[key]["distribution"] == b[key]["distribution"]
        assert a[key]["heat_pump"] == b[key]["heat_pump"]
    assert [p["npv"] for p in a["packages"]] == [p["npv"] for p in b["packages"]]
