"""A house document with ground surfaces survives import and export (POST /api/v1/houses,
GET /api/v1/houses/{id}/document) and computes the same ground UA afterwards.

Hand values: tests/api/test_ground_api.py (slab UA 62.3939 W/K, basement wall 162.6995 W/K,
slab with edge insulation 53.7371 W/K).
"""

from __future__ import annotations

import copy

import pytest
from fastapi.testclient import TestClient

from tests.api.test_ground_api import HOUSE


def test_ground_objects_round_trip_through_a_saved_house(client: TestClient) -> None:
    doc = copy.deepcopy(HOUSE)
    doc["packages"] = [{"id": "edge", "upgrades": ["slab-edge"]}]
    saved = client.post("/api/v1/houses", json=doc)
    assert saved.status_code == 201, saved.text
    exported = client.get(f"/api/v1/houses/{saved.json()['id']}/document").json()
    surfaces = {s["id"]: s for s in exported["surfaces"]}
    assert surfaces["slab"]["ground"]["exposed_perimeter"] == 46.0
    assert surfaces["bsmt"]["ground"]["floor_r"] == 0.5
    upgrade = next(u for u in exported["upgrades"] if u["id"] == "slab-edge")
    assert upgrade["ground"]["edge_insulation"]["orientation"] == "horizontal"
    response = client.post("/api/v1/calc/house", json=exported)
    assert response.status_code == 200, response.text
    result = response.json()
    ua = result["as_found"]["ua_by_surface"]
    assert ua["slab"] == pytest.approx(62.3939, rel=1e-5)
    assert ua["bsmt"] == pytest.approx(162.6995, rel=1e-5)
    (package,) = result["packages"]
    assert package["ua_by_surface"]["slab"] == pytest.approx(53.7371, rel=1e-5)
