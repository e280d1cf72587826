"""calc/house with the heating system as it burns fuel: ducts (ASHRAE Standard 152), a heat
pump over temperature bins, mechanical ventilation, altitude, the N-factor table, and pipe
runs that say what they carry and where they run.

Sources: the API.md example's figures recorded before these inputs existed (a document
without them must compute exactly as before); hand arithmetic in the comments; pint for unit
conversions; psychrolib's standard-atmosphere pressure; pvlib's bundled TMY3 file
723170TYA.CSV read by pvlib's own reader for the temperature bins.
"""

from __future__ import annotations

import copy
import math
import pathlib

import numpy as np
import pint
import psychrolib
import pvlib
import pytest

from tests.api.test_house_api import DOC_IP, URL, client

Q = pint.UnitRegistry().Quantity
RHO_C_IP = 0.018  # Btu/(ft³·°F), ASHRAE Handbook—Fundamentals ch. 16 (common practice)
RHO_C_SI = Q(RHO_C_IP, "Btu_it/ft**3/delta_degF").to("J/m**3/K").magnitude
THERM_BTU = 100000.0
KWH_BTU = Q(1, "kWh").to("Btu_it").magnitude
TMY3 = pathlib.Path(pvlib.__file__).parent / "data" / "723170TYA.CSV"


def _post(doc: dict) -> dict:
    response = client.post(
        URL, json={**doc, "detail": {"upgrades_alone": "full"}}
    )  # upgrades alone in full
    assert response.status_code == 200, response.text
    return response.json()


def _refused(doc: dict, field: str) -> None:
    response = client.post(URL, json=doc)
    assert response.status_code == 422, response.text
    fields = [e["field"] for e in response.json()["errors"]]
    assert any(f.endswith(field) for f in fields), fields


def test_the_api_example_computes_exactly_as_recorded_before():
    # recorded from the same document before ducts, heat pumps, ventilation and pipe services
    result = _post(DOC_IP)
    found = result["as_found"]
    assert found["ua"] == 401.6011138408929
    assert found["heating_fuel"] == 650.5938044222464
    assert found["total_cost"] == 1050.12512790719
    (package,) = result["packages"]
    assert package["annual_savings"] == 340.93847688342885
    assert package["npv"] == 3964.58681002505
    assert found["ua_ventilation"] == 0.0 and found["distribution"] is None
    assert found["n_factor"] == 18 and found["water_heating_cost"] == 0.0


# --- ducts ------------------------------------------------------------------------------------

DUCTS = {
    "supply_location": "attic-space",
    "return_location": "conditioned",
    "supply_leakage": 0.10,
    "return_leakage": 0.05,
    "supply_r": 4.2,
    "return_r": 4.2,
    "supply_area": 300.0,
    "return_area": 100.0,
    "air_flow": 1200.0,
    "temperature_rise": 50.0,
}


def _ducted(**climate: float) -> dict:
    doc = copy.deepcopy(DOC_IP)
    doc["spaces"] = [{"id": "attic-space", "b": 0.9}]
    doc["heating"]["ducts"] = copy.deepcopy(DUCTS)
    doc["climate"].update(climate)
    doc["upgrades"] += [
        {"id": "duct-seal", "supply_leakage_after": 0.03, "cost": {"fixed": 600}},
        {"id": "duct-wrap", "supply_r_after": 8.0, "cost": {"fixed": 100, "per_area": 1.5}},
    ]
    doc["packages"].append({"id": "ducts", "upgrades": ["duct-seal", "duct-wrap"]})
    return doc


def _eta(leak_s: float, r_s: float, indoor_f: float, outdoor_f: float, b: float = 0.9) -> float:
    """Standard 152 by hand in IP: B = exp(−A/(1.08·cfm·R)); attic at T_in − b·(T_in − T_out);
    the return inside loses nothing; the supply's loss comes back in the share 1 − b."""
    b_s = math.exp(-300.0 / (60 * RHO_C_IP * 1200.0 * r_s))
    dt_s = b * (indoor_f - outdoor_f)
    a_s = 1 - leak_s
    de = a_s * b_s - a_s * (1 - b_s) * dt_s / 50.0
    return de + (1 - b) * (1 - de)


