"""POST /api/v1/calc/bills and a house document's bills -> calibration, with their 422s.

Outside sources: pvlib's bundled TMY3 file 723170TYA.CSV for the weather (tests/utils/tmy3.py);
numpy-financial for the calibrated NPV; hand arithmetic in the comments.
"""

from __future__ import annotations

import copy
import json
from datetime import date

import numpy as np
import numpy_financial as npf
import pytest
from fastapi.testclient import TestClient

from server.app import create_app
from server.config import Settings
from tests.utils.tmy3 import daily_means_c, synthetic_bills, to_f

client = TestClient(create_app(Settings(environment="test", database_url="sqlite://")))
URL = "/api/v1/calc/bills"
HOUSE_URL = "/api/v1/calc/house"

YEAR_F = to_f(list(daily_means_c()))
FIRST = date(2024, 1, 1)
# α = 1.0 therm/day, β = 0.2 therm/(°F·day), τ = 60 °F, noise free, one year of reads
PERIODS = synthetic_bills(YEAR_F, FIRST, alpha=1.0, beta=0.2, base=60.0)
HDD60_NORMAL = sum(max(0.0, 60.0 - t) for t in YEAR_F)  # °F·day of the typical year
REQUEST = {
    "units": "ip",
    "fuel": "natural_gas",
    "periods": PERIODS,
    "daily_temperatures": {"start": FIRST.isoformat(), "values": YEAR_F},
    "normal_temperatures": {"values": YEAR_F},
    "efficiency": 0.8,
}


def post(body: dict, url: str = URL):  # type: ignore[no-untyped-def]
    return client.post(url, content=json.dumps(body), headers={"content-type": "application/json"})


def request(**changes) -> dict:  # type: ignore[no-untyped-def]
    body = copy.deepcopy(REQUEST)
    body.update(changes)
    return body


def refused(body: dict, url: str = URL) -> dict:
    response = post(body, url)
    assert response.status_code == 422, response.text
    return response.json()


def test_the_contract_example_gives_back_known_parameters():
    response = post(REQUEST)
    assert response.status_code == 200, response.text
    out = response.json()
    assert out["model"] == "heating" and out["fuel_unit"] == "therm"
    assert out["base_temperature"] == pytest.approx(60.0, abs=0.02)  # 0.1 °F asked
    assert out["baseload_per_day"] == pytest.approx(1.0, rel=1e-3)
    assert out["heating_slope"] == pytest.approx(0.2, rel=1e-3)
    assert out["periods_used"] == len(PERIODS) >= 11
    # NAC = 365 α + β HDD_normal(τ), the typical year's HDD at 60 °F summed by hand above
    assert out["heating_degree_days_normal"] == pytest.approx(HDD60_NORMAL, rel=1e-3)
    assert out["normalized_annual_heating_use"] == pytest.approx(0.2 * HDD60_NORMAL, rel=2e-3)
    assert out["normalized_annual_use"] == pytest.approx(365 + 0.2 * HDD60_NORMAL, rel=2e-3)
    # apparent UA = 0.2 therm/(°F·day) × 100 000 Btu/therm × 0.8 / 24 h = 666.7 Btu/(h·°F)
    assert out["heating_ua_equivalent"] == pytest.approx(666.67, rel=2e-3)
    assert out["r_squared"] == pytest.approx(1.0, abs=1e-6)
    assert out["cv_rmse"] < 0.1 and abs(out["nmbe"]) < 1e-9
    assert out["parameters"] == 3
    assert out["criteria_met"] is True
    assert {c["limit"] for c in out["criteria"]} == {15.0, 5.0, 20.0, 0.005}
    assert all(c["met"] for c in out["criteria"])
    assert out["warnings"] == []
    assert sum(p["residual"] for p in out["periods"]) == pytest.approx(0.0, abs=1e-9)


def test_si_request_gives_the_same_fit():
    year_c = list(daily_means_c())
    periods = synthetic_bills(year_c, FIRST, alpha=1.0, beta=0.36, base=(60 - 32) / 1.8)
    body = request(
        units="si",
        periods=periods,
        daily_temperatures={"start": FIRST.isoformat(), "values": year_c},
        normal_temperatures={"values": year_c},
    )
    out = post(body).json()
    assert out["base_temperature"] == pytest.approx((60 - 32) / 1.8, abs=0.01)
    assert out["heating_slope"] == pytest.approx(0.36, rel=1e-3)  # therm per K·day
    # 666.67 Btu/(h·°F) × 0.29307107 W/(Btu/h) × 1.8 = 351.69 W/K
    assert out["heating_ua_equivalent"] == pytest.approx(351.69, rel=2e-3)


