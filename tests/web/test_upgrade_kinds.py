"""Ground, window and duct upgrades proposed on the pages (no JavaScript: plain POST, 303).

Each kind entered through the House page or a Surface page must compute exactly as the
equivalent calc/house document written by hand (annual savings to 1e-9), in both unit systems.
Hand-worked figures are in the comments; the ducts use the document of
tests/api/test_house_systems.py (ASHRAE Standard 152 inputs).
"""

from __future__ import annotations

import copy
import re
from typing import Any

import pytest
from fastapi.testclient import TestClient

IP = {
    "area": 1000.0, "window_area": 150.0, "perimeter": 130.0, "depth": 6.0, "wall_t": 8.0,
    "hdd": 5400.0, "duct_area": (300.0, 100.0), "duct_r": 4.2, "flow": 1200.0, "rise": 50.0,
}  # fmt: skip
SI = {
    "area": 93.0, "window_area": 14.0, "perimeter": 40.0, "depth": 1.8, "wall_t": 200.0,
    "hdd": 3000.0, "duct_area": (28.0, 9.0), "duct_r": 0.74, "flow": 566.0, "rise": 28.0,
}  # fmt: skip


def _document(units: str) -> dict[str, Any]:
    """A small house with a window (rated U, films none), a slab and a basement wall on the
    ground (ISO 13370) and forced-air ducts in the attic (a buffer space, b 0.9)."""
    v = IP if units == "ip" else SI
    ip = units == "ip"
    return {
        "units": units,
        "name": f"Kinds house {units}",
        "climate": {"hdd": v["hdd"], "cdd": 0.0},
        "heating": {
            "fuel": "natural_gas",
            "efficiency": 0.8,
            "price": 1.45,
            "ducts": {
                "supply_location": "attic",
                "return_location": "conditioned",
                "supply_leakage": 0.10,
                "return_leakage": 0.05,
                "supply_r": v["duct_r"],
                "return_r": v["duct_r"],
                "supply_area": v["duct_area"][0],
                "return_area": v["duct_area"][1],
                "air_flow": v["flow"],
                "temperature_rise": v["rise"],
            },
        },  # fmt: skip
        "spaces": [{"id": "attic", "b": 0.9}],
        "surfaces": [
            {
                "id": "wall",
                "kind": "wall",
                "area": v["area"],
                "assembly": {"layers": [{"name": "wall", "r": 11.0 if ip else 1.94}]},
            },
            # a rated window: one layer R = 1/U, no films (U 0.50 ip, 2.8 si)
            {
                "id": "win",
                "kind": "window",
                "area": v["window_area"],
                "shgc": 0.60,
                "assembly": {
                    "films": "none",
                    "layers": [{"name": "glazing", "r": 2.0 if ip else 1 / 2.8}],
                },
            },
            {
                "id": "slab",
                "kind": "slab",
                "area": v["area"],
                "assembly": {
                    "heat_flow": "down",
                    "films": "none",
                    "layers": [{"name": "concrete", "r": 0.3 if ip else 0.05}],
                },
                "ground": {
                    "exposed_perimeter": v["perimeter"],
                    "wall_thickness": v["wall_t"],
                    "soil": "sand_gravel",
                },
            },
            {
                "id": "bwall",
                "kind": "basement_wall",
                "area": v["perimeter"] * v["depth"],
                "assembly": {
                    "films": "none",
                    "layers": [{"name": "concrete", "r": 0.8 if ip else 0.14}],
                },
                "ground": {
                    "exposed_perimeter": v["perimeter"],
                    "depth": v["depth"],
                    "wall_thickness": v["wall_t"],
                    "soil": "clay_silt",
                },
            },
        ],  # fmt: skip
    }


def _import(client: TestClient, units: str) -> tuple[int, dict[str, Any]]:
    doc = _document(units)
    r = client.post("/api/v1/houses", json=doc)
    assert r.status_code == 201, r.text
    return int(r.json()["id"]), doc


def _version(client: TestClient, house_id: int) -> str:
    page = client.get(f"/houses/{house_id}").text
    return re.search(r'name="version" value="(\d+)"', page).group(1)  # type: ignore[union-attr]


def _post(client: TestClient, house_id: int, data: dict[str, str]) -> str:
    data = {"version": _version(client, house_id), **data}
    r = client.post(f"/houses/{house_id}/upgrades", data=data, follow_redirects=False)
    assert r.status_code == 303, r.text[-3000:]
    return r.headers["location"]


def _surface_ids(client: TestClient, house_id: int) -> dict[str, int]:
    """Surface slug -> row id, from the exported document's order and the envelope links."""
    page = client.get(f"/houses/{house_id}").text
    ids = [int(x) for x in dict.fromkeys(re.findall(rf"/houses/{house_id}/surfaces/(\d+)", page))]
    return dict(zip(["wall", "win", "slab", "bwall"], sorted(ids), strict=True))