def test_ducts_in_an_attic_by_hand():
    # indoor 70 °F (default); heating season 35 °F typed; design 5 °F.
    result = _post(_ducted(heating_season_temperature=35.0, heating_design_temperature=5.0))
    found = result["as_found"]
    eta = _eta(0.10, 4.2, 70.0, 35.0)
    assert found["distribution"]["efficiency"] == pytest.approx(eta, rel=1e-9)
    assert found["distribution"]["supply_temperature"] == pytest.approx(70 - 0.9 * 35, rel=1e-9)
    # fuel = load / (η_dist · AFUE · 100,000 Btu/therm): ducts raise the fuel by 1/η
    assert found["heating_fuel"] == pytest.approx(
        found["heating_load"] / (eta * 0.80 * THERM_BTU), rel=1e-9
    )
    # design heat loss = UA · (70 − 5) / η_design, duct losses included
    eta_design = _eta(0.10, 4.2, 70.0, 5.0)
    assert found["design_heat_loss"] == pytest.approx(found["ua"] * 65 / eta_design, rel=1e-9)
    assert found["distribution"]["design_loss"] == pytest.approx(
        found["ua"] * 65 * (1 / eta_design - 1), rel=1e-9
    )
    ducts = next(p for p in result["packages"] if p["id"] == "ducts")
    assert ducts["distribution"]["efficiency"] == pytest.approx(_eta(0.03, 8.0, 70, 35), rel=1e-9)
    assert ducts["installed_cost"] == pytest.approx(600 + 100 + 1.5 * 300)  # supply area only
    assert ducts["annual_savings"] > 0
    # the envelope package saves more with the ducts' losses than without (1/η of the load)
    plain = _post(DOC_IP)["packages"][0]["annual_savings"]
    envelope = next(p for p in result["packages"] if p["id"] == "attic-and-sealing")
    heating_share = envelope["annual_savings"] - (
        result["as_found"]["cooling_cost"] - envelope["cooling_cost"]
    )
    plain_heating = plain - (_post(DOC_IP)["as_found"]["cooling_cost"] - envelope["cooling_cost"])
    assert heating_share == pytest.approx(plain_heating / eta, rel=1e-9)


def test_duct_refusals_name_the_field():
    doc = _ducted()
    doc["heating"]["ducts"]["supply_location"] = "garage"
    _refused(doc, "heating.ducts.supply_location")
    doc = _ducted()
    del doc["heating"]["ducts"]["air_flow"]
    _refused(doc, "heating.ducts.air_flow")  # and no output_capacity to work it out
    doc = copy.deepcopy(DOC_IP)
    doc["upgrades"].append({"id": "duct-seal", "supply_leakage_after": 0.03})
    _refused(doc, "upgrades[2]")
    doc = _ducted()
    doc["packages"].append({"id": "two", "upgrades": ["duct-seal", "duct-seal"]})
    _refused(doc, "packages[2].upgrades[1]")


def test_air_flow_from_the_capacity():
    # 60,000 Btu/h over 1.08 · 50 °F = 1111.1 cfm: the same as typing that flow
    doc = _ducted(heating_season_temperature=35.0)
    doc["heating"]["output_capacity"] = 60000.0
    typed = copy.deepcopy(doc)
    typed["heating"]["ducts"]["air_flow"] = 60000.0 / (60 * RHO_C_IP * 50.0)
    del doc["heating"]["ducts"]["air_flow"]
    a, b = _post(doc)["as_found"], _post(typed)["as_found"]
    assert a["distribution"]["efficiency"] == pytest.approx(
        b["distribution"]["efficiency"], rel=1e-6
    )


# --- heat pump ----------------------------------------------------------------------------------


def _tmy3_bins_f() -> list[dict]:
    """2 °F bins of pvlib's TMY3 file, read by pvlib's own reader (centres on even °F)."""
    data, _meta = pvlib.iotools.read_tmy3(str(TMY3), map_variables=False)
    temps_f = data["Dry-bulb (C)"].to_numpy() * 9 / 5 + 32
    keys, counts = np.unique(np.floor(temps_f / 2 + 0.5).astype(int), return_counts=True)
    return [{"temperature": 2.0 * k, "hours": float(n)} for k, n in zip(keys, counts, strict=True)]


def test_degree_days_upload_gives_the_bins_pvlib_reads():
    with TMY3.open("rb") as handle:
        response = client.post(
            "/api/v1/calc/degree-days", files={"file": ("t.csv", handle)}, data={"units": "ip"}
        )
    assert response.status_code == 200, response.text
    bins = response.json()["temperature_bins"]
    expected = _tmy3_bins_f()
    assert [b["temperature"] for b in bins] == pytest.approx([e["temperature"] for e in expected])
    assert [b["hours"] for b in bins] == [e["hours"] for e in expected]
    assert sum(b["hours"] for b in bins) == 8760


def _heat_pump_doc(bins: list[dict] | None) -> dict:
    doc = copy.deepcopy(DOC_IP)
    doc["heating"] = {
        "fuel": "heat_pump",
        "efficiency": 2.4,
        "price": 0.15,
        "heat_pump": {"hspf": 8.2, "capacity_47": 36000.0},
    }
    if bins is not None:
        doc["climate"]["temperature_bins"] = bins
    return doc