def test_defaults_are_stated_in_warnings():
    body = request()
    del body["efficiency"], body["normal_temperatures"]
    out = post(body).json()
    assert out["efficiency"] == 1.0
    assert out["heating_ua_equivalent"] == pytest.approx(666.67 / 0.8, rel=2e-3)
    assert out["normalized_annual_use"] is None and out["normalized_annual_heating_use"] is None
    assert any("no efficiency given" in w for w in out["warnings"])
    assert any("no normal_temperatures" in w for w in out["warnings"])


def test_data_warnings_in_plain_words():
    periods = copy.deepcopy(PERIODS[:6])
    periods[2]["estimated"] = True
    del periods[4]  # a gap between periods[3] and the next
    periods[-1]["end"] = "2024-07-20"  # the last period now runs more than 40 days
    out = post(request(periods=periods)).json()
    words = " | ".join(out["warnings"])
    assert "only 5 periods" in words
    assert "a gap between periods" in words and "periods[3]" in words
    assert "more than 40" in words
    assert "periods[2]" in words and "estimated read" in words
    assert "less than a year" in words


def test_a_single_period():
    out = post(request(periods=[{"start": "2024-01-01", "end": "2024-01-31", "use": 150.0}])).json()
    assert out["model"] == "baseload"
    assert out["baseload_per_day"] == pytest.approx(5.0)  # 150 therm / 30 days
    assert out["heating_slope"] == 0.0 and out["base_temperature"] is None
    assert out["cv_rmse"] is None and out["criteria_met"] is None
    assert any("single period" in w for w in out["warnings"])


def test_two_periods_use_65_f():
    out = post(request(periods=PERIODS[:2])).json()
    assert out["base_temperature"] == pytest.approx(65.0)
    assert out["base_temperature_searched"] is False
    assert any("cannot be searched" in w for w in out["warnings"])


def test_a_fuel_used_only_for_water_heating():
    # 1.5 therm a day whatever the weather: the baseload carries all of it
    periods = synthetic_bills(YEAR_F, FIRST, alpha=1.5, beta=0.0, base=60.0)
    out = post(request(periods=periods)).json()
    assert out["model"] == "baseload"
    assert out["baseload_per_day"] == pytest.approx(1.5)
    assert out["heating_slope"] == 0.0 and out["heating_ua_equivalent"] == 0.0
    assert out["normalized_annual_heating_use"] == 0.0
    assert out["normalized_annual_use"] == pytest.approx(365 * 1.5)
    assert any("no heating signal" in w for w in out["warnings"])


def test_water_heating_with_noise_still_says_the_heating_is_small():
    periods = synthetic_bills(YEAR_F, FIRST, alpha=1.5, beta=0.0, base=60.0, noise=0.03, seed=4)
    out = post(request(periods=periods)).json()
    heating = out["normalized_annual_heating_use"]
    assert heating < 0.1 * out["normalized_annual_use"]
    assert out["baseload_per_day"] == pytest.approx(1.5, rel=0.05)
    assert any(
        key in w
        for w in out["warnings"]
        for key in ("no heating signal", "twice its standard error", "heating is only")
    )


def test_electric_bills_report_the_cooling_term():
    # 12 kWh/day, 1.1 kWh/(°F·day) below 58 °F, 0.8 kWh/(°F·day) above 72 °F, two years
    two = YEAR_F + YEAR_F
    periods = synthetic_bills(
        two, FIRST, alpha=12.0, beta=1.1, base=58.0, gamma=0.8, cooling_base=72.0
    )
    body = request(
        fuel="electricity",
        periods=periods,
        daily_temperatures={"start": FIRST.isoformat(), "values": two},
        efficiency=1.0,
    )
    out = post(body).json()
    assert out["model"] == "heating_and_cooling" and out["fuel_unit"] == "kWh"
    assert out["base_temperature"] == pytest.approx(58.0, abs=0.1)
    assert out["cooling_base_temperature"] == pytest.approx(72.0, abs=0.1)
    assert out["cooling_slope"] == pytest.approx(0.8, rel=0.01)
    assert out["heating_slope"] == pytest.approx(1.1, rel=0.01)
    assert out["parameters"] == 5
    off = post(dict(body, cooling_term="off")).json()
    assert off["model"] == "heating" and off["cooling_slope"] is None