# what each form is typed with, per unit system, and the document it must equal
TYPED = {
    "ip": {"added_r": "10", "edge_width": "2' 0\"", "edge_r": "10", "edge_thickness": "2",
           "u": "0.30", "shgc": "0.40", "supply_leak": "4", "supply_r": "8", "fixed": "1,200"},
    "si": {"added_r": "1,76", "edge_width": "0,6", "edge_r": "1,76", "edge_thickness": "50",
           "u": "1,7", "shgc": "0,40", "supply_leak": "4", "supply_r": "1,41", "fixed": "1200"},
}  # fmt: skip


def _hand_upgrades(units: str, doc: dict[str, Any]) -> list[dict[str, Any]]:
    """The same upgrades written as calc/house takes them (numbers as typed above)."""
    ip = units == "ip"
    wall = copy.deepcopy(doc["surfaces"][3]["assembly"])
    wall["layers"].append({"name": "interior insulation", "r": 10.0 if ip else 1.76})
    return [
        {"id": "inside", "kind": "assembly", "surface": "bwall", "assembly": wall,
         "cost": {"fixed": 1200.0, "per_area": 1.5}, "life_years": 30.0},
        # 2' 0" = 2 ft; 50 mm; 0,6 m (decimal comma in a metric house)
        {"id": "edge", "kind": "assembly", "surface": "slab",
         "ground": {"edge_insulation": {"orientation": "vertical", "width_or_depth": 2.0 if ip else 0.6,
                                        "r": 10.0 if ip else 1.76, "thickness": 2.0 if ip else 50.0}},
         "cost": {"fixed": 1200.0, "per_area": 0.0}, "life_years": 30.0},
        {"id": "glass", "kind": "window", "surface": "win", "u": 0.30 if ip else 1.7, "shgc": 0.40,
         "cost": {"fixed": 1200.0, "per_area": 20.0}, "life_years": 30.0},
        # 4 % of the fan flow is the fraction 0.04
        {"id": "seal", "kind": "duct_sealing", "supply_leakage_after": 0.04,
         "cost": {"fixed": 1200.0}, "life_years": 20.0},
        {"id": "wrap", "kind": "duct_insulation", "supply_r_after": 8.0 if ip else 1.41,
         "cost": {"fixed": 1200.0, "per_area": 1.0}, "life_years": 25.0},
    ]  # fmt: skip