def test_heat_pump_without_bins_uses_the_typed_cop_and_says_so():
    result = _post(_heat_pump_doc(None))
    found = result["as_found"]
    assert any("no temperature bins" in w for w in result["warnings"])
    assert found["heat_pump"]["bins_used"] is False
    assert found["heating_fuel"] == pytest.approx(found["heating_load"] / 2.4 / KWH_BTU, rel=1e-9)
    # COP_47 = −0.0255 · 8.2² + 0.6239 · 8.2 = 3.40136 (RP-1197)
    assert found["heat_pump"]["rated_cop_47"] == pytest.approx(3.40136, abs=1e-9)


def test_heat_pump_over_the_tmy3_bins():
    result = _post(_heat_pump_doc(_tmy3_bins_f()))
    found = result["as_found"]
    hp = found["heat_pump"]
    assert hp["bins_used"] is True and "HPACHeatCapFT" in hp["curves"]
    # the bins' seasonal COP buys the degree-day load (kWh = Btu / 3412.14 / COP)
    assert found["heating_fuel"] == pytest.approx(
        found["heating_load"] / hp["seasonal_cop"] / KWH_BTU, rel=1e-9
    )
    assert 0 < hp["backup_share"] < 0.5 and 1.0 < hp["seasonal_cop"] < 3.40136 * 1.2
    # a tighter, better-insulated house needs less backup: the package's COP is higher
    (package,) = result["packages"]
    assert package["heat_pump"]["backup_share"] < hp["backup_share"]
    assert package["heat_pump"]["seasonal_cop"] > hp["seasonal_cop"]


def test_heat_pump_rating_needs_a_heat_pump_and_a_capacity():
    doc = _heat_pump_doc(None)
    doc["heating"]["fuel"] = "electric_resistance"
    doc["heating"]["efficiency"] = 1.0
    _refused(doc, "heating")
    doc = _heat_pump_doc(None)
    del doc["heating"]["heat_pump"]["capacity_47"]
    _refused(doc, "heating.heat_pump.capacity_47")


# --- air ----------------------------------------------------------------------------------------


def test_hrv_without_infiltration_by_hand():
    # 100 cfm balanced at ε 0.7: 0.018 · 60 · 100 · 0.3 = 32.4 Btu/(h·°F)
    doc = copy.deepcopy(DOC_IP)
    del doc["air_leakage"]
    doc["upgrades"] = [u for u in doc["upgrades"] if u["id"] != "air-seal"]
    doc["packages"] = []
    doc["mechanical_ventilation"] = {"kind": "hrv", "air_flow": 100, "sensible_recovery": 0.7}
    found = _post(doc)["as_found"]
    assert found["ua_ventilation"] == pytest.approx(32.4, rel=1e-9)
    assert found["ua"] == pytest.approx(found["ua_envelope"] + 32.4, rel=1e-12)


def test_exhaust_fan_with_infiltration_and_air_sealing_by_hand():
    # natural infiltration 3200 / 18 = 177.78 cfm; 50 cfm exhaust: sqrt(177.78² + 50²) = 184.68
    # cfm, so the fan adds 1.08 · 6.90 = 7.45 Btu/(h·°F); after sealing to 2200 CFM50 (122.2
    # cfm) the same fan adds 1.08 · (sqrt(122.2² + 50²) − 122.2) = 10.6: the package is one house.
    doc = copy.deepcopy(DOC_IP)
    doc["mechanical_ventilation"] = {"kind": "exhaust", "air_flow": 50}
    result = _post(doc)
    q = 3200 / 18
    assert result["as_found"]["ua_ventilation"] == pytest.approx(
        1.08 * (math.hypot(q, 50) - q), rel=1e-9
    )
    q = 2200 / 18
    (package,) = result["packages"]
    assert package["ua_ventilation"] == pytest.approx(1.08 * (math.hypot(q, 50) - q), rel=1e-9)


def test_elevation_scales_the_air_by_the_standard_pressure():
    psychrolib.SetUnitSystem(psychrolib.SI)
    ratio = psychrolib.GetStandardAtmPressure(Q(5000, "ft").to("m").magnitude) / 101325.0
    doc = copy.deepcopy(DOC_IP)
    doc["climate"]["elevation"] = 5000
    found = _post(doc)["as_found"]
    sea = _post(DOC_IP)["as_found"]
    assert found["ua_infiltration"] == pytest.approx(sea["ua_infiltration"] * ratio, rel=1e-12)
    assert found["ua_envelope"] == sea["ua_envelope"]