@pytest.mark.parametrize(
    "change, field, words",
    [
        ({"units": "metric"}, "units", "one of"),
        ({"fuel": "coal"}, "fuel", "one of"),
        ({"efficiency": 1.2}, "efficiency", "at most 1"),
        ({"extra": 1}, "extra", "not a field"),
        ({"periods": []}, "periods", "at least 1"),
        ({"normal_temperatures": {"values": [40.0] * 300}}, "normal_temperatures.values", "365"),
        ({"daily_temperatures": {"start": "2024/01/01", "values": [1.0]}},
         "daily_temperatures.start", "YYYY-MM-DD"),
        ({"daily_temperatures": {"start": 20240101, "values": [1.0]}},
         "daily_temperatures.start", "YYYY-MM-DD"),
        ({"daily_temperatures": {"start": "2024-02-30", "values": [1.0]}},
         "daily_temperatures.start", "not a calendar date"),
    ],
)  # fmt: skip
def test_bad_fields_are_named(change, field, words):
    body = refused(request(**change))
    assert body["errors"][0]["field"] == field
    assert words in body["errors"][0]["message"]


def test_uncovered_day_is_named():
    values = list(YEAR_F)
    values[40] = None  # 2024-02-10 missing
    body = refused(request(daily_temperatures={"start": FIRST.isoformat(), "values": values}))
    assert body["errors"][0]["field"] == "daily_temperatures"
    assert "2024-02-10" in body["errors"][0]["message"]
    late = refused(request(daily_temperatures={"start": "2024-01-05", "values": YEAR_F}))
    assert "2024-01-01" in late["errors"][0]["message"]  # the first day before the series


def test_period_problems_are_named():
    periods = copy.deepcopy(PERIODS)
    periods[3]["end"] = periods[3]["start"]
    body = refused(request(periods=periods))
    assert body["errors"][0]["field"] == "periods[3].end"
    periods = copy.deepcopy(PERIODS)
    periods[5]["start"] = periods[4]["start"]
    body = refused(request(periods=periods))
    assert body["errors"][0]["field"] == "periods[5].start"
    assert "overlaps periods[4]" in body["errors"][0]["message"]
    periods = copy.deepcopy(PERIODS)
    periods[1]["start"] = "02/01/2024"
    assert refused(request(periods=periods))["errors"][0]["field"] == "periods[1].start"
    periods = copy.deepcopy(PERIODS)
    periods[0]["use"] = -1
    assert refused(request(periods=periods))["errors"][0]["field"] == "periods[0].use"


def test_non_finite_and_implausible_numbers_are_refused():
    text = json.dumps(REQUEST).replace('"use": ' + json.dumps(PERIODS[0]["use"]), '"use": NaN', 1)
    response = client.post(URL, content=text, headers={"content-type": "application/json"})
    assert response.status_code == 422
    assert response.json()["errors"][0]["field"] == "periods[0].use"
    values = list(YEAR_F)
    values[7] = 180.0  # °F: not a daily mean outdoors
    body = refused(request(daily_temperatures={"start": FIRST.isoformat(), "values": values}))
    assert body["errors"][0]["field"] == "daily_temperatures.values[7]"


def test_periods_in_any_order_give_the_same_fit():
    out = post(request(periods=list(reversed(PERIODS)))).json()
    assert out["base_temperature"] == pytest.approx(60.0, abs=0.02)
    assert out["periods"][0]["start"] == PERIODS[0]["start"]


# --- the house's bills -> calibration ---------------------------------------------------------

BILLS = {k: v for k, v in copy.deepcopy(REQUEST).items() if k not in ("units", "efficiency")}
HOUSE = {
    "units": "ip",
    "climate": {"hdd": 5000, "cdd": 900},
    "heating": {"fuel": "natural_gas", "efficiency": 0.8, "price": 1.5},
    "cooling": {"seer": 13, "electricity_price": 0.16},
    "surfaces": [{"id": "walls", "kind": "wall", "area": 1000, "u": 0.5}],
    "upgrades": [{"id": "better", "surface": "walls", "u": 0.25, "cost": {"fixed": 3000}}],
    "packages": [{"id": "p", "upgrades": ["better"]}],
    "economics": {"discount_rate": 0.03, "fuel_escalation": 0.0, "years": 20},
}


def house(**changes) -> dict:  # type: ignore[no-untyped-def]
    doc = copy.deepcopy(HOUSE)
    doc["bills"] = copy.deepcopy(BILLS)
    doc["bills"].update(changes)
    return doc


