"""POST /api/v1/calc/house: the API.md example with real layers, in ip and si, and its 422s."""

from __future__ import annotations

import copy
import json
import math

import numpy_financial as npf
import pint
import pytest
from fastapi.testclient import TestClient

from server.app import create_app
from server.config import Settings
from server.services.convert import convert_assembly
from tests.utils.examples import API_WALL_IP

client = TestClient(create_app(Settings(environment="test", database_url="sqlite://")))
URL = "/api/v1/calc/house"
Q = pint.UnitRegistry().Quantity

JOIST_BAY = {
    "name": "joist bay, R-11 batts",
    "thickness": 3.5,
    "cavity": {"r": 11.0},
    "framing": {"conductivity": 0.80, "fraction": 0.10},
}
DRYWALL = {"name": "drywall", "thickness": 0.5, "material": "gypsum-board"}
ATTIC = {"heat_flow": "up", "films": "ashrae", "layers": [JOIST_BAY, DRYWALL]}
ATTIC_R49 = {
    "heat_flow": "up",
    "films": "ashrae",
    "layers": [
        {"name": "blown cellulose", "thickness": 10.5, "material": "cellulose-loose-fill"},
        JOIST_BAY,
        DRYWALL,
    ],
}
WALL = {
    k: v for k, v in copy.deepcopy(API_WALL_IP).items() if k != "units"
}  # API.md's example (r_parallel_path 11.85)
DOC_IP = {
    "units": "ip",
    "climate": {"hdd": 5400, "cdd": 900, "heating_base": 65, "cooling_base": 65},
    "heating": {"fuel": "natural_gas", "efficiency": 0.80, "price": 1.45},
    "cooling": {"seer": 13, "electricity_price": 0.16},
    "air_leakage": {"cfm50": 3200, "n_factor": 18, "volume": 12000},
    "surfaces": [
        {"id": "attic", "kind": "ceiling", "area": 1000, "assembly": ATTIC},
        {"id": "walls", "kind": "wall", "area": 1400, "assembly": WALL},
    ],
    "upgrades": [
        {
            "id": "attic-r49",
            "surface": "attic",
            "assembly": ATTIC_R49,
            "cost": {"fixed": 300, "per_area": 1.20},
            "rebate": 200,
            "life_years": 30,
        },
        {
            "id": "air-seal",
            "kind": "air_sealing",
            "cfm50_after": 2200,
            "cost": {"fixed": 900},
            "life_years": 20,
        },
    ],
    "packages": [{"id": "attic-and-sealing", "upgrades": ["attic-r49", "air-seal"]}],
    "economics": {
        "discount_rate": 0.03,
        "fuel_escalation": 0.02,
        "years": 20,
        "loan": {"apr": 0.06, "years": 10},
    },
}

# pint conversions for the si twin of the document
FT2_M2 = Q(1, "ft**2").to("m**2").magnitude
FT3_M3 = Q(1, "ft**3").to("m**3").magnitude
UA_IP_W_K = Q(1, "Btu_it/hr/delta_degF").to("W/K").magnitude  # 0.527528
KWH_BTU = Q(1, "kWh").to("Btu_it").magnitude  # 3412.14


def si_document() -> dict:
    """The same house in si: areas m², volume m³, K·day, layers in mm and W/(m·K)."""
    doc = copy.deepcopy(DOC_IP)
    doc["units"] = "si"
    doc["climate"] = {"hdd": 5400 / 1.8, "cdd": 900 / 1.8}
    doc["air_leakage"]["volume"] = 12000 * FT3_M3  # cfm50 stays ft³/min by its name
    for surface in doc["surfaces"]:
        surface["area"] *= FT2_M2
        surface["assembly"] = convert_assembly(surface["assembly"], "ip", "si")
    doc["upgrades"][0]["assembly"] = convert_assembly(ATTIC_R49, "ip", "si")
    doc["upgrades"][0]["cost"]["per_area"] = 1.20 / FT2_M2  # $/m² for the same price
    return doc


@pytest.fixture(scope="module")
def ip_result() -> dict:
    response = client.post(URL, json=DOC_IP)
    assert response.status_code == 200, response.text
    return response.json()


@pytest.fixture(scope="module")
def si_result() -> dict:
    response = client.post(URL, json=si_document())
    assert response.status_code == 200, response.text
    return response.json()