@pytest.mark.parametrize("units", ["ip", "si"])
def test_each_kind_from_the_pages_computes_as_the_hand_written_document(
    client: TestClient, units: str
) -> None:
    house_id, doc = _import(client, units)
    ids = _surface_ids(client, house_id)
    t = TYPED[units]
    # interior insulation and slab edge from the basement wall's and slab's own Surface pages
    surface_page = client.get(f"/houses/{house_id}/surfaces/{ids['bwall']}").text
    assert "Insulate from inside for" in surface_page
    _post(client, house_id, {"kind": "interior_insulation", "surface_id": str(ids["bwall"]), "back": "surface",
                             "name": "inside", "added_r": t["added_r"], "cost_fixed": t["fixed"], "cost_per_area": "1.5"})  # fmt: skip
    assert (
        "Slab-edge insulation for" in client.get(f"/houses/{house_id}/surfaces/{ids['slab']}").text
    )
    _post(client, house_id, {"kind": "slab_edge", "surface_id": str(ids["slab"]), "back": "surface", "name": "edge",
                             "edge_orientation": "vertical", "edge_width": t["edge_width"], "edge_r": t["edge_r"],
                             "edge_thickness": t["edge_thickness"], "cost_fixed": t["fixed"]})  # fmt: skip
    # the window and the ducts from the House page's Upgrades card
    house_page = client.get(f"/houses/{house_id}").text
    assert "Replacement window" in house_page and "Duct sealing" in house_page
    glass_url = _post(client, house_id, {"kind": "window", "surface_id": str(ids["win"]), "name": "glass", "u": t["u"],
                             "shgc": t["shgc"], "cost_fixed": t["fixed"], "cost_per_area": "20"})  # fmt: skip
    _post(client, house_id, {"kind": "duct_sealing", "name": "seal", "supply_leakage_after": t["supply_leak"],
                             "return_leakage_after": "", "cost_fixed": t["fixed"]})  # fmt: skip
    _post(client, house_id, {"kind": "duct_insulation", "name": "wrap", "supply_r_after": t["supply_r"],
                             "cost_fixed": t["fixed"], "cost_per_area": "1"})  # fmt: skip
    r = client.post(f"/houses/{house_id}/packages", data={"version": _version(client, house_id), "name": "all",
                    "upgrades": ["inside", "edge", "glass", "seal", "wrap"]}, follow_redirects=False)  # fmt: skip
    assert r.status_code == 303, r.text[-2000:]

    exported = client.get(f"/api/v1/houses/{house_id}/document").json()
    full = {"upgrades_alone": "full"}  # each upgrade alone with every field (steps, surfaces)
    pages = client.post("/api/v1/calc/house", json={**exported, "detail": full}).json()
    hand = copy.deepcopy(doc)
    hand["detail"] = full
    hand["upgrades"] = _hand_upgrades(units, doc)
    hand["packages"] = [
        {"id": "all", "name": "all", "upgrades": ["inside", "edge", "glass", "seal", "wrap"]}
    ]
    api = client.post("/api/v1/calc/house", json=hand)
    assert api.status_code == 200, api.text
    expected = api.json()
    by_id = {u["id"]: u for u in pages["upgrades"]}
    for option in expected["upgrades"]:
        got = by_id[option["id"]]
        assert abs(got["annual_savings"] - option["annual_savings"]) < 1e-9, option["id"]
        assert abs(got["installed_cost"] - option["installed_cost"]) < 1e-9, option["id"]
        assert got["annual_savings"] > 0, option["id"]
    (package,) = pages["packages"]
    assert abs(package["annual_savings"] - expected["packages"][0]["annual_savings"]) < 1e-9
    assert abs(package["npv"] - expected["packages"][0]["npv"]) < 1e-9

    # hand-worked: the window's UA falls by A × (U found − U after), b = 1 outdoors:
    # ip 150 ft² × (0.50 − 0.30) = 30 Btu/(h·°F); si 14 m² × (2.8 − 1.7) = 15.4 W/K
    (step,) = by_id["glass"]["steps"]
    want = 30.0 if units == "ip" else 15.4
    assert abs(step["ua_reduction"] - want) < 1e-9 * want
    # installed: 1,200 + 20 × area (ip 1,200 + 3,000 = 4,200; si 1,200 + 280 = 1,480)
    assert by_id["glass"]["installed_cost"] == (4200.0 if units == "ip" else 1480.0)
    # duct insulation is priced per duct area wrapped: the supply side only
    assert by_id["wrap"]["installed_cost"] == 1200.0 + (300.0 if units == "ip" else 28.0)
    stored = {u["id"]: u for u in exported["upgrades"]}
    assert stored["seal"]["supply_leakage_after"] == 0.04  # 4 % stored as the fraction
    assert stored["edge"]["kind"] == "assembly" and stored["edge"].get("assembly") is None

    # the Upgrade page shows the same figure, computed by the same code
    page = client.get(glass_url).text
    saved = by_id["glass"]["annual_savings"]
    assert f"${saved:,.0f}" in page and "What it does" in page
    assert ("0.500 → 0.300" if units == "ip" else "2.80 → 1.70") in page


def test_bad_input_is_refused_with_the_text_kept(client: TestClient) -> None:
    house_id, _ = _import(client, "ip")
    ids = _surface_ids(client, house_id)
    data = {"version": _version(client, house_id), "kind": "window", "surface_id": str(ids["win"]),
            "u": "0,3", "shgc": "1.4", "cost_fixed": "100"}  # fmt: skip
    r = client.post(f"/houses/{house_id}/upgrades", data=data)
    assert r.status_code == 422
    assert 'value="0,3"' in r.text and 'value="1.4"' in r.text
    assert "did you mean" in r.text  # a decimal comma in a US-units house is a question
    assert 'aria-describedby="k-window-shgc-err"' in r.text and 'id="k-window-shgc-err"' in r.text
    # duct sealing to more than the as-found leakage (10 %), from the House page
    data = {
        "version": _version(client, house_id),
        "kind": "duct_sealing",
        "supply_leakage_after": "12",
    }
    r = client.post(f"/houses/{house_id}/upgrades", data=data)
    assert r.status_code == 422 and "below the as-found 10 %" in r.text and 'value="12"' in r.text
    # on a Surface page the page itself comes back, the message beside the field
    data = {"version": _version(client, house_id), "kind": "interior_insulation", "back": "surface",
            "surface_id": str(ids["bwall"]), "added_r": "lots"}  # fmt: skip
    r = client.post(f"/houses/{house_id}/upgrades", data=data)
    assert r.status_code == 422 and 'value="lots"' in r.text and "is not a number" in r.text
    assert "Upgrades for this surface" in r.text
    # a window upgrade on the slab is refused
    data = {"version": _version(client, house_id), "kind": "window", "surface_id": str(ids["slab"]),
            "u": "0.3", "shgc": "0.4"}  # fmt: skip
    r = client.post(f"/houses/{house_id}/upgrades", data=data)
    assert r.status_code == 422 and "goes on a window" in r.text
    assert client.get(f"/api/v1/houses/{house_id}/document").json()["upgrades"] == []