def test_house_calibration_ratio_by_hand():
    response = post(house(), HOUSE_URL)
    assert response.status_code == 200, response.text
    out = response.json()
    cal = out["calibration"]
    # model: UA = 1000 ft² × 0.5 = 500 Btu/(h·°F); 500 × 5000 °F·day × 24 h = 60e6 Btu;
    # / (100 000 Btu/therm × 0.8) = 750 therm
    assert cal["model_heating_use"] == pytest.approx(750.0)
    # bills: β HDD_normal(τ) = 0.2 therm/(°F·day) × the typical year's HDD at 60 °F
    bills = 0.2 * HDD60_NORMAL
    assert cal["bills_heating_use"] == pytest.approx(bills, rel=2e-3)
    assert cal["ratio"] == pytest.approx(bills / 750.0, rel=2e-3)
    ratio = cal["ratio"]
    assert cal["fit"]["fuel"] == "natural_gas"
    assert any("house's heating efficiency (0.8)" in w for w in cal["fit"]["warnings"])
    # package: U 0.5 -> 0.25 halves the UA: 375 therm × $1.50 = $562.50 of heating, and
    # 250 Btu/(h·°F) × 900 °F·day × 24 h / (13 Btu/Wh × 1000) = 415.38 kWh × $0.16 = $66.46
    package = out["packages"][0]
    calibrated = package["calibrated"]
    heating = 562.5 * ratio
    cooling = 250 * 900 * 24 / 13000 * 0.16
    assert package["annual_savings"] == pytest.approx(562.5 + cooling)  # uncalibrated kept
    assert calibrated["heating_savings"] == pytest.approx(heating)
    assert calibrated["other_savings"] == pytest.approx(cooling)
    assert calibrated["annual_savings"] == pytest.approx(heating + cooling)
    assert calibrated["heating_fuel_saved"] == pytest.approx(375 * ratio)
    assert calibrated["simple_payback_years"] == pytest.approx(3000 / (heating + cooling))
    npv = npf.npv(0.03, [-3000.0] + [heating + cooling] * 20)
    assert calibrated["npv"] == pytest.approx(npv, rel=1e-9)
    assert calibrated["sir"] == pytest.approx((npv + 3000) / 3000, rel=1e-9)
    # each upgrade alone is calibrated too
    assert out["upgrades"][0]["calibrated"]["annual_savings"] == pytest.approx(heating + cooling)
    # savings never exceed the bills' normalised heating use
    assert calibrated["heating_fuel_saved"] <= cal["bills_heating_use"]


def test_a_house_without_bills_computes_as_before():
    plain = post(HOUSE, HOUSE_URL).json()
    with_bills = post(house(), HOUSE_URL).json()
    assert plain["calibration"] is None
    assert plain["packages"][0]["calibrated"] is None
    with_bills.pop("calibration")
    for option in with_bills["packages"] + with_bills["upgrades"]:
        option.pop("calibrated")
    for option in plain["packages"] + plain["upgrades"]:
        option.pop("calibrated")
    plain.pop("calibration")
    assert with_bills == plain


def test_house_bills_without_a_heating_signal_give_a_ratio_of_zero():
    periods = synthetic_bills(YEAR_F, FIRST, alpha=1.5, beta=0.0, base=60.0)
    out = post(house(periods=periods), HOUSE_URL).json()
    assert out["calibration"]["ratio"] == 0.0
    calibrated = out["packages"][0]["calibrated"]
    assert calibrated["heating_savings"] == 0.0
    assert calibrated["annual_savings"] == pytest.approx(250 * 900 * 24 / 13000 * 0.16)


def test_house_bills_errors_name_the_house_field():
    assert refused(house(fuel="propane"), HOUSE_URL)["errors"][0]["field"] == "bills.fuel"
    doc = house()
    del doc["bills"]["normal_temperatures"]
    body = refused(doc, HOUSE_URL)
    assert body["errors"][0]["field"] == "bills.normal_temperatures"
    periods = copy.deepcopy(PERIODS)
    periods[2]["end"] = "2023-01-01"
    body = refused(house(periods=periods), HOUSE_URL)
    assert body["errors"][0]["field"] == "bills.periods[2].end"
    values = list(YEAR_F)
    values[0] = None
    body = refused(
        house(daily_temperatures={"start": FIRST.isoformat(), "values": values}), HOUSE_URL
    )
    assert body["errors"][0]["field"] == "bills.daily_temperatures"
    assert "2024-01-01" in body["errors"][0]["message"]
    body = refused(house(units="ip"), HOUSE_URL)  # the house's units apply
    assert body["errors"][0]["field"] == "bills.units"


def test_house_ratio_far_from_one_lists_the_usual_reasons():
    doc = house()
    doc["surfaces"][0]["u"] = 1.5  # the model now burns 3 × 750 = 2250 therm
    cal = post(doc, HOUSE_URL).json()["calibration"]
    assert cal["ratio"] == pytest.approx(0.2 * HDD60_NORMAL / 2250, rel=2e-3)
    assert any("air leakage" in w and "setpoint" in w for w in cal["warnings"])
    np.testing.assert_allclose(cal["model_heating_use"], 2250.0)
