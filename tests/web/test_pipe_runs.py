"""Pipe runs on the House page, their insulation upgrade, through the house calculation."""

from __future__ import annotations

from fastapi.testclient import TestClient

PIPE = {"name": "Hot water to kitchen", "length": "40", "pipe_outer_diameter": "7/8",
        "fluid_temperature": "130", "ambient_temperature": "55", "hours_per_year": "3000",
        "thickness": "", "conductivity": ""}  # fmt: skip


def test_pipe_run_and_insulation_upgrade(client: TestClient) -> None:
    house = client.post("/houses", data={"label": "Pipe house"}, follow_redirects=False).headers[
        "location"
    ]
    client.post(f"{house}/surfaces", data={"typical": "wall-2x4-16-r13", "area": "1000"})
    client.post(f"{house}/settings/climate", data={"hdd": "5400"})
    client.post(
        f"{house}/settings/heating",
        data={"fuel": "natural_gas", "efficiency": "0.8", "price": "1.45"},
    )
    r = client.post(f"{house}/pipes", data=PIPE, follow_redirects=False)
    assert r.status_code == 303, r.text
    run_page = client.get(r.headers["location"]).text
    assert "bare" in run_page and "Insulate this run" in run_page and "flue" in run_page
    run_id = r.headers["location"].rsplit("/", 1)[1]
    r = client.post(f"{house}/pipes/{run_id}/insulate", data={"name": "Foam sleeves", "thickness": "3/4", "conductivity": "0.25"},
                    follow_redirects=False)  # fmt: skip
    assert r.status_code == 303
    upgrade = r.headers["location"]
    client.post(
        upgrade,
        data={
            "name": "Foam sleeves",
            "cost_fixed": "40",
            "cost_per_area": "1.50",
            "rebate": "0",
            "life_years": "20",
        },
    )
    client.post(f"{house}/packages", data={"name": "Pipes", "upgrades": ["foam-sleeves"]})
    house_id = house.rsplit("/", 1)[1]
    doc = client.get(f"/api/v1/houses/{house_id}/document").json()
    run = next(s for s in doc["surfaces"] if s["kind"] == "pipe_run")
    assert run["length"] == 40 and run["pipe"]["pipe_outer_diameter"] == 0.875  # 7/8 in
    result = client.post("/api/v1/calc/house", json=doc).json()
    package = result["packages"][0]
    assert package["installed_cost"] == 40 + 1.50 * 40  # fixed + per ft × 40 ft
    assert package["annual_savings"] > 0 and package["pipe_loss"] < result["as_found"]["pipe_loss"]


def test_pipe_run_bad_input_kept(client: TestClient) -> None:
    house = client.post("/houses", data={"label": "Pipe house"}, follow_redirects=False).headers[
        "location"
    ]
    r = client.post(
        f"{house}/pipes", data={**PIPE, "pipe_outer_diameter": "seven eighths", "thickness": "1/2"}
    )
    assert r.status_code == 422
    assert 'value="seven eighths"' in r.text and "is not a length" in r.text
