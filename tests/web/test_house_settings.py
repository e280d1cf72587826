"""House page sections: climate typed or from a weather file, systems, air leakage, money."""

from __future__ import annotations

import re
from pathlib import Path

import pvlib
from fastapi.testclient import TestClient

HX = {"HX-Request": "true"}
TMY3 = Path(pvlib.__file__).parent / "data" / "723170TYA.CSV"  # pvlib's bundled TMY3 file


def _house(client: TestClient) -> str:
    return client.post("/houses", data={"label": "Settings house"}, follow_redirects=False).headers[
        "location"
    ]


def _version(client: TestClient, url: str) -> str:
    return re.search(r'name="version" value="(\d+)"', client.get(url).text).group(1)  # type: ignore[union-attr]


def test_typed_climate_and_systems_are_saved(client: TestClient) -> None:
    house = _house(client)
    r = client.post(
        f"{house}/settings/climate",
        data={"hdd": "5,400", "cdd": "900", "version": _version(client, house)},
        headers=HX,
    )
    assert "Climate saved." in r.text
    r = client.post(
        f"{house}/settings/heating",
        data={"fuel": "natural_gas", "efficiency": "0.8", "price": "1.45"},
        headers=HX,
    )
    assert "Heating system saved." in r.text
    doc = None
    page = client.get(house).text
    assert 'value="5400"' in page and 'value="0.8"' in page
    # the saved settings feed the house document
    house_id = house.rsplit("/", 1)[1]
    client.post(f"{house}/surfaces", data={"typical": "wall-2x4-16-r13", "area": "1000"})
    doc = client.get(f"/api/v1/houses/{house_id}/document").json()
    assert doc["climate"]["hdd"] == 5400.0 and doc["climate"]["cdd"] == 900.0
    assert doc["heating"]["fuel"] == "natural_gas" and doc["heating"]["price"] == 1.45


def test_bad_settings_keep_typed_text(client: TestClient) -> None:
    house = _house(client)
    r = client.post(f"{house}/settings/economics",
                    data={"discount_rate": "three", "fuel_escalation": "2", "years": "20.5", "loan.apr": "6"}, headers=HX)  # fmt: skip
    assert 'value="three"' in r.text and "is not a number" in r.text
    assert "must be a whole number" in r.text and "give both the loan APR and its term" in r.text
    r = client.post(
        f"{house}/settings/heating", data={"fuel": "coal", "efficiency": "0.8", "price": "1"}
    )
    assert r.status_code == 422 and "choose one of the list" in r.text


def test_stale_settings_form_is_a_conflict(client: TestClient) -> None:
    house = _house(client)
    old = _version(client, house)
    client.post(f"{house}/settings/climate", data={"hdd": "5000", "version": old}, headers=HX)
    r = client.post(f"{house}/settings/climate", data={"hdd": "6000", "version": old}, headers=HX)
    assert "Someone else saved this house" in r.text and 'value="6000"' in r.text


def test_weather_file_sets_climate_and_balance_point(client: TestClient) -> None:
    house = _house(client)
    r = client.post(f"{house}/weather", data={"version": _version(client, house)},
                    files={"file": ("723170TYA.CSV", TMY3.read_bytes())}, headers=HX)  # fmt: skip
    # Greensboro TMY3 (pvlib): HDD65 ≈ 3,876 °F·day (tests/reference/test_weather_pvlib.py
    # checks it against an independent pandas computation), thermal zone 4
    assert "HDD 3,876" in r.text and "zone 4" in r.text
    r = client.post(
        f"{house}/settings/climate",
        data={"hdd": "3876", "cdd": "1306", "setpoint": "70", "internal_gains": "3000"},
        headers=HX,
    )
    assert "Climate saved." in r.text
    house_id = house.rsplit("/", 1)[1]
    client.post(f"{house}/surfaces", data={"typical": "wall-2x4-16-r13", "area": "1000"})
    client.post(
        f"{house}/settings/heating",
        data={"fuel": "natural_gas", "efficiency": "0.8", "price": "1.45"},
    )
    doc = client.get(f"/api/v1/houses/{house_id}/document").json()
    vb = doc["climate"]["variable_base"]
    assert vb["setpoint"] == 70 and vb["internal_gains"] == 3000 and len(vb["table"]) > 10
    result = client.post("/api/v1/calc/house", json=doc).json()
    # UA = 1000 / 11.83 = 84.5 Btu/(h·°F); balance = 70 − 3000/84.5 = 34.5 °F → far fewer HDD
    # than at 65 °F, so the load is below UA × 3876 × 24
    assert result["as_found"]["heating_load"] < 84.5 * 3876 * 24 * 0.5


def test_not_a_weather_file_is_refused(client: TestClient) -> None:
    house = _house(client)
    r = client.post(
        f"{house}/weather", files={"file": ("notes.txt", b"just some notes\nnothing here\n")}
    )
    assert r.status_code == 422 and "The weather file was not used." in r.text


