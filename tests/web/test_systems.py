"""The House page's systems cards and the pipe-run page's what-it-carries form, saved through
the page without JavaScript: the saved house computes as the equivalent JSON document does
(POST /api/v1/calc/house, the same code), design loads are checked by hand, a rated heat pump
uses the weather file's bins, and bad or stale forms keep what was typed (422 / 409)."""

from __future__ import annotations

import copy
import re
from pathlib import Path

import pvlib
import pytest
from fastapi.testclient import TestClient

HX = {"HX-Request": "true"}
TMY3 = Path(pvlib.__file__).parent / "data" / "723170TYA.CSV"  # pvlib's bundled TMY3 file


def _house(client: TestClient, units: str = "ip") -> tuple[str, str]:
    url = client.post("/houses", data={"label": "Systems house", "units": units},
                      follow_redirects=False).headers["location"]  # fmt: skip
    client.post(f"{url}/surfaces", data={"typical": "wall-2x4-16-r13", "area": "1000"})
    return url, url.rsplit("/", 1)[1]


def _version(client: TestClient, url: str) -> str:
    return re.search(r'name="version" value="(\d+)"', client.get(url).text).group(1)  # type: ignore[union-attr]


def _save(client: TestClient, url: str, path: str, data: dict[str, str]) -> None:
    r = client.post(f"{url}/{path}", data={**data, "version": _version(client, url)},
                    follow_redirects=False)  # fmt: skip
    assert r.status_code == 303, r.text[-2000:]


def _calc(client: TestClient, doc: dict) -> dict:
    r = client.post("/api/v1/calc/house", json=doc)
    assert r.status_code == 200, r.text
    return r.json()


def _base(client: TestClient, url: str) -> None:
    _save(client, url, "settings/climate", {"hdd": "5000", "cdd": "800"})
    _save(client, url, "settings/heating",
          {"fuel": "natural_gas", "efficiency": "0.8", "price": "1.2"})  # fmt: skip
    _save(client, url, "settings/air_leakage", {"cfm50": "2000", "volume": "12000"})


def test_each_card_saved_through_the_page_computes_as_the_json_document(
    client: TestClient,
) -> None:
    url, house_id = _house(client)
    _base(client, url)
    exported = client.get(f"/api/v1/houses/{house_id}/document").json()
    _save(client, url, "systems/design", {"output_capacity": "60,000",
          "heating_design_temperature": "5", "indoor_design_temperature": "70"})  # fmt: skip
    _save(client, url, "systems/ducts", {
        "supply_location": "outdoors", "return_location": "conditioned", "supply_leakage": "10",
        "return_leakage": "5 %", "supply_r": "4.2", "return_r": "4.2", "supply_area": "300",
        "return_area": "100", "air_flow": ""})  # fmt: skip
    _save(client, url, "systems/ventilation",
          {"kind": "hrv", "air_flow": "80", "sensible_recovery": "70"})  # fmt: skip
    _save(client, url, "systems/n_factor",
          {"source": "table", "zone": "2", "stories": "2", "shielding": "normal"})  # fmt: skip
    _save(client, url, "systems/house", {"floor_area": "1500", "bedrooms": "3",
                                         "internal_gains": "", "elevation": "5000"})  # fmt: skip
    saved = client.get(f"/api/v1/houses/{house_id}/document").json()
    # the equivalent JSON document, written by hand on the envelope exported before the cards
    by_hand = copy.deepcopy(exported)
    by_hand["heating"].update(output_capacity=60000.0, ducts={
        "supply_location": "outdoors", "return_location": "conditioned",
        "supply_leakage": 0.10, "return_leakage": 0.05, "supply_r": 4.2, "return_r": 4.2,
        "supply_area": 300.0, "return_area": 100.0})  # fmt: skip
    by_hand["climate"].update(heating_design_temperature=5.0, indoor_design_temperature=70.0,
                              elevation=5000.0)  # fmt: skip
    by_hand["air_leakage"] = {"cfm50": 2000.0, "volume": 12000.0,
                              "n_factor_table": {"zone": 2, "stories": 2.0, "shielding": "normal"}}  # fmt: skip
    by_hand["mechanical_ventilation"] = {"kind": "hrv", "air_flow": 80.0, "sensible_recovery": 0.7}
    by_hand.update(floor_area=1500.0, bedrooms=3)
    page_figures, json_figures = (
        _calc(client, saved)["as_found"],
        _calc(client, by_hand)["as_found"],
    )
    for key in ("design_heat_loss", "heating_fuel", "ua", "capacity_ratio", "n_factor"):
        assert page_figures[key] == pytest.approx(json_figures[key], rel=1e-12), key
    assert page_figures["distribution"]["design_loss"] > 0
    # the LBL table, zone 2, two stories, normal shielding: N = 14.8 (server/physics/ventilation
    # N_FACTOR_TABLE, "values from memory" of Sherman 1987)
    assert page_figures["n_factor"] == pytest.approx(14.8)
    page = client.get(url).text
    assert (
        "Design heat loss, as found" in page
        and f"{page_figures['design_heat_loss']:,.0f} Btu/h" in page
    )
    assert "N-factor used: 14.8" in page
    # ANSI/RESNET/ICC 301 default gains, by hand: (17,900 + 23.8 × 1,500 + 4,104 × 3) / 24
    # = (17,900 + 35,700 + 12,312) / 24 = 2,746.3 Btu/h
    assert "Published default internal gains: 2,746 Btu/h" in page


