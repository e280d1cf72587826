"""Every form reads numbers by one set of rules (server/services/number_text.py).

Each bad value is refused on the form that takes it: the page comes back (422, the project's
status for a rejected form) with the typed text kept and a message beside the field, never a
500 and never "Not found". Values that were silently misread before (area ``1,5`` stored as 15,
layer R ``1,000`` as 1.0) are now read one way everywhere.
"""

from __future__ import annotations

import html
import re

import pytest
from fastapi.testclient import TestClient


def _house(client: TestClient, units: str = "ip") -> str:
    r = client.post("/houses", data={"label": "Numbers", "units": units}, follow_redirects=False)
    assert r.status_code == 303
    return r.headers["location"]


def _version(client: TestClient, url: str) -> str:
    return re.search(r'name="version" value="(\d+)"', client.get(url).text).group(1)  # type: ignore[union-attr]


def _surface(client: TestClient, house: str) -> str:
    r = client.post(f"{house}/surfaces", data={"typical": "wall-2x4-16-r13", "area": "100"},
                    follow_redirects=False)  # fmt: skip
    assert r.status_code == 303, r.text
    return r.headers["location"]


def _document(client: TestClient, house: str) -> dict:  # type: ignore[type-arg]
    return client.get(f"/api/v1/houses/{house.rsplit('/', 1)[1]}/document").json()


def _editor_fields(page: str) -> dict[str, str]:
    fields = dict(re.findall(r'name="(layers-\d+-[a-z_]+)" value="([^"]*)"', page))
    for name, body in re.findall(
        r'<select id="[^"]+" name="([^"]+)"[^>]*>(.*?)</select>', page, re.S
    ):
        chosen = re.search(r'<option value="([^"]*)" selected', body)
        fields[name] = chosen.group(1) if chosen else ""
    fields["layer_count"] = re.search(r'name="layer_count" value="(\d+)"', page).group(1)  # type: ignore[union-attr]
    fields["version"] = re.search(r'name="version" value="(\d+)"', page).group(1)  # type: ignore[union-attr]
    return fields


def _kept(text: str, page: str) -> bool:
    return f'value="{html.escape(text)}"' in page


# --- area ------------------------------------------------------------------------------------


def test_area_with_a_lone_comma_in_us_units_asks_which_was_meant(client: TestClient) -> None:
    house = _house(client)
    r = client.post(f"{house}/surfaces", data={"typical": "wall-2x4-16-r13", "area": "1,5"})
    assert r.status_code == 422
    assert "did you mean 1.5 or 15?" in r.text and _kept("1,5", r.text)


def test_area_with_a_decimal_comma_in_a_metric_house_is_one_and_a_half(client: TestClient) -> None:
    house = _house(client, "si")
    r = client.post(f"{house}/surfaces", data={"typical": "wall-2x4-16-r13", "area": "1,5"},
                    follow_redirects=False)  # fmt: skip
    assert r.status_code == 303
    assert _document(client, house)["surfaces"][0]["area"] == 1.5


def test_area_update_with_a_lone_comma_is_not_stored_as_fifteen(client: TestClient) -> None:
    house = _house(client)
    surface = _surface(client, house)
    r = client.post(surface, data={"name": "Wall", "kind": "wall", "area": "1,5",
                                   "version": _version(client, surface)})  # fmt: skip
    assert r.status_code == 422
    assert "did you mean 1.5 or 15?" in r.text and _kept("1,5", r.text)
    assert _document(client, house)["surfaces"][0]["area"] == 100.0


# --- layer R ---------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("units", "typed", "message"),
    [
        ("ip", "1,5", "did you mean 1.5 or 15?"),
        ("si", "1,000", "did you mean 1.000 or 1000?"),
        ("ip", "1.234,5", "mixes a dot and a comma"),
        ("ip", "1e309", "too large a number"),
        ("ip", "٣", "is not a number"),  # float("٣") is 3.0 in Python
    ],
)
def test_layer_r_refusals_keep_the_typed_text(
    client: TestClient, units: str, typed: str, message: str
) -> None:
    house = _house(client, units)
    surface = _surface(client, house)
    before = _document(client, house)["surfaces"][0]["assembly"]["layers"][0]
    fields = _editor_fields(client.get(surface).text)
    fields["layers-0-r"] = typed
    r = client.post(f"{surface}/assembly", data=fields)
    assert r.status_code == 422
    assert html.escape(message) in r.text and _kept(typed, r.text)
    assert _document(client, house)["surfaces"][0]["assembly"]["layers"][0] == before


def test_layer_r_with_grouping_comma_is_a_thousand_not_one(client: TestClient) -> None:
    house = _house(client)
    surface = _surface(client, house)
    fields = _editor_fields(client.get(surface).text)
    fields["layers-0-r"] = "1,000"
    assert (
        client.post(f"{surface}/assembly", data=fields, follow_redirects=False).status_code == 303
    )
    assert _document(client, house)["surfaces"][0]["assembly"]["layers"][0]["r"] == 1000.0