def assembly_u(assembly: dict) -> float:
    response = client.post("/api/v1/calc/assembly", json={"units": "ip", **assembly})
    assert response.status_code == 200
    return response.json()["u_factor"]


def test_as_found_ip(ip_result):
    found = ip_result["as_found"]
    # Infiltration by hand: 0.018 × (3200 × 60 / 12000 / 18) × 12000 = 192 Btu/(h·°F).
    assert found["ua_infiltration"] == pytest.approx(192.0, rel=1e-9)
    # The wall is API.md's assembly example: R 11.85 by parallel path.
    walls = next(s for s in found["surfaces"] if s["id"] == "walls")
    assert walls["r"] == pytest.approx(11.85, abs=0.01)
    # Each surface's UA = area × U of the assembly calculator (one code path).
    assert found["ua_by_surface"]["attic"] == pytest.approx(1000 * assembly_u(ATTIC), rel=1e-9)
    assert found["ua_by_surface"]["walls"] == pytest.approx(1400 * assembly_u(WALL), rel=1e-9)
    ua = found["ua"]
    assert ua == pytest.approx(sum(found["ua_by_surface"].values()) + 192.0, rel=1e-12)
    # Degree-day arithmetic: load = UA × 5400 × 24; gas = load / (0.80 × 100,000); × $1.45.
    assert found["heating_load"] == pytest.approx(ua * 5400 * 24, rel=1e-9)
    assert found["heating_fuel"] == pytest.approx(ua * 5400 * 24 / 80_000, rel=1e-9)
    assert found["heating_fuel_unit"] == "therm"
    assert found["heating_cost"] == pytest.approx(found["heating_fuel"] * 1.45, rel=1e-12)
    # Cooling: kWh = UA × 900 × 24 / (13 × 1000); × $0.16.
    assert found["cooling_electricity"] == pytest.approx(ua * 900 * 24 / 13_000, rel=1e-9)
    assert found["cooling_cost"] == pytest.approx(found["cooling_electricity"] * 0.16, rel=1e-12)
    assert found["ach50"] == pytest.approx(16.0, rel=1e-12)  # 3200 × 60 / 12000


def test_package_ip(ip_result):
    found = ip_result["as_found"]
    (package,) = ip_result["packages"]
    alone = {o["id"]: o for o in ip_result["upgrades"]}
    s = package["annual_savings"]
    assert s == pytest.approx(found["total_cost"] - package["total_cost"], rel=1e-12)
    # Air sealing by hand: UA falls by 0.018 × 1000 × 60 / 18 = 60 Btu/(h·°F).
    assert found["ua_infiltration"] - package["ua_infiltration"] == pytest.approx(60.0, 1e-9)
    # Degree-day method: separate measures add up exactly (see house_model's docstring).
    singles = alone["attic-r49"]["annual_savings"] + alone["air-seal"]["annual_savings"]
    assert s == pytest.approx(singles, rel=1e-9)
    assert [step["upgrade"] for step in package["steps"]] == ["attic-r49", "air-seal"]
    assert sum(step["annual_savings"] for step in package["steps"]) == pytest.approx(s, 1e-12)
    # Money by hand: installed 300 + 1.20 × 1000 + 900 = 2400; rebate 200; net 2200.
    assert package["installed_cost"] == pytest.approx(2400.0, rel=1e-12)
    assert package["net_cost"] == pytest.approx(2200.0, rel=1e-12)
    assert package["simple_payback_years"] == pytest.approx(2200.0 / s, rel=1e-12)
    assert package["monthly_savings"] == pytest.approx(s / 12, rel=1e-12)
    # numpy-financial: pmt(0.06/12, 120, -2200) and npv(0.03, [-2200, s·1.02, s·1.02², ...])
    # (NIST Handbook 135: prices escalate from the base date, year t saves s·(1+e)^t).
    assert package["monthly_loan_payment"] == pytest.approx(npf.pmt(0.005, 120, -2200), 1e-9)
    values = [-2200.0] + [s * 1.02**t for t in range(1, 21)]
    assert package["npv"] == pytest.approx(npf.npv(0.03, values), rel=1e-9)
    assert package["sir"] == pytest.approx((package["npv"] + 2200) / 2200, rel=1e-12)
    flow = package["cash_flow"]
    assert flow["years"] == list(range(21)) and flow["chart"] == "cumulative_discounted"
    assert flow["cumulative"][0] == pytest.approx(-2200.0)
    assert flow["cumulative_discounted"][-1] == pytest.approx(package["npv"], rel=1e-9)
    assert package["co2_avoided"] == pytest.approx(found["co2"] - package["co2"], rel=1e-12)


