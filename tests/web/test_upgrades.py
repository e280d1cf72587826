"""Upgrades and packages entered on the pages, computed by the same compare path."""

from __future__ import annotations

import re

from fastapi.testclient import TestClient


def _version(client: TestClient, url: str) -> str:
    return re.search(r'name="version" value="(\d+)"', client.get(url).text).group(1)  # type: ignore[union-attr]


def _setup(client: TestClient) -> tuple[str, str]:
    house = client.post("/houses", data={"label": "Upgrade house"}, follow_redirects=False).headers[
        "location"
    ]
    surface = client.post(f"{house}/surfaces", data={"typical": "wall-2x4-16-empty", "area": "1000"},
                          follow_redirects=False).headers["location"]  # fmt: skip
    client.post(f"{house}/settings/climate", data={"hdd": "5400", "cdd": "0"})
    client.post(
        f"{house}/settings/heating",
        data={"fuel": "natural_gas", "efficiency": "0.8", "price": "1.45"},
    )
    client.post(
        f"{house}/settings/air_leakage", data={"cfm50": "3200", "n_factor": "18", "volume": "12000"}
    )
    return house, surface


def test_assembly_upgrade_air_sealing_and_package(client: TestClient) -> None:
    house, surface = _setup(client)
    surface_id = surface.rsplit("/", 1)[1]
    r = client.post(f"{house}/upgrades", data={"kind": "assembly", "surface_id": surface_id,
                                                "start": "typical:wall-2x4-16-dense-pack", "name": "Dense-pack"},
                    follow_redirects=False)  # fmt: skip
    assert r.status_code == 303
    upgrade_url = r.headers["location"]
    page = client.get(upgrade_url).text
    # empty 2x4 wall → dense-pack R-12.3 (hand checks in tests/browser/test_layer_editor.py)
    assert "R-4.6" in page and "R-12.3" in page
    r = client.post(upgrade_url, data={"name": "Dense-pack", "cost_fixed": "400", "cost_per_area": "2.10",
                                       "rebate": "0", "life_years": "30"}, follow_redirects=False)  # fmt: skip
    assert r.status_code == 303
    r = client.post(f"{house}/upgrades", data={"kind": "air_sealing", "cfm50_after": "2200", "cost_fixed": "900",
                                                "rebate": "0", "life_years": "20"}, follow_redirects=False)  # fmt: skip
    assert r.status_code == 303
    r = client.post(f"{house}/packages", data={"name": "Walls + air", "upgrades": ["dense-pack", "air-sealing-to-2-200-cfm50"]},
                    follow_redirects=False)  # fmt: skip
    assert r.status_code == 303, r.text
    house_id = house.rsplit("/", 1)[1]
    api = client.post(
        "/api/v1/calc/house", json=client.get(f"/api/v1/houses/{house_id}/document").json()
    ).json()
    package = api["packages"][0]
    # installed = 400 + 2.10 × 1000 + 900 = 3,400
    assert package["installed_cost"] == 3400
    # air sealing UA: 0.018 × (3200 − 2200) × 60 / 18 = 60 Btu/(h·°F) less, × 5400 × 24 / 0.8 / 1e5 therm
    steps = {s["upgrade"]: s for s in package["steps"]}
    assert (
        abs(
            steps["air-sealing-to-2-200-cfm50"]["annual_savings"]
            - 60 * 5400 * 24 / 0.8 / 1e5 * 1.45
        )
        < 0.01
    )
    compare = client.get(f"/houses/{house_id}/compare").text
    assert "Walls + air" in compare


def test_air_sealing_target_above_as_found_is_refused(client: TestClient) -> None:
    house, _ = _setup(client)
    r = client.post(
        f"{house}/upgrades",
        data={"kind": "air_sealing", "cfm50_after": "4000", "cost_fixed": "900"},
    )
    assert (
        r.status_code == 422
        and "below the as-found 3,200 CFM50" in r.text
        and 'value="4000"' in r.text
    )


def test_package_needs_upgrades_and_one_per_surface(client: TestClient) -> None:
    house, surface = _setup(client)
    r = client.post(f"{house}/packages", data={"name": "Empty"})
    assert r.status_code == 422 and "tick at least one upgrade" in r.text
    sid = surface.rsplit("/", 1)[1]
    for name in ("A", "B"):
        client.post(
            f"{house}/upgrades",
            data={"kind": "assembly", "surface_id": sid, "start": "as_found", "name": name},
        )
    r = client.post(f"{house}/packages", data={"name": "Both", "upgrades": ["a", "b"]})
    assert r.status_code == 422 and "one upgrade per surface" in r.text


def test_upgrade_bad_price_keeps_input(client: TestClient) -> None:
    house, surface = _setup(client)
    sid = surface.rsplit("/", 1)[1]
    url = client.post(f"{house}/upgrades", data={"kind": "assembly", "surface_id": sid, "start": "as_found"},
                      follow_redirects=False).headers["location"]  # fmt: skip
    r = client.post(url, data={"name": "x", "cost_fixed": "lots", "cost_per_area": "1"})
    assert r.status_code == 422 and 'value="lots"' in r.text and "is not a number" in r.text