def test_code_target_beside_surfaces_once_zone_known(client: TestClient) -> None:
    house = _house(client)
    surface = client.post(f"{house}/surfaces", data={"typical": "attic-2x6-16-empty", "area": "500"},
                          follow_redirects=False).headers["location"]  # fmt: skip
    assert "✗ below" not in client.get(house).text  # no zone yet: no verdict
    r = client.post(
        f"{house}/settings/climate", data={"hdd": "6000", "climate_zone": "5a"}, headers=HX
    )
    assert "Climate saved." in r.text
    page = client.get(house).text
    # Empty attic → U 0.44 against the zone 5 ceiling maximum U-0.024 (IECC 2021
    # R402.1.2, from memory — server/data/code_targets.csv): below target
    assert "✗ below" in page and "verify with your locally adopted code" in page
    assert "Below the code target" in client.get(surface).text
    r = client.post(
        f"{house}/settings/climate", data={"hdd": "6000", "climate_zone": "9Z"}, headers=HX
    )
    assert "write the zone like 5 or 5A" in r.text and 'value="9Z"' in r.text


def test_a_weather_file_longer_than_a_year_is_refused_on_the_house_page(
    client: TestClient,
) -> None:
    # 20,000 hourly rows (2.3 years): past the 8,784-row leap year + 64-line margin the page's
    # upload is refused, read by the same bounded reader as the JSON calculator.
    house = _house(client)
    rows = "".join(f"2021-01-01 00:00,{i % 10}\n" for i in range(20_000))
    r = client.post(
        f"{house}/weather",
        files={"file": ("long.csv", ("timestamp,temp_c\n" + rows).encode())},
        data={"version": _version(client, house)},
    )
    assert r.status_code == 422 and "more than 8,848 lines" in r.text


def _stored(app, house_url: str):  # type: ignore[no-untyped-def]
    from server.models import House

    with app.state.session_factory() as s:
        house = s.get(House, int(house_url.rsplit("/", 1)[1]))
        assert house is not None
        return dict(house.heating or {}), dict(house.climate or {})


def _put(app, house_url: str, **columns) -> None:  # type: ignore[no-untyped-def]
    from server.models import House

    with app.state.session_factory() as s:
        house = s.get(House, int(house_url.rsplit("/", 1)[1]))
        for name, value in columns.items():
            setattr(house, name, value)
        s.commit()


def test_a_section_form_keeps_what_it_does_not_show(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    # An imported house carries ducts, a heat pump's ratings, an output capacity and gains that
    # the House page's forms have no field for: saving the form must not drop them, while a
    # field the form shows and the auditor empties is cleared.
    house = _house(client)
    ducts = {"supply_location": "outdoors", "supply_leakage": 0.1}
    _put(app, house,
         heating={"fuel": "natural_gas", "efficiency": 0.8, "price": 1.2, "output_capacity": 80000,
                  "ducts": ducts},
         climate={"hdd": 5000, "gains": {"floor_area": 1800, "bedrooms": 3}, "elevation": 1500})  # fmt: skip
    r = client.post(f"{house}/settings/heating",
                    data={"fuel": "propane", "efficiency": "0.9", "price": "2.5",
                          "version": _version(client, house)}, headers=HX)  # fmt: skip
    assert "Heating system saved." in r.text
    heating, _ = _stored(app, house)
    assert heating["fuel"] == "propane" and heating["efficiency"] == 0.9
    assert heating["ducts"] == ducts and heating["output_capacity"] == 80000
    r = client.post(f"{house}/settings/climate",
                    data={"hdd": "5200", "version": _version(client, house)}, headers=HX)  # fmt: skip
    assert "Climate saved." in r.text
    _, climate = _stored(app, house)
    assert climate["hdd"] == 5200 and climate["elevation"] == 1500
    assert climate["gains"] == {"floor_area": 1800, "bedrooms": 3}
    assert "cdd" not in climate or climate["cdd"] in (0, 0.0)  # shown and left empty: cleared


def test_a_weather_file_keeps_its_bins_sun_and_normal_year_and_the_gains(  # type: ignore[no-untyped-def]
    app, client: TestClient
) -> None:
    # pvlib's bundled Greensboro TMY3 (hourly, with irradiance): the heat pump's temperature
    # bins, the windows' sun table and the bills' 365-day normal year are stored with the
    # climate; the typed gains of the house stay.
    house = _house(client)
    _put(app, house, climate={"hdd": 5000, "gains": {"floor_area": 1800, "bedrooms": 3}})
    r = client.post(f"{house}/weather", data={"version": _version(client, house)},
                    files={"file": ("greensboro.csv", TMY3.read_bytes())}, headers=HX)  # fmt: skip
    assert r.status_code == 200, r.text
    _, climate = _stored(app, house)
    weather = climate["weather"]
    assert climate["gains"] == {"floor_area": 1800, "bedrooms": 3}
    # every hour of the year is in one bin
    assert sum(row["hours"] for row in weather["temperature_bins"]) == 8760
    assert weather["solar"] and len(weather["normal_daily_means_c"]) == 365
    assert climate["hdd"] != 5000
