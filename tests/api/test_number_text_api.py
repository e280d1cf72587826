"""The API reads numbers sent as JSON strings by the forms' rules, and refuses infinite totals."""

from __future__ import annotations

import pytest
from fastapi.testclient import TestClient


def _assembly(units: str, *rs: object) -> dict:  # type: ignore[type-arg]
    return {
        "units": units,
        "films": "none",
        "layers": [{"name": f"l{i}", "r": r} for i, r in enumerate(rs)],
    }


def test_two_layers_of_r_1e308_are_a_422_not_a_null_total(client: TestClient) -> None:
    # R 1e308 h·ft²·°F/Btu is 1.76e307 m²·K/W, so the SI sum (3.5e307) is finite but the total
    # back in US units overflows a double (max ≈ 1.798e308): there is no number to answer
    r = client.post("/api/v1/calc/assembly", json=_assembly("ip", 1e308, 1e308))
    assert r.status_code == 422, r.text
    problem = r.json()["errors"][0]
    assert problem["field"] == "layers[0].r" and "too large to compute" in problem["message"]
    # in SI the sum itself overflows; the physics refuses it
    r = client.post("/api/v1/calc/assembly", json=_assembly("si", 1e308, 1e308))
    assert r.status_code == 422 and r.json()["errors"][0]["field"].startswith("layers")
    assert "too large to compute" in r.json()["errors"][0]["message"]


def test_one_layer_of_r_1e308_in_us_units_still_computes(client: TestClient) -> None:
    # R 1e308 h·ft²·°F/Btu = 1.76e307 m²·K/W: finite in both unit systems (films "none")
    r = client.post("/api/v1/calc/assembly", json=_assembly("ip", 1e308))
    assert r.status_code == 200 and r.json()["r_total"] == pytest.approx(1e308, rel=1e-12)


@pytest.mark.parametrize(
    ("units", "text", "r_total"),
    [("ip", "12,000", 12000.0), ("ip", "1,234,567.5", 1234567.5), ("si", "1,5", 1.5),
     ("si", "2.5", 2.5)],
)  # fmt: skip
def test_number_strings_read_like_the_forms(
    client: TestClient, units: str, text: str, r_total: float
) -> None:
    r = client.post("/api/v1/calc/assembly", json=_assembly(units, text))
    assert r.status_code == 200, r.text
    assert r.json()["r_total"] == pytest.approx(r_total, rel=1e-12)


@pytest.mark.parametrize(
    ("units", "text", "message"),
    [("ip", "1,5", "did you mean 1.5 or 15?"), ("si", "1,000", "did you mean 1.000 or 1000?"),
     ("ip", "1.234,5", "mixes a dot and a comma"), ("ip", "1_000", "is not a number"),
     ("ip", "²", "is not a number"), ("si", "NaN", "finite")],
)  # fmt: skip
def test_number_strings_refused_like_the_forms(
    client: TestClient, units: str, text: str, message: str
) -> None:
    r = client.post("/api/v1/calc/assembly", json=_assembly(units, text))
    assert r.status_code == 422, r.text
    problem = r.json()["errors"][0]
    assert problem["field"] == "layers[0].r" and message in problem["message"]