def test_si_twin_gives_the_same_house(ip_result, si_result):
    assert si_result["units"] == "si"
    ip_found, si_found = ip_result["as_found"], si_result["as_found"]
    # pint: 1 Btu/(h·°F) = 0.527528 W/K; 1 kWh = 3412.14 Btu.
    assert si_found["ua"] == pytest.approx(ip_found["ua"] * UA_IP_W_K, rel=1e-6)
    assert si_found["ua_infiltration"] == pytest.approx(192.0 * UA_IP_W_K, rel=1e-6)
    assert si_found["heating_load"] == pytest.approx(ip_found["heating_load"] / KWH_BTU, 1e-6)
    for key in ("heating_fuel", "heating_cost", "cooling_electricity", "total_cost", "co2"):
        assert si_found[key] == pytest.approx(ip_found[key], rel=1e-6), key
    ip_package, si_package = ip_result["packages"][0], si_result["packages"][0]
    for key in ("annual_savings", "installed_cost", "net_cost", "npv", "monthly_loan_payment"):
        assert si_package[key] == pytest.approx(ip_package[key], rel=1e-6), key
    assert si_result["fuel"]["energy_per_unit"] == pytest.approx(100_000 / KWH_BTU, rel=1e-9)


def test_result_carries_sources_and_assumptions(ip_result):
    fuel = ip_result["fuel"]
    assert fuel["unit"] == "therm" and fuel["energy_per_unit"] == pytest.approx(100_000, 1e-9)
    assert "EPA" in fuel["co2_source"]
    assert ip_result["step_order"].startswith("listed")
    assert any("Degree-day" in line for line in ip_result["assumptions"])


def test_pipe_run_and_pipe_insulation():
    doc = copy.deepcopy(DOC_IP)
    pipe = {
        "pipe_outer_diameter": 0.875,
        "layers": [],
        "fluid_temperature": 130,
        "ambient_temperature": 55,
        "surface_coefficient": 1.5,
    }
    doc["surfaces"].append(
        {"id": "dhw", "kind": "pipe_run", "length": 40, "pipe": pipe, "hours_per_year": 2000}
    )
    doc["upgrades"].append(
        {
            "id": "wrap",
            "surface": "dhw",
            "pipe_layers": [{"thickness": 0.75, "conductivity": 0.25}],
            "cost": {"fixed": 20, "per_length": 2.5},
        }
    )
    response = client.post(
        URL, json={**doc, "detail": {"upgrades_alone": "full"}}
    )  # every field of each upgrade alone
    assert response.status_code == 200, response.text
    result = response.json()
    # The pipe calculator's own heat loss for the same run, × 2000 h, is the annual loss.
    single = client.post(
        "/api/v1/calc/pipe", json={"units": "ip", **pipe, "length": 40, "hours_per_year": 2000}
    ).json()
    found = result["as_found"]
    assert found["pipe_loss"] == pytest.approx(single["annual_loss"], rel=1e-9)
    assert found["pipe_loss"] == pytest.approx(single["heat_loss"] * 2000, rel=1e-9)
    # Bought at the furnace: extra gas = loss / (0.80 × 100,000 Btu/therm).
    envelope_gas = found["heating_load"] / 80_000
    assert found["heating_fuel"] - envelope_gas == pytest.approx(found["pipe_loss"] / 80_000, 1e-9)
    wrap = next(o for o in result["upgrades"] if o["id"] == "wrap")
    assert wrap["installed_cost"] == pytest.approx(20 + 2.5 * 40, rel=1e-12)  # 120
    assert wrap["annual_savings"] > 0 and wrap["pipe_loss"] < found["pipe_loss"]


