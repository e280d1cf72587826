"""Bills stored on a saved house (SQLite and PostgreSQL): save with the version check, read
back, export and import with the house, unit switch, and calibration from the saved house.

Outside sources: pvlib's bundled TMY3 file 723170TYA.CSV for the weather (its hours written
as an EPW of one actual year, tests/reference/test_bill_weather_pvlib.py); hand arithmetic in
the comments.
"""

from __future__ import annotations

import copy
from datetime import date

import pytest
from fastapi.testclient import TestClient

from server.db import session_scope
from server.errors import Conflict, InputError
from server.models import House, Surface
from server.services.bill_table import read_bill_text
from server.services.bill_weather import climate_normals, normal_daily_means, weather_from_files
from server.services.comparison import compute_house
from server.services.house_bills import save_bills
from server.services.house_document import house_document
from server.services.house_units import switch_units
from server.services.houses import create_house, get_house
from tests.reference.test_bill_weather_pvlib import TMY3, daily_means_c, epw_of_one_year
from tests.utils.tmy3 import synthetic_bills, to_f

FIRST = date(2023, 1, 1)
YEAR_F = to_f(list(daily_means_c()))
# α = 1 therm/day, β = 0.2 therm/(°F·day), τ = 60 °F, noise free, on the 2023 weather
PERIODS = synthetic_bills(YEAR_F, FIRST, alpha=1.0, beta=0.2, base=60.0)
HDD60_NORMAL = sum(max(0.0, 60.0 - t) for t in YEAR_F)
WALL = {"heat_flow": "horizontal", "films": "none", "layers": [{"name": "wall", "r": 2.0}]}


def _paste() -> str:
    """The periods as a spreadsheet copies them (US dates), the third read estimated."""
    lines = ["Start\tEnd\tTherms\tType"]
    for k, p in enumerate(PERIODS):
        s, e = date.fromisoformat(p["start"]), date.fromisoformat(p["end"])
        lines.append(
            f"{s.month}/{s.day}/{s.year}\t{e.month}/{e.day}/{e.year}\t{p['use']!r}\t{'E' if k == 2 else 'A'}"
        )
    return "\n".join(lines)


def _new_house(session, organization_id: int, *, normals: bool = True) -> House:  # type: ignore[no-untyped-def]
    house = create_house(session=session, organization_id=organization_id, label="12 Invented Lane")
    climate: dict = {"hdd": 5000.0, "cdd": 0.0}
    if normals:  # the house's weather file, with its normal year kept beside it
        climate["weather"] = {
            "file": "tmy.csv",
            **climate_normals(normal_daily_means(TMY3.read_bytes())),
        }
    house.climate = climate
    house.heating = {"fuel": "natural_gas", "efficiency": 0.8, "price": 1.5}
    house.economics = {"discount_rate": 0.03, "fuel_escalation": 0.0, "years": 20}
    session.add(
        Surface(
            house=house,
            position=0,
            slug="walls",
            name="Walls",
            kind="wall",
            area=1000.0,
            assembly=WALL,
        )
    )
    session.flush()
    return house


def _bills() -> dict:
    read = read_bill_text(_paste())
    weather = weather_from_files([("year.epw", epw_of_one_year(2023))], units="ip")
    periods = read.periods()
    return {"periods": periods, "daily_temperatures": weather.daily_temperatures("ip", periods)}