def test_two_layers_of_r_1e308_are_refused_not_saved_as_infinity(client: TestClient) -> None:
    house = _house(client)
    surface = _surface(client, house)
    before = _document(client, house)["surfaces"][0]["assembly"]
    fields = _editor_fields(client.get(surface).text)
    fields["layers-0-r"] = "1e308"
    fields["layers-1-type"], fields["layers-1-r"] = "r", "1e308"
    r = client.post(f"{surface}/assembly", data=fields)
    assert r.status_code == 422
    assert "too large to compute" in r.text and _kept("1e308", r.text)
    assert "R-inf" not in r.text
    assert _document(client, house)["surfaces"][0]["assembly"] == before


# --- air leakage and money -------------------------------------------------------------------


def test_air_leakage_grouping_comma_in_a_metric_house_is_ambiguous(client: TestClient) -> None:
    house = _house(client, "si")
    r = client.post(f"{house}/settings/air_leakage",
                    data={"cfm50": "12,000", "volume": "340", "version": _version(client, house)})  # fmt: skip
    assert r.status_code == 422
    assert "did you mean 12.000 or 12000?" in r.text and _kept("12,000", r.text)


def test_air_leakage_decimal_comma_in_a_metric_house(client: TestClient) -> None:
    house = _house(client, "si")
    r = client.post(f"{house}/settings/air_leakage",
                    data={"n50": "4,5", "volume": "340", "version": _version(client, house)},
                    follow_redirects=False)  # fmt: skip
    assert r.status_code == 303
    page = client.get(house).text
    assert 'name="n50"' in page and 'value="4.5"' in page and 'value="45"' not in page


@pytest.mark.parametrize("field", ["years", "loan.years"])
@pytest.mark.parametrize(
    ("typed", "message"),
    [("NaN", "must be a finite number"), ("inf", "must be a finite number"),
     ("1e309", "too large a number"), ("٣", "is not a number")],
)  # fmt: skip
def test_economics_years_refusals_keep_the_input(
    client: TestClient, field: str, typed: str, message: str
) -> None:
    house = _house(client)
    data = {"discount_rate": "3", "fuel_escalation": "2", "years": "20", "loan.apr": "6",
            "loan.years": "10", "version": _version(client, house)}  # fmt: skip
    data[field] = typed
    r = client.post(f"{house}/settings/economics", data=data)
    assert r.status_code == 422
    assert "Not found" not in r.text
    assert message in r.text and _kept(typed, r.text)


# --- whole numbers: version, surface_id, days_valid ------------------------------------------


def test_version_superscript_on_the_settings_form(client: TestClient) -> None:
    house = _house(client)
    r = client.post(f"{house}/settings/climate", data={"hdd": "5400", "version": "²"})
    assert r.status_code == 422
    assert "version mark is not a whole number" in r.text and _kept("5400", r.text)


def test_version_superscript_on_the_layer_editor(client: TestClient) -> None:
    house = _house(client)
    surface = _surface(client, house)
    fields = _editor_fields(client.get(surface).text)
    fields["version"], fields["layers-0-r"] = "²", "0.9"
    r = client.post(f"{surface}/assembly", data=fields)
    assert r.status_code == 422
    assert "version mark is not a whole number" in r.text and _kept("0.9", r.text)


def test_version_superscript_on_the_surface_details(client: TestClient) -> None:
    house = _house(client)
    surface = _surface(client, house)
    r = client.post(surface, data={"name": "Wall", "kind": "wall", "area": "120", "version": "²"})
    assert r.status_code == 422
    assert "version mark is not a whole number" in r.text and _kept("120", r.text)


def test_version_superscript_on_add_surface(client: TestClient) -> None:
    house = _house(client)
    r = client.post(
        f"{house}/surfaces", data={"typical": "wall-2x4-16-r13", "area": "140", "version": "²"}
    )
    assert r.status_code == 422
    assert "version mark is not a whole number" in r.text and _kept("140", r.text)


def test_version_superscript_on_air_sealing(client: TestClient) -> None:
    house = _house(client)
    r = client.post(
        f"{house}/upgrades", data={"kind": "air_sealing", "cfm50_after": "2200", "version": "²"}
    )
    assert r.status_code == 422
    assert "version mark is not a whole number" in r.text and _kept("2200", r.text)


@pytest.mark.parametrize("typed", ["1.5", "²", "NaN"])
def test_surface_id_that_is_not_a_whole_number(client: TestClient, typed: str) -> None:
    house = _house(client)
    r = client.post(f"{house}/upgrades", data={"kind": "assembly", "surface_id": typed,
                                                "start": "as_found", "version": _version(client, house)})  # fmt: skip
    assert r.status_code == 422
    assert f"{html.escape(typed)}&#39; is not a surface of this house" in r.text


@pytest.mark.parametrize("typed", ["²", "٣"])  # both isdigit(); int("٣") is 3
def test_share_link_days_valid_that_is_not_a_whole_number(client: TestClient, typed: str) -> None:
    house = _house(client)
    r = client.post(f"{house}/share-links", data={"label": "Owner", "days_valid": typed})
    assert r.status_code == 422
    assert "give a whole number of days" in r.text and _kept(typed, r.text)