def test_direct_r_and_u_entry():
    # Quick entry: R-11 ceiling and a U-0.30 window: UA = 1000/11 + 200 × 0.30 = 150.909.
    doc = copy.deepcopy(DOC_IP)
    doc["surfaces"] = [
        {"id": "attic", "kind": "ceiling", "area": 1000, "r": 11},
        {"id": "windows", "kind": "window", "area": 200, "u": 0.30},
    ]
    doc["upgrades"][0] = {"id": "attic-r49", "surface": "attic", "r": 49, "cost": {"fixed": 1}}
    response = client.post(URL, json=doc)
    assert response.status_code == 200, response.text
    assert response.json()["as_found"]["ua_envelope"] == pytest.approx(150.90909, rel=1e-6)


def test_n50_instead_of_cfm50():
    # n50 = 16 /h in 12000 ft³ is 3200 CFM50: the same infiltration UA (192).
    doc = copy.deepcopy(DOC_IP)
    doc["air_leakage"] = {"n50": 16, "n_factor": 18, "volume": 12000}
    doc["upgrades"][1] = {"id": "air-seal", "n50_after": 11, "cost": {"fixed": 900}}
    response = client.post(URL, json=doc)
    assert response.status_code == 200, response.text
    result = response.json()
    assert result["as_found"]["ua_infiltration"] == pytest.approx(192.0, rel=1e-9)
    assert result["packages"][0]["cfm50"] == pytest.approx(2200.0, rel=1e-9)


def test_warnings_not_errors():
    doc = copy.deepcopy(DOC_IP)
    doc["air_leakage"].pop("n_factor")
    doc["upgrades"][1]["cfm50_after"] = 3200
    doc["upgrades"][1]["life_years"] = 10
    doc["upgrades"][0]["rebate"] = 5000
    result = client.post(URL, json=doc).json()
    text = " ".join(result["warnings"])
    assert "N = 18 assumed" in text and "equals the as-found leakage" in text
    package_text = " ".join(result["packages"][0]["warnings"])
    assert "less than the 20-year study period" in package_text
    assert "rebates are larger" in package_text


# --- 422s --------------------------------------------------------------------------------------


def mutated(change) -> dict:
    doc = copy.deepcopy(DOC_IP)
    change(doc)
    return doc


def set_path(doc, path, value):
    *head, last = path
    holder = doc
    for key in head:
        holder = holder[key]
    holder[last] = value


BAD = [
    ("missing hdd", lambda d: d["climate"].pop("hdd"), "climate.hdd"),
    (
        "gas efficiency above 1",
        lambda d: set_path(d, ["heating", "efficiency"], 2.5),
        "heating.efficiency",
    ),
    (
        "efficiency as percent",
        lambda d: set_path(d, ["heating", "efficiency"], 80),
        "heating.efficiency",
    ),
    ("zero efficiency", lambda d: set_path(d, ["heating", "efficiency"], 0), "heating.efficiency"),
    ("negative price", lambda d: set_path(d, ["heating", "price"], -1), "heating.price"),
    ("unknown fuel", lambda d: set_path(d, ["heating", "fuel"], "coal"), "heating.fuel"),
    ("zero area", lambda d: set_path(d, ["surfaces", 0, "area"], 0), "surfaces[0].area"),
    ("both r and u", lambda d: d["surfaces"][0].update(r=11), "surfaces[0]"),
    (
        "negative layer thickness",
        lambda d: set_path(d, ["surfaces", 1, "assembly", "layers", 3, "thickness"], -0.5),
        "surfaces[1].assembly.layers[3].thickness",
    ),
    (
        "unknown material",
        lambda d: set_path(d, ["surfaces", 0, "assembly", "layers", 1, "material"], "unobtainium"),
        "surfaces[0].assembly.layers[1].material",
    ),
    (
        "unknown surface",
        lambda d: set_path(d, ["upgrades", 0, "surface"], "roof"),
        "upgrades[0].surface",
    ),
    (
        "unknown upgrade in package",
        lambda d: d["packages"][0]["upgrades"].append("nope"),
        "packages[0].upgrades[2]",
    ),
    (
        "same surface twice",
        lambda d: (
            d["upgrades"].append({"id": "attic-r38", "surface": "attic", "r": 38}),
            d["packages"][0]["upgrades"].append("attic-r38"),
        ),
        "packages[0].upgrades[2]",
    ),
    (
        "upgrade listed twice",
        lambda d: d["packages"][0]["upgrades"].append("air-seal"),
        "packages[0].upgrades[2]",
    ),
    (
        "sealing target above as found",
        lambda d: set_path(d, ["upgrades", 1, "cfm50_after"], 3500),
        "upgrades[1].cfm50_after",
    ),
    ("sealing without leakage", lambda d: d.pop("air_leakage"), "upgrades[1]"),
    (
        "air sealing priced per area",
        lambda d: set_path(d, ["upgrades", 1, "cost", "per_area"], 1.0),
        "upgrades[1]",
    ),
    (
        "duplicate surface id",
        lambda d: set_path(d, ["surfaces", 1, "id"], "attic"),
        "surfaces[1].id",
    ),
    ("seer and cop", lambda d: d["cooling"].update(cop=3.0), "cooling"),
    (
        "discount rate -1",
        lambda d: set_path(d, ["economics", "discount_rate"], -1),
        "economics.discount_rate",
    ),
    ("years 0", lambda d: set_path(d, ["economics", "years"], 0), "economics.years"),
    ("extra field", lambda d: d.update(colour="blue"), "colour"),
    ("no surfaces", lambda d: set_path(d, ["surfaces"], []), "surfaces"),
]