def test_a_stale_version_is_a_conflict_with_the_text_kept(client: TestClient) -> None:
    house_id, _ = _import(client, "si")
    old = _version(client, house_id)
    _post(client, house_id, {"kind": "duct_sealing", "supply_leakage_after": "5"})
    data = {"version": old, "kind": "duct_insulation", "supply_r_after": "1,5", "cost_fixed": "300"}
    r = client.post(f"/houses/{house_id}/upgrades", data=data)
    assert r.status_code == 409 and "Someone else saved" in r.text and 'value="1,5"' in r.text
    # the Upgrade page's edit of the new fields is checked against the version too
    doc = client.get(f"/api/v1/houses/{house_id}/document").json()
    assert [u["id"] for u in doc["upgrades"]] == ["duct-sealing"]
    page = client.get(f"/houses/{house_id}").text
    url = re.search(rf'href="(/houses/{house_id}/upgrades/\d+)"', page).group(1)  # type: ignore[union-attr]
    edit = {"name": "Seal", "supply_leakage_after": "3", "return_leakage_after": "2", "cost_fixed": "500",
            "rebate": "0", "life_years": "20"}  # fmt: skip
    r = client.post(url, data={**edit, "version": old})
    assert r.status_code == 409 and 'value="3"' in r.text
    r = client.post(
        url, data={**edit, "version": _version(client, house_id)}, follow_redirects=False
    )
    assert r.status_code == 303
    (stored,) = client.get(f"/api/v1/houses/{house_id}/document").json()["upgrades"]
    assert stored["supply_leakage_after"] == 0.03 and stored["return_leakage_after"] == 0.02
    assert stored["cost"]["fixed"] == 500.0
    page = client.get(url).text
    assert 'value="3"' in page and "Duct distribution efficiency" in page
    # a leakage cleared is no longer changed by the upgrade (blank = unchanged)
    edit = {**edit, "return_leakage_after": "", "version": _version(client, house_id)}
    assert client.post(url, data=edit, follow_redirects=False).status_code == 303
    (stored,) = client.get(f"/api/v1/houses/{house_id}/document").json()["upgrades"]
    assert stored.get("return_leakage_after") is None and stored["supply_leakage_after"] == 0.03


def test_pipe_jacket_emissivity_is_edited_on_the_upgrade_page(client: TestClient) -> None:
    house_id, doc = _import(client, "ip")
    pipe = {"name": "Hot water", "length": "40", "pipe_outer_diameter": "7/8", "fluid_temperature": "130",
            "ambient_temperature": "55", "hours_per_year": "3000", "thickness": "", "conductivity": "",
            "version": _version(client, house_id)}  # fmt: skip
    run = client.post(f"/houses/{house_id}/pipes", data=pipe, follow_redirects=False).headers[
        "location"
    ]
    run_id = run.rsplit("/", 1)[1]
    data = {
        "name": "Sleeves",
        "thickness": "3/4",
        "conductivity": "0.25",
        "version": _version(client, house_id),
    }
    url = client.post(
        f"/houses/{house_id}/pipes/{run_id}/insulate", data=data, follow_redirects=False
    ).headers["location"]
    page = client.get(url).text
    assert "Jacket emissivity" in page and "Pipe heat loss" in page
    edit = {"name": "Sleeves", "emissivity": "0.1", "cost_fixed": "80", "cost_per_area": "2", "rebate": "0",
            "life_years": "20", "version": _version(client, house_id)}  # fmt: skip
    assert client.post(url, data=edit, follow_redirects=False).status_code == 303
    exported = client.get(f"/api/v1/houses/{house_id}/document").json()
    (stored,) = exported["upgrades"]
    assert stored["emissivity"] == 0.1 and stored["cost"] == {
        "fixed": 80.0,
        "per_area": 0.0,
        "per_length": 2.0,
    }
    # the same upgrade by hand, and with the default jacket (0.9): a shiny jacket radiates less,
    # so it saves more (the surface's radiation is ε σ (T_s⁴ − T_a⁴), Stefan–Boltzmann)
    hand = {**exported, "detail": {"upgrades_alone": "full"}}
    shiny = client.post("/api/v1/calc/house", json=hand).json()["upgrades"][0]["annual_savings"]
    hand["upgrades"] = [{k: v for k, v in stored.items() if k != "emissivity"}]
    plain = client.post("/api/v1/calc/house", json=hand).json()["upgrades"][0]["annual_savings"]
    assert shiny > plain > 0
    bad = {**edit, "emissivity": "1.5", "version": _version(client, house_id)}
    r = client.post(url, data=bad)
    assert r.status_code == 422 and 'value="1.5"' in r.text and 'id="u-emissivity-err"' in r.text
