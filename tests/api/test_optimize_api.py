"""POST /api/v1/calc/house with ``optimize``: best, frontier and optimization, and the 422s.

On API.md's house (attic-r49: 300 + 1.20 × 1000 − 200 = 1,300 net; air-seal: 900 net) the four
allowed sets are known by hand, so the best for each budget is checked against the package
and single-upgrade figures the same request returns.
"""

from __future__ import annotations

import copy

from fastapi.testclient import TestClient

from server.app import create_app
from server.config import Settings
from tests.api.test_house_api import DOC_IP

client = TestClient(create_app(Settings(environment="test", database_url="sqlite://")))
URL = "/api/v1/calc/house"


def post(optimize: dict | None) -> dict:
    doc = copy.deepcopy(DOC_IP)
    if optimize is not None:
        doc["optimize"] = optimize
    response = client.post(URL, json=doc)
    assert response.status_code == 200, response.text
    return response.json()


def test_without_optimize_nothing_is_added() -> None:
    body = post(None)
    assert body["best"] is None and body["frontier"] is None and body["optimization"] is None


def test_best_for_a_large_budget_is_the_package_of_both() -> None:
    body = post({"budget": 9000, "objective": "npv"})
    package = body["packages"][0]  # attic-and-sealing: both upgrades, net 1300 + 900 = 2200
    best = body["best"]
    assert sorted(best["upgrades"]) == ["air-seal", "attic-r49"]
    assert best["net_cost"] == 2200.0
    for key in ("npv", "annual_savings", "sir", "co2", "total_cost", "ua", "heating_fuel"):
        assert abs(best[key] - package[key]) <= 1e-9 * abs(package[key]), key
    info = body["optimization"]
    assert info["exact"] and info["method"] == "milp" and info["sets"] == 4
    assert abs(info["objective_value"] - package["npv"]) <= 1e-9 * package["npv"]


def test_a_budget_of_1000_buys_only_the_air_sealing() -> None:
    # 900 <= 1000 < 1300: air sealing alone is the only paid set within the budget
    body = post({"budget": 1000, "objective": "annual_savings"})
    alone = {u["id"]: u for u in body["upgrades"]}["air-seal"]
    assert body["best"]["upgrades"] == ["air-seal"]
    assert (
        abs(body["best"]["annual_savings"] - alone["annual_savings"])
        <= 1e-9 * alone["annual_savings"]
    )


def test_budget_zero_is_no_upgrade() -> None:
    body = post({"budget": 0, "objective": "co2"})
    assert body["best"] is None
    assert body["optimization"]["best_is_no_upgrade"] is True
    assert body["optimization"]["objective_value"] == 0.0
    assert any("no upgrade" in w for w in body["optimization"]["warnings"])


def test_frontier_ascends_and_no_point_is_beaten() -> None:
    body = post({"budget": None, "objective": "npv"})
    frontier = body["frontier"]
    costs = [p["net_cost"] for p in frontier]
    values = [p["objective_value"] for p in frontier]
    assert costs == sorted(costs) and values == sorted(values)
    assert frontier[0]["upgrades"] == [] and frontier[0]["net_cost"] == 0.0
    # net costs 0 < 900 < 1300 < 2200 and each dearer set has the higher NPV: all four sets
    # are on it (upgrades in document order)
    assert [p["upgrades"] for p in frontier] == [
        [],
        ["air-seal"],
        ["attic-r49"],
        ["attic-r49", "air-seal"],
    ]
    alone = {u["id"]: u for u in body["upgrades"]}
    for point in frontier:
        if point["upgrades"] == ["air-seal"]:
            assert abs(point["npv"] - alone["air-seal"]["npv"]) <= 1e-9 * abs(
                alone["air-seal"]["npv"]
            )


def _errors(raw: str) -> list[str]:
    response = client.post(URL, content=raw, headers={"content-type": "application/json"})
    assert response.status_code == 422, response.text
    return [e["field"] for e in response.json()["errors"]]


def test_bad_budget_and_objective_are_422_naming_the_field() -> None:
    import json

    base = copy.deepcopy(DOC_IP)
    for optimize, field in (
        ({"budget": -1}, "optimize.budget"),
        ({"budget": 100, "objective": "cheapest"}, "optimize.objective"),
    ):
        base["optimize"] = optimize
        assert any(f.endswith(field) for f in _errors(json.dumps(base))), field
    base["optimize"] = {"budget": 1}
    text = json.dumps(base).replace('"budget": 1', '"budget": 1e999')  # infinity
    assert any(f.endswith("optimize.budget") for f in _errors(text))
    text = json.dumps(base).replace('"budget": 1', '"budget": NaN')
    assert any(f.endswith("optimize.budget") for f in _errors(text))