def test_design_heat_loss_by_hand(client: TestClient) -> None:
    url, house_id = _house(client)
    _base(client, url)
    _save(client, url, "systems/n_factor", {"source": "typed", "n_factor": "20"})
    _save(client, url, "systems/design", {"output_capacity": "100000",
          "heating_design_temperature": "5", "indoor_design_temperature": ""})  # fmt: skip
    doc = client.get(f"/api/v1/houses/{house_id}/document").json()
    found = _calc(client, doc)["as_found"]
    # infiltration by hand (LBL: natural flow = CFM50 / N; 1.08 Btu/(h·°F) per ft³/min of air,
    # 0.018 Btu/(ft³·°F) × 60 min/h, common practice): 1.08 × 2,000 / 20 = 108 Btu/(h·°F)
    assert found["ua_infiltration"] == pytest.approx(108.0, rel=1e-3)
    # no ducts: design loss = UA × (70 °F indoor default − 5 °F) = UA × 65
    assert found["design_heat_loss"] == pytest.approx(found["ua"] * 65.0, rel=1e-9)
    assert found["capacity_ratio"] == pytest.approx(100000.0 / found["design_heat_loss"])
    # ducts add their design loss: UA × ΔT + duct loss (ASHRAE Standard 152 at design)
    _save(client, url, "systems/ducts", {
        "supply_location": "outdoors", "return_location": "outdoors", "supply_leakage": "15",
        "return_leakage": "10", "supply_r": "2", "return_r": "2", "supply_area": "400",
        "return_area": "150", "air_flow": "1200"})  # fmt: skip
    with_ducts = _calc(client, client.get(f"/api/v1/houses/{house_id}/document").json())["as_found"]
    duct_loss = with_ducts["distribution"]["design_loss"]
    assert with_ducts["design_heat_loss"] == pytest.approx(found["ua"] * 65.0 + duct_loss, rel=1e-9)
    assert with_ducts["design_heat_loss"] == pytest.approx(
        found["ua"] * 65.0 / with_ducts["distribution"]["design_efficiency"], rel=1e-9
    )


def test_heat_pump_uses_the_weather_files_bins(client: TestClient) -> None:
    url, house_id = _house(client)
    _base(client, url)
    _save(client, url, "settings/heating",
          {"fuel": "heat_pump", "efficiency": "2.5", "price": "0.15"})  # fmt: skip
    _save(client, url, "systems/heat_pump", {"hspf2": "7.5", "capacity_47": "36000"})
    doc = client.get(f"/api/v1/houses/{house_id}/document").json()
    assert doc["heating"]["heat_pump"]["hspf2"] == 7.5
    pump = _calc(client, doc)["as_found"]["heat_pump"]
    assert pump["bins_used"] is False and pump["seasonal_cop"] == 2.5  # the typed COP
    assert "No weather file: the heat pump falls back to the seasonal COP" in client.get(url).text
    r = client.post(f"{url}/weather", data={"version": _version(client, url)},
                    files={"file": ("723170TYA.CSV", TMY3.read_bytes())}, follow_redirects=False)  # fmt: skip
    assert r.status_code == 303
    doc = client.get(f"/api/v1/houses/{house_id}/document").json()
    pump = _calc(client, doc)["as_found"]["heat_pump"]
    assert pump["bins_used"] is True and pump["seasonal_cop"] != 2.5
    assert "HPACHeatCapFT" in pump["curves"]
    page = client.get(url).text
    assert f"Seasonal COP {pump['seasonal_cop']:.2f} over the weather file" in page
    # without a typed design temperature the file's 99 % figure is used, and said
    assert "the weather file&#39;s 99 % figure" in page and "Design heat loss, as found" in page


