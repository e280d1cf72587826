"""calc/house: design heat loss, capacity ratio, and wood's biogenic CO2 apart from fossil CO2.

The house is the API.md example of tests/api/test_house_api.py; the design loss is checked by
hand from the UA the same response reports, and the SI twin against pint's conversion of the
IP figure.
"""

from __future__ import annotations

import copy

import pint
import pytest

from tests.api.test_house_api import DOC_IP, URL, client, si_document

Q = pint.UnitRegistry().Quantity


def _post(doc: dict) -> dict:
    response = client.post(URL, json=doc)
    assert response.status_code == 200, response.text
    return response.json()


def _with_design(doc: dict, design: float, indoor: float | None, capacity: float | None) -> dict:
    doc = copy.deepcopy(doc)
    doc["climate"]["heating_design_temperature"] = design
    if indoor is not None:
        doc["climate"]["indoor_design_temperature"] = indoor
    if capacity is not None:
        doc["heating"]["output_capacity"] = capacity
    return doc


def test_without_a_design_temperature_nothing_is_reported():
    result = _post(DOC_IP)
    assert result["as_found"]["design_heat_loss"] is None
    assert result["as_found"]["capacity_ratio"] is None


def test_design_heat_loss_is_ua_times_the_design_difference_by_hand():
    # Q_design = UA · (T_indoor − T_design) (ASHRAE Handbook—Fundamentals, design heat loss):
    # indoor 70 °F by default, design 5 °F → ΔT = 65 °F.
    result = _post(_with_design(DOC_IP, 5.0, None, 80000.0))
    for variant in [result["as_found"], *result["packages"]]:
        assert variant["design_heat_loss"] == pytest.approx(variant["ua"] * 65.0, rel=1e-12)
        assert variant["capacity_ratio"] == pytest.approx(
            80000.0 / variant["design_heat_loss"], rel=1e-12
        )
    # the package lowers the UA, so it lowers the design loss and raises the ratio
    package = result["packages"][0]
    assert package["design_heat_loss"] < result["as_found"]["design_heat_loss"]


def test_typed_indoor_temperature_is_used():
    # 68 °F indoor, −2 °F design: ΔT = 70 °F.
    result = _post(_with_design(DOC_IP, -2.0, 68.0, None))
    found = result["as_found"]
    assert found["design_heat_loss"] == pytest.approx(found["ua"] * 70.0, rel=1e-12)
    assert found["capacity_ratio"] is None


def test_si_and_ip_agree_through_pint():
    # −15 °C design with 21 °C indoor in SI; the IP twin −15 °C = 5 °F, 21 °C = 69.8 °F.
    ip = _post(_with_design(DOC_IP, 5.0, 69.8, 60000.0))["as_found"]
    si = _post(_with_design(si_document(), -15.0, 21.0, Q(60000.0, "Btu_it/hr").to("W").m))
    si = si["as_found"]
    watts = Q(ip["design_heat_loss"], "Btu_it/hr").to("W").magnitude
    assert si["design_heat_loss"] == pytest.approx(watts, rel=1e-6)
    assert si["capacity_ratio"] == pytest.approx(ip["capacity_ratio"], rel=1e-6)


def test_an_oversized_system_after_the_package_is_said_in_plain_words():
    as_found = _post(_with_design(DOC_IP, 5.0, None, None))["as_found"]["design_heat_loss"]
    # equipment 1.35 × the as-found loss: the package's lower loss pushes it past 1.4
    result = _post(_with_design(DOC_IP, 5.0, None, 1.35 * as_found))
    assert result["as_found"]["capacity_ratio"] == pytest.approx(1.35, rel=1e-12)
    package = result["packages"][0]
    assert package["capacity_ratio"] > 1.4
    assert any("oversized" in w for w in package["warnings"])


def test_wood_co2_is_biogenic_and_apart_from_fossil_co2():
    # Fuel table (US EPA GHG emission factors, from memory): 93.80 kg CO2/mmBtu × 20 mmBtu per
    # cord = 1876 kg per cord, all biogenic; fossil CO2 is then only the cooling electricity's.
    doc = copy.deepcopy(DOC_IP)
    doc["heating"] = {"fuel": "wood", "efficiency": 0.65, "price": 250}
    found = _post(doc)["as_found"]
    assert found["co2_biogenic"] == pytest.approx(found["heating_fuel"] * 1876.0, rel=1e-9)
    assert found["heating_co2"] == 0.0
    assert found["co2"] == pytest.approx(found["cooling_co2"], rel=1e-12)
    gas = _post(DOC_IP)["as_found"]
    assert gas["co2_biogenic"] == 0.0 and gas["co2"] > gas["cooling_co2"]


@pytest.mark.parametrize(
    ("section", "field", "value"),
    [
        ("climate", "heating_design_temperature", "cold"),
        ("climate", "heating_design_temperature", -500),
        ("heating", "output_capacity", 0),
        ("heating", "output_capacity", -1000),
    ],
)
def test_bad_design_inputs_are_422_naming_the_field(section, field, value):
    doc = copy.deepcopy(DOC_IP)
    doc[section][field] = value
    response = client.post(URL, json=doc)
    assert response.status_code == 422
    assert any(field in e["field"] for e in response.json()["errors"])