def test_n_factor_from_the_table():
    doc = copy.deepcopy(DOC_IP)
    doc["air_leakage"] = {
        "cfm50": 3200,
        "volume": 12000,
        "n_factor_table": {"zone": 2, "stories": 2},
    }
    result = _post(doc)
    found = result["as_found"]
    assert found["n_factor"] == 14.8  # zone 2, 2 stories, normal shielding (LBL table, from memory)
    assert "LBL N-factor table" in found["n_factor_source"]
    assert found["ua_infiltration"] == pytest.approx(0.018 * 60 * 3200 / 14.8, rel=1e-9)
    assert not any("N = 18" in w for w in result["warnings"])
    doc["air_leakage"]["n_factor"] = 16
    _refused(doc, "air_leakage")


# --- pipes --------------------------------------------------------------------------------------

PIPE = {
    "pipe_outer_diameter": 0.875,
    "layers": [],
    "fluid_temperature": 130.0,
    "ambient_temperature": 70.0,
    "material": "copper",
    "service": "domestic_hot_water",
    "location": "conditioned",
    "heating_season_share": 0.5,
    "water_heater": {"fuel": "natural_gas", "efficiency": 0.6, "price": 1.45},
}


def _piped(pipe: dict) -> dict:
    doc = copy.deepcopy(DOC_IP)
    doc["surfaces"].append(
        {"id": "dhw", "kind": "pipe_run", "length": 40, "pipe": pipe, "hours_per_year": 3000}
    )
    doc["upgrades"].append(
        {"id": "wrap", "surface": "dhw", "pipe_layers": [{"thickness": 0.5, "conductivity": 0.25}]}
    )
    return doc


def test_bare_copper_radiates_less_by_hand():
    # bare pipe: surface at the fluid temperature; the convective part does not depend on ε, so
    # q'(ε 0.9) − q'(ε 0.1) = 0.8 · σ · π · D · (T_s⁴ − T_a⁴).
    copper = _post(_piped(PIPE))["as_found"]["pipes"][0]
    painted = _post(_piped({**PIPE, "emissivity": 0.9}))["as_found"]["pipes"][0]
    d = Q(0.875, "inch").to("m").magnitude
    ts, ta = Q(130, "degF").to("K").magnitude, Q(70, "degF").to("K").magnitude
    delta_w_m = 0.8 * 5.670374419e-8 * math.pi * d * (ts**4 - ta**4)
    delta_ip = Q(delta_w_m, "W/m").to("Btu_it/hr/ft").magnitude
    assert painted["heat_loss_per_length"] - copper["heat_loss_per_length"] == pytest.approx(
        delta_ip, rel=1e-6
    )


def test_domestic_hot_water_in_the_house_by_hand():
    result = _post(_piped(PIPE))
    found = result["as_found"]
    pipe = found["pipes"][0]
    # half its hot hours in the heating season, when its loss heats the house: half counts
    assert pipe["counted_loss"] == pytest.approx(pipe["annual_loss"] * 0.5, rel=1e-12)
    # bought at the water heater: Btu / (0.6 · 100,000) therms at 1.45
    therms = pipe["counted_loss"] / (0.6 * THERM_BTU)
    assert pipe["water_heating_fuel"] == pytest.approx(therms, rel=1e-12)
    assert found["water_heating_cost"] == pytest.approx(therms * 1.45, rel=1e-12)
    # the heating fuel does not buy it: the same as the house without the pipe
    assert found["heating_fuel"] == pytest.approx(
        _post(DOC_IP)["as_found"]["heating_fuel"], rel=1e-12
    )
    assert found["total_cost"] == pytest.approx(
        found["heating_cost"] + found["cooling_cost"] + found["water_heating_cost"], rel=1e-12
    )


def test_heating_water_in_the_house_is_no_loss_and_jacket_is_0_9():
    pipe = {k: v for k, v in PIPE.items() if k not in ("water_heater", "heating_season_share")}
    pipe["service"] = "heating_water"
    result = _post(_piped(pipe))
    assert result["as_found"]["pipes"][0]["counted_loss"] == 0.0
    # the jacketed upgrade's surface takes ε 0.9 (the pipe's own 0.1 was the bare copper):
    # its resistance is /calc/pipe's with emissivity 0.9
    wrap = next(u for u in result["upgrades"] if u["id"] == "wrap")
    calc = client.post(
        "/api/v1/calc/pipe",
        json={
            "units": "ip",
            "pipe_outer_diameter": 0.875,
            "layers": [{"thickness": 0.5, "conductivity": 0.25}],
            "fluid_temperature": 130.0,
            "ambient_temperature": 70.0,
            "emissivity": 0.9,
        },
    ).json()
    assert wrap["pipes"][0]["r_per_length"] == pytest.approx(calc["r_per_length"], rel=1e-12)


def test_pipe_location_must_exist():
    _refused(_piped({**PIPE, "location": "garage"}), "surfaces[2].pipe.location")
