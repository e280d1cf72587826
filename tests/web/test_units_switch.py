"""Switching a whole house between US and metric units changes no result (only its units)."""

from __future__ import annotations

import re

import pytest
from fastapi.testclient import TestClient

from server.services.demo import load_demo_house


def test_switching_units_keeps_every_figure(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    with app.state.session_factory() as s:
        house_id = load_demo_house(session=s)
        s.commit()
    client.post(f"/houses/{house_id}/pipes", data={"name": "Hot water", "length": "40", "pipe_outer_diameter": "7/8",
                "fluid_temperature": "130", "ambient_temperature": "55", "hours_per_year": "3000"})  # fmt: skip
    before = client.post(
        "/api/v1/calc/house", json=client.get(f"/api/v1/houses/{house_id}/document").json()
    ).json()
    version = re.search(
        r'name="version" value="(\d+)"', client.get(f"/houses/{house_id}").text
    ).group(1)  # type: ignore[union-attr]
    client.post(f"/houses/{house_id}/units", data={"units": "si", "version": version})
    doc = client.get(f"/api/v1/houses/{house_id}/document").json()
    assert doc["units"] == "si"
    after = client.post("/api/v1/calc/house", json=doc).json()
    # money and CO2 do not depend on units; UA: 1 Btu/(h·°F) = 0.527527 W/K (pint-checked factor
    # in tests/unit/test_units.py); heating load: Btu → kWh (1 kWh = 3412.14 Btu)
    assert after["as_found"]["total_cost"] == pytest.approx(
        before["as_found"]["total_cost"], rel=1e-9
    )
    assert after["as_found"]["co2"] == pytest.approx(before["as_found"]["co2"], rel=1e-9)
    assert after["as_found"]["ua"] == pytest.approx(before["as_found"]["ua"] * 0.5275279, rel=1e-6)
    assert after["as_found"]["heating_load"] == pytest.approx(
        before["as_found"]["heating_load"] / 3412.1416, rel=1e-6
    )
    for b, a in zip(before["packages"], after["packages"], strict=True):
        assert a["installed_cost"] == pytest.approx(
            b["installed_cost"], rel=1e-9
        )  # $/ft² → $/m² too
        assert a["npv"] == pytest.approx(b["npv"], rel=1e-9)
    # and back again
    version = re.search(
        r'name="version" value="(\d+)"', client.get(f"/houses/{house_id}").text
    ).group(1)  # type: ignore[union-attr]
    client.post(f"/houses/{house_id}/units", data={"units": "ip", "version": version})
    again = client.post(
        "/api/v1/calc/house", json=client.get(f"/api/v1/houses/{house_id}/document").json()
    ).json()
    assert again["as_found"]["total_cost"] == pytest.approx(
        before["as_found"]["total_cost"], rel=1e-9
    )
