"""POST /api/v1/calc/degree-days: every kind of upload, every bad input -> 422, never a 500.

Sources: hand-worked files (arithmetic in the comments); pvlib's bundled TMY3 file
723170TYA.CSV (real data, not ours); the unit fact HDD[°F·day] = 1.8 x HDD[K·day] at matching
bases (65 °F = 18.33 °C).
"""

from __future__ import annotations

import math
import pathlib
from datetime import date, datetime, timedelta

import pvlib
import pytest
from fastapi.testclient import TestClient
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from server.api.routes import degree_days as route
from server.app import create_app
from server.config import Settings
from server.physics.units import f_to_c

client = TestClient(create_app(Settings(environment="test", database_url="sqlite://")))
URL = "/api/v1/calc/degree-days"
TMY3 = (pathlib.Path(pvlib.__file__).parent / "data" / "723170TYA.CSV").read_bytes()
EPW_HEADER = [
    "LOCATION,Testville,ST,USA,generated,000000,40.00,-80.00,-5.0,300.0",
    "DESIGN CONDITIONS,0",
    "TYPICAL/EXTREME PERIODS,0",
    "GROUND TEMPERATURES,0",
    "HOLIDAYS/DAYLIGHT SAVINGS,No,0,0,0",
    "COMMENTS 1,generated",
    "COMMENTS 2,",
    "DATA PERIODS,1,1,Data,Sunday, 1/ 1,12/31",
]


def post(data: bytes | None, **form: object):
    files = {"file": ("weather.dat", data or b"", "application/octet-stream")}
    return client.post(URL, files=files if data is not None else None, data=form)


def assert_422(response, field: str) -> dict:
    assert response.status_code == 422, response.text
    body = response.json()
    assert set(body) == {"detail", "errors"}
    assert isinstance(body["detail"], str) and body["detail"]
    assert body["errors"] and all(set(e) == {"field", "message"} for e in body["errors"])
    assert body["errors"][0]["field"] == field
    return body


def epw(temps: list[float]) -> bytes:
    rows = []
    for i, temp in enumerate(temps):
        t = datetime(2001, 1, 1) + timedelta(hours=i)
        rows.append(f"{t.year},{t.month},{t.day},{t.hour + 1},60,src,{temp},0,50,101325")
    return "\n".join(EPW_HEADER + rows).encode()


# --- each kind of upload -------------------------------------------------------------------


def test_tmy3_upload_in_ip_and_si_agree_by_1_8():
    # HDD °F·day = 1.8 x HDD K·day at matching bases: 65 °F and (65 - 32) * 5/9 = 18.333 °C.
    ip = post(TMY3, units="ip", heating_base="65", cooling_base="65")
    si = post(TMY3, units="si", heating_base=str(f_to_c(65.0)), cooling_base=str(f_to_c(65.0)))
    assert ip.status_code == si.status_code == 200
    a, b = ip.json(), si.json()
    assert a["kind"] == "tmy3" and a["days"] == 365 and a["hours"] == 8760
    assert a["hdd"] == pytest.approx(1.8 * b["hdd"], rel=1e-9)
    assert a["cdd"] == pytest.approx(1.8 * b["cdd"], rel=1e-9)
    assert [m["hdd"] for m in a["monthly"]] == pytest.approx([1.8 * m["hdd"] for m in b["monthly"]])
    # Design temperatures convert as temperatures: °F = °C * 9/5 + 32.
    assert a["heating_design_temperature"] == pytest.approx(
        b["heating_design_temperature"] * 1.8 + 32
    )
    assert a["climate_zone"] == b["climate_zone"]
    assert a["hdd18"] == pytest.approx(1.8 * b["hdd18"], rel=1e-9)


def test_defaults_are_65_f_and_18_3_c():
    assert post(TMY3, units="ip").json()["heating_base"] == 65.0
    body = post(TMY3, units="si").json()
    assert (body["heating_base"], body["cooling_base"]) == (18.3, 18.3)
    assert len(body["monthly"]) == 12 and [m["month"] for m in body["monthly"]] == list(
        range(1, 13)
    )
    assert len(body["degree_days_by_base"]) == 31  # 0..30 °C


def test_epw_upload_hand_worked():
    # 365 days x 24 h at 8.3 °C, base 18.3 °C -> HDD = 365 * 10 = 3650 K·day, CDD = 0.
    response = post(epw([8.3] * 8760), units="si")
    assert response.status_code == 200, response.text
    body = response.json()
    assert body["kind"] == "epw" and body["station"] == "Testville"
    assert body["hdd"] == pytest.approx(3650.0, rel=1e-9) and body["cdd"] == 0.0
    assert body["first_date"] == "2001-01-01" and body["last_date"] == "2001-12-31"
    # Limiting case: a constant temperature -> both design temperatures equal it.
    assert body["heating_design_temperature"] == pytest.approx(8.3)
    assert body["cooling_design_temperature"] == pytest.approx(8.3)
    assert body["warnings"] == []