def test_bills_are_stored_read_back_and_calibrate_the_saved_house(app, firm_a) -> None:  # type: ignore[no-untyped-def]
    with session_scope(app.state.session_factory) as s:
        house = _new_house(s, firm_a.organization_id)
        version = house.version
        fit = save_bills(session=s, house=house, bills=_bills(), expected_version=version)
        assert fit is not None and fit.base_temperature == pytest.approx(60.0, abs=0.05)
        house_id = house.id
        assert house.version == version + 1
    with session_scope(app.state.session_factory) as s:
        house = get_house(session=s, organization_id=firm_a.organization_id, house_id=house_id)
        stored = house.bills
        assert stored is not None and stored["fuel"] == "natural_gas"  # stored explicitly
        assert len(stored["periods"]) == len(PERIODS)
        assert [p["estimated"] for p in stored["periods"][:4]] == [False, False, True, False]
        assert {p["source"] for p in stored["periods"]} == {"pasted"}
        assert stored["daily_temperatures"]["source"].startswith("EPW file year.epw")
        assert len(stored["normal_temperatures"]["values"]) == 365  # from the house's weather
        doc = house_document(house)
        assert doc.bills is not None
        result = compute_house(doc)
    cal = result.calibration
    assert cal is not None
    # model: UA = 1000 ft² / R-2 = 500 Btu/(h·°F); 500 × 5000 °F·day × 24 h / (100 000 × 0.8)
    # = 750 therm; bills: β HDD60 of the normal year (stored to 0.01 °C, so to 2e-3)
    assert cal.model_heating_use == pytest.approx(750.0)
    assert cal.bills_heating_use == pytest.approx(0.2 * HDD60_NORMAL, rel=2e-3)
    assert cal.ratio == pytest.approx(0.2 * HDD60_NORMAL / 750.0, rel=2e-3)
    assert any("estimated read" in w for w in cal.fit.warnings)


def test_a_stale_version_is_a_conflict_and_nothing_is_stored(app, firm_a) -> None:  # type: ignore[no-untyped-def]
    with session_scope(app.state.session_factory) as s:
        house = _new_house(s, firm_a.organization_id)
        house_id, stale = house.id, house.version
        house.notes = "someone else saved"
        s.flush()  # the version moves on
        with pytest.raises(Conflict):
            save_bills(session=s, house=house, bills=_bills(), expected_version=stale)
    with session_scope(app.state.session_factory) as s:
        assert (
            get_house(session=s, organization_id=firm_a.organization_id, house_id=house_id).bills
            is None
        )


def test_bills_that_do_not_compute_are_refused_by_field(app, firm_a) -> None:  # type: ignore[no-untyped-def]
    with session_scope(app.state.session_factory) as s:
        house = _new_house(s, firm_a.organization_id, normals=False)
        with pytest.raises(InputError) as caught:
            save_bills(session=s, house=house, bills=_bills(), expected_version=None)
        assert caught.value.field == "bills.normal_temperatures"
        with pytest.raises(InputError) as caught:
            save_bills(
                session=s, house=house, bills={**_bills(), "fuel": "propane"}, expected_version=None
            )
        assert caught.value.field == "bills.fuel"
        short = _bills()
        short["daily_temperatures"]["values"] = short["daily_temperatures"]["values"][:40]
        short["normal_temperatures"] = {"values": YEAR_F}
        with pytest.raises(InputError) as caught:
            save_bills(session=s, house=house, bills=short, expected_version=None)
        assert caught.value.field == "bills.daily_temperatures"
        with pytest.raises(InputError) as caught:
            save_bills(session=s, house=house, bills={"periods": []}, expected_version=None)
        assert caught.value.field == "bills.periods"
        assert house.bills is None
        save_bills(
            session=s,
            house=house,
            bills={**_bills(), "normal_temperatures": {"values": YEAR_F}},
            expected_version=None,
        )
        assert house.bills is not None
        save_bills(session=s, house=house, bills=None, expected_version=house.version)
        assert house.bills is None  # removed


def test_switching_units_converts_the_stored_bills(app, firm_a) -> None:  # type: ignore[no-untyped-def]
    with session_scope(app.state.session_factory) as s:
        house = _new_house(s, firm_a.organization_id)
        save_bills(session=s, house=house, bills=_bills(), expected_version=None)
        before = compute_house(house_document(house)).calibration
        ip_values = list(house.bills["daily_temperatures"]["values"])
        switch_units(session=s, house=house, units="si", expected_version=house.version)
        # °C = (°F − 32) / 1.8
        assert house.bills["daily_temperatures"]["values"][0] == pytest.approx(
            (ip_values[0] - 32) / 1.8
        )
        after = compute_house(house_document(house)).calibration
        switch_units(session=s, house=house, units="ip", expected_version=house.version)
        assert house.bills["daily_temperatures"]["values"] == pytest.approx(ip_values)
    assert before is not None and after is not None
    assert after.ratio == pytest.approx(before.ratio, rel=1e-6)