@pytest.mark.parametrize(("label", "change", "field"), BAD, ids=[b[0] for b in BAD])
def test_bad_input_is_a_422_naming_the_field(label, change, field):
    response = client.post(URL, json=mutated(change))
    assert response.status_code == 422, (label, response.text)
    body = response.json()
    assert body["detail"] and isinstance(body["errors"], list)
    assert field in [e["field"] for e in body["errors"]], body
    assert all(e["message"] for e in body["errors"])


@pytest.mark.parametrize("token", ["NaN", "Infinity", "-Infinity"])
def test_nan_and_infinity_refused(token):
    text = json.dumps(DOC_IP).replace('"price": 1.45', f'"price": {token}')
    response = client.post(URL, content=text, headers={"content-type": "application/json"})
    assert response.status_code == 422
    assert response.json()["errors"][0]["field"] == "heating.price"


NUMBER_PATHS = [
    ["climate", "hdd"],
    ["heating", "efficiency"],
    ["heating", "price"],
    ["cooling", "seer"],
    ["air_leakage", "cfm50"],
    ["air_leakage", "volume"],
    ["air_leakage", "n_factor"],
    ["surfaces", 0, "area"],
    ["surfaces", 1, "assembly", "layers", 0, "r"],
    ["surfaces", 1, "assembly", "layers", 2, "framing", "fraction"],
    ["upgrades", 0, "cost", "per_area"],
    ["upgrades", 0, "rebate"],
    ["upgrades", 1, "cfm50_after"],
    ["economics", "discount_rate"],
    ["economics", "fuel_escalation"],
    ["economics", "loan", "apr"],
]


@pytest.mark.parametrize("path", NUMBER_PATHS, ids=[".".join(map(str, p)) for p in NUMBER_PATHS])
@pytest.mark.parametrize("value", [0, -1, 1e-300, 1e300, 0.999999, "x", None])
def test_never_a_500(path, value):
    # Edge values of every kind land as 200 or a plain 422, never a server error.
    response = client.post(URL, json=mutated(lambda d: set_path(d, path, value)))
    assert response.status_code in (200, 422), response.text
    if response.status_code == 200:
        assert all(math.isfinite(x) for x in _numbers(response.json()) if isinstance(x, float))
    else:
        assert response.json()["errors"][0]["field"]


def _numbers(value):
    if isinstance(value, dict):
        for item in value.values():
            yield from _numbers(item)
    elif isinstance(value, list):
        for item in value:
            yield from _numbers(item)
    else:
        yield value


def test_absurd_layer_r_is_a_422_not_a_500():
    # Two layers of R 1e308 each: finite in, an R beyond floating point out -> 422.
    layers = [{"name": "a", "r": 1e308}, {"name": "b", "r": 1e308}]
    doc = mutated(
        lambda d: set_path(
            d, ["surfaces", 0, "assembly"], {"heat_flow": "up", "films": "none", "layers": layers}
        )
    )
    response = client.post(URL, json=doc)
    assert response.status_code == 422
    assert response.json()["errors"][0]["message"]