def test_bad_card_keeps_typed_text_beside_the_field(client: TestClient) -> None:
    url, _ = _house(client)
    _base(client, url)
    r = client.post(f"{url}/systems/ducts", data={
        "supply_location": "attic", "return_location": "conditioned", "supply_leakage": "ten",
        "return_leakage": "5", "supply_r": "4", "return_r": "4", "supply_area": "300",
        "return_area": "", "version": _version(client, url)})  # fmt: skip
    assert r.status_code == 422
    assert 'value="ten"' in r.text and 'aria-describedby="sys-ducts-supply_leakage-err"' in r.text
    assert 'id="sys-ducts-return_area-err">required' in r.text
    assert 'id="sys-ducts-supply_location-err">choose one of the list' in r.text
    # a heat pump's ratings on a gas furnace: said beside the form, nothing stored
    r = client.post(
        f"{url}/systems/heat_pump", data={"hspf": "9", "version": _version(client, url)}
    )
    assert r.status_code == 422 and "fuel to heat pump first" in r.text and 'value="9"' in r.text
    # htmx gets the fragment (200, messages inside) and the settings block out of band
    r = client.post(f"{url}/systems/design", headers=HX, data={"output_capacity": "-5",
                    "version": _version(client, url)})  # fmt: skip
    assert r.status_code == 200 and 'aria-invalid="true"' in r.text
    assert (
        'id="settings" class="settings" aria-labelledby="settings-h" hx-swap-oob="true"' in r.text
    )


def test_stale_card_is_a_conflict_with_the_typed_text(client: TestClient) -> None:
    url, _ = _house(client)
    _base(client, url)
    old = _version(client, url)
    _save(client, url, "systems/design", {"output_capacity": "60000"})
    r = client.post(f"{url}/systems/design", data={"output_capacity": "70000", "version": old})
    assert r.status_code == 409
    assert "Someone else saved this house" in r.text and 'value="70000"' in r.text


def test_metric_house_cards(client: TestClient) -> None:
    url, house_id = _house(client, units="si")
    _save(client, url, "settings/climate", {"hdd": "3000"})
    _save(client, url, "settings/heating",
          {"fuel": "natural_gas", "efficiency": "0,9", "price": "1"})  # fmt: skip
    _save(client, url, "systems/design", {"output_capacity": "17500",
          "heating_design_temperature": "-12,5", "indoor_design_temperature": "20"})  # fmt: skip
    _save(
        client, url, "systems/house", {"floor_area": "140,5", "bedrooms": "3", "elevation": "600"}
    )
    doc = client.get(f"/api/v1/houses/{house_id}/document").json()
    assert doc["climate"]["heating_design_temperature"] == -12.5
    assert doc["heating"]["output_capacity"] == 17500.0 and doc["floor_area"] == 140.5
    found = _calc(client, doc)["as_found"]
    assert found["design_heat_loss"] == pytest.approx(found["ua"] * 32.5, rel=1e-9)  # W
    page = client.get(url).text
    assert 'value="-12.5"' in page
    assert "°C" in page and f"{found['design_heat_loss']:,.0f} W" in page


def test_pipe_run_says_what_it_carries(client: TestClient) -> None:
    url, house_id = _house(client)
    _base(client, url)
    r = client.post(f"{url}/pipes", follow_redirects=False, data={
        "name": "Hot water to kitchen", "length": "40", "pipe_outer_diameter": "7/8",
        "fluid_temperature": "130", "ambient_temperature": "55", "hours_per_year": "3000"})  # fmt: skip
    run = r.headers["location"]
    run_id = run.rsplit("/", 1)[1]
    r = client.post(f"/houses/{house_id}/pipes/{run_id}/service", data={
        "service": "domestic_hot_water", "location": "unconditioned", "material": "copper",
        "heater_fuel": "", "heater_efficiency": "0,6", "heater_price": "1.2",
        "version": _version(client, url)})  # fmt: skip
    assert r.status_code == 422 and "choose the water heater&#39;s fuel" in r.text
    assert 'value="0,6"' in r.text
    _save(client, f"/houses/{house_id}", f"pipes/{run_id}/service", {
        "service": "domestic_hot_water", "location": "unconditioned", "material": "copper",
        "heater_fuel": "natural_gas", "heater_efficiency": "0.6", "heater_price": "1.2"})  # fmt: skip
    doc = client.get(f"/api/v1/houses/{house_id}/document").json()
    pipe = next(s for s in doc["surfaces"] if s["kind"] == "pipe_run")["pipe"]
    assert pipe["service"] == "domestic_hot_water" and pipe["material"] == "copper"
    heater = {k: v for k, v in pipe["water_heater"].items() if v is not None}
    assert heater == {"fuel": "natural_gas", "efficiency": 0.6, "price": 1.2}
    figures = _calc(client, doc)["as_found"]["pipes"][0]
    # outside the heated space the whole loss counts (b = 1), bought at the water heater
    assert figures["counted_loss"] == pytest.approx(figures["annual_loss"])
    assert figures["water_heating_fuel"] > 0
    page = client.get(run).text
    assert "bought at the water heater" in page
    # stale form: 409, typed text kept
    r = client.post(f"/houses/{house_id}/pipes/{run_id}/service",
                    data={"service": "heating_water", "emissivity": "0.3", "version": "1"})  # fmt: skip
    assert r.status_code == 409 and 'value="0.3"' in r.text