def _document_with_bills() -> dict:
    bills = _bills()
    bills["normal_temperatures"] = {"values": YEAR_F}
    return {
        "units": "ip",
        "name": "34 Invented Road",
        "climate": {"hdd": 5000, "cdd": 0},
        "heating": {"fuel": "natural_gas", "efficiency": 0.8, "price": 1.5},
        "surfaces": [{"id": "walls", "kind": "wall", "area": 1000, "assembly": WALL}],
        "upgrades": [{"id": "better", "surface": "walls", "u": 0.25, "cost": {"fixed": 3000}}],
        "packages": [{"id": "p", "upgrades": ["better"]}],
        "economics": {"discount_rate": 0.03, "fuel_escalation": 0.0, "years": 20},
        "bills": bills,
    }


def test_export_and_import_carry_the_bills(client: TestClient) -> None:
    doc = _document_with_bills()
    saved = client.post("/api/v1/houses", json=doc)
    assert saved.status_code == 201, saved.text
    exported = client.get(f"/api/v1/houses/{saved.json()['id']}/document").json()
    bills = exported["bills"]
    given = [{k: v for k, v in p.items() if v is not None} for p in bills["periods"]]
    assert given == doc["bills"]["periods"]  # the export also lists the fields left empty
    assert bills["daily_temperatures"] == doc["bills"]["daily_temperatures"]
    assert bills["normal_temperatures"]["values"] == pytest.approx(YEAR_F)
    again = client.post("/api/v1/houses", json=exported)
    assert again.status_code == 201, again.text
    second = client.get(f"/api/v1/houses/{again.json()['id']}/document").json()
    assert second["bills"] == bills
    result = client.post("/api/v1/calc/house", json=exported)
    assert result.status_code == 200, result.text
    assert result.json()["calibration"]["ratio"] == pytest.approx(
        0.2 * HDD60_NORMAL / 750.0, rel=2e-3
    )


def test_typed_degree_days_survive_export_and_import(client: TestClient) -> None:
    doc = _document_with_bills()
    bills = copy.deepcopy(doc["bills"])
    del bills["daily_temperatures"]
    bills["degree_day_base"] = 65
    for p in bills["periods"]:
        first = (date.fromisoformat(p["start"]) - FIRST).days
        days = (date.fromisoformat(p["end"]) - date.fromisoformat(p["start"])).days
        p["hdd"] = sum(max(0.0, 65.0 - t) for t in YEAR_F[first : first + days])
    doc["bills"] = bills
    saved = client.post("/api/v1/houses", json=doc)
    assert saved.status_code == 201, saved.text
    exported = client.get(f"/api/v1/houses/{saved.json()['id']}/document").json()
    assert exported["bills"]["degree_day_base"] == 65
    assert [p["hdd"] for p in exported["bills"]["periods"]] == [p["hdd"] for p in bills["periods"]]
    fit = client.post("/api/v1/calc/house", json=exported).json()["calibration"]["fit"]
    assert (
        fit["base_temperature"] == pytest.approx(65.0) and fit["base_temperature_searched"] is False
    )


def test_a_bad_bills_import_is_refused_naming_the_field(client: TestClient) -> None:
    doc = _document_with_bills()
    doc["bills"]["periods"][1]["end"] = doc["bills"]["periods"][1]["start"]
    response = client.post("/api/v1/houses", json=doc)
    assert response.status_code == 422
    assert response.json()["errors"][0]["field"] == "bills.periods[1].end"