def test_csv_hourly_upload_hand_worked():
    # Day 1: 24 h at 10 °C -> mean 10. Day 2: 12 h at 16 and 12 h at 24 -> mean 20.
    # Base 18 °C: HDD = (18 - 10) + 0 = 8 K·day; CDD = 0 + (20 - 18) = 2 K·day.
    temps = [10.0] * 24 + [16.0] * 12 + [24.0] * 12
    rows = [f"{datetime(2021, 1, 1) + timedelta(hours=i)},{t}" for i, t in enumerate(temps)]
    data = ("timestamp,temperature_c\n" + "\n".join(rows)).encode()
    body = post(data, units="si", heating_base="18", cooling_base="18").json()
    assert body["kind"] == "csv-hourly" and body["days"] == 2 and body["hours"] == 48
    assert (body["hdd"], body["cdd"]) == pytest.approx((8.0, 2.0))
    assert body["monthly"][0] == {
        "month": 1,
        "hdd": pytest.approx(8.0),
        "cdd": pytest.approx(2.0),
        "days": 2,
    }
    assert any("48 hours" in w for w in body["warnings"])


def test_csv_daily_upload_in_fahrenheit_hand_worked():
    # 365 days at 55 °F, base 65 °F -> HDD = 365 * 10 = 3650 °F·day; CDD 0.
    rows = [f"{date(2021, 1, 1) + timedelta(days=i)},55" for i in range(365)]
    body = post(("date,tavg_f\n" + "\n".join(rows)).encode(), units="ip").json()
    assert body["kind"] == "csv-daily" and body["hours"] is None
    assert body["hdd"] == pytest.approx(3650.0, rel=1e-9) and body["cdd"] == pytest.approx(0.0)
    assert body["design_temperature_basis"] == "daily"
    assert any("daily means" in w for w in body["warnings"])


def test_named_column_and_unit_as_form_fields_and_as_query_options():
    # Column 'reading' in °F: 41 °F = 5 °C; base 15 °C over 2 days -> HDD = 2 * 10 = 20 K·day.
    rows = [f"2021-01-0{1 + i // 24} {i % 24:02d}:00,41,99" for i in range(48)]
    data = ("when,reading,other temp\n" + "\n".join(rows)).encode()
    form = post(
        data, units="si", heating_base="15", temperature_column="reading", temperature_unit="F"
    )
    files = {"file": ("w.csv", data)}
    query = client.post(
        URL + "?temperature_column=reading&temperature_unit=F",
        files=files,
        data={"units": "si", "heating_base": "15"},
    )
    for response in (form, query):
        assert response.status_code == 200, response.text
        assert response.json()["hdd"] == pytest.approx(20.0)


def test_file_text_sent_as_a_plain_form_field_is_read_too():
    rows = [f"{date(2021, 1, 1) + timedelta(days=i)},8.3" for i in range(3)]
    response = client.post(URL, data={"units": "si", "file": "date,temp_c\n" + "\n".join(rows)})
    assert response.status_code == 200
    assert response.json()["hdd"] == pytest.approx(30.0)  # 3 days x 10 K


# --- bad input -> 422 ----------------------------------------------------------------------


@pytest.mark.parametrize(
    ("data", "form", "field"),
    [
        (b"", {"units": "si"}, "file"),  # empty
        (b"\x00\xff\x13binary\x00" * 50, {"units": "si"}, "file"),  # binary garbage
        (b"time,pressure\n2021-01-01 00:00,1013\n", {"units": "si"}, "file"),  # no temp column
        (b"Once upon a time there was a house.\nThe end.\n", {"units": "si"}, "file"),  # prose
        (b"PK\x03\x04zipped", {"units": "si"}, "file"),
        (TMY3, {"units": "si", "heating_base": "nan"}, "heating_base"),
        (TMY3, {"units": "si", "cooling_base": "inf"}, "cooling_base"),
        (TMY3, {"units": "si", "heating_base": "-Infinity"}, "heating_base"),
        (TMY3, {"units": "si", "heating_base": "warm"}, "heating_base"),
        (TMY3, {"units": "ip", "heating_base": "500"}, "heating_base"),  # beyond 122 °F
        (TMY3, {"units": "metric"}, "units"),
        (TMY3, {}, "units"),
        (None, {"units": "si"}, "file"),  # no file at all
        (
            b"time,temp\n2021-01-01 00:00,5\n",
            {"units": "si", "temperature_unit": "K"},
            "temperature_unit",
        ),
        (
            b"time,temp\n2021-01-01 00:00,5\n",
            {"units": "si", "temperature_column": "t"},
            "temperature_column",
        ),
    ],
)
def test_bad_input_is_422_with_a_plain_body(data, form, field):
    assert_422(post(data, **form), field)


def test_upload_over_the_limit_is_422(monkeypatch):
    # The limit itself (20 MB) is replaced by 1 kB so the test stays fast.
    monkeypatch.setattr(route, "MAX_UPLOAD_BYTES", 1024)
    body = assert_422(post(b"x" * 2000, units="si"), "file")
    assert "larger than" in body["errors"][0]["message"]


def test_a_real_20_mb_upload_is_refused():
    body = assert_422(post(b"0" * (route.MAX_UPLOAD_BYTES + 1), units="si"), "file")
    assert "20 MB" in body["detail"]


def test_the_endpoint_is_in_the_openapi_schema():
    schema = client.get("/openapi.json").json()
    operation = schema["paths"][URL]["post"]
    assert "422" in operation["responses"] and "200" in operation["responses"]


@settings(max_examples=50, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(
    st.binary(max_size=600),
    st.sampled_from(["ip", "si"]),
    st.one_of(
        st.none(), st.floats(allow_nan=True, allow_infinity=True).map(str), st.text(max_size=5)
    ),
)
def test_never_a_500(data, units, base):
    form = {"units": units} | ({"heating_base": base} if base is not None else {})
    response = post(data, **form)
    assert response.status_code in (200, 422)
    if response.status_code == 200:
        assert math.isfinite(response.json()["hdd"])
