"""The House page's Bills section: typed, pasted, CSV and Green Button bills saved through the
page give the same stored bills and the same fit as ``POST /api/v1/calc/bills``.

Outside sources:
* pvlib's bundled TMY3 file 723170TYA.CSV (Greensboro NC): its daily means (pandas,
  tests/utils/tmy3.py) stamped as the year 2025 are the "actual" weather of the bills, written
  as a daily station CSV (DATE,TAVG); the same file uploaded as the house's weather file gives
  the typical year the bills are normalised to.
* numpy's least squares (``numpy.linalg.lstsq`` on rows scaled by √n_i) on pandas-free
  degree-days at the page's base: the weighted regression of the contract, computed apart.
* The bills are synthesised on that weather (tests/utils/tmy3.py): α = 1.5 therm/day,
  β = 0.18 therm/(°F·day), τ = 62 °F, 2 % seeded noise — invented, plausible for a gas house.
"""

from __future__ import annotations

import re
from datetime import date, timedelta
from pathlib import Path
from typing import Any

import numpy as np
import pvlib
import pytest
from fastapi.testclient import TestClient

from tests.utils.green_button import Meter, Reading, feed, local
from tests.utils.tmy3 import daily_means_c, synthetic_bills, to_f

HX = {"HX-Request": "true"}
TMY3 = Path(pvlib.__file__).parent / "data" / "723170TYA.CSV"
FIRST = date(2025, 1, 1)
ALPHA, BETA, BASE_F = 1.5, 0.18, 62.0


def _bills() -> list[dict[str, Any]]:
    periods = synthetic_bills(to_f(daily_means_c()), FIRST, alpha=ALPHA, beta=BETA,
                              base=BASE_F, noise=0.02, seed=7)  # fmt: skip
    return [{**p, "use": round(p["use"], 1)} for p in periods]


def _daily_csv(celsius: bool = False) -> bytes:
    values = daily_means_c() if celsius else to_f(daily_means_c())
    lines = ["DATE,TAVG"] + [
        f"{(FIRST + timedelta(days=k)).isoformat()},{v:.4f}" for k, v in enumerate(values)
    ]
    return ("\n".join(lines) + "\n").encode()


def _version(client: TestClient, url: str) -> str:
    return re.search(r'name="version" value="(\d+)"', client.get(url).text).group(1)  # type: ignore[union-attr]


def _house(client: TestClient, units: str = "ip") -> str:
    house = client.post("/houses", data={"label": "Bills house"}, follow_redirects=False)
    url = house.headers["location"]
    client.post(f"{url}/surfaces", data={"typical": "wall-2x4-16-r13", "area": "1400"})
    if units == "si":
        client.post(f"{url}/units", data={"units": "si", "version": _version(client, url)})
    price = "1.45" if units == "ip" else "1,45"
    client.post(f"{url}/settings/heating",
                data={"fuel": "natural_gas", "efficiency": "0.8" if units == "ip" else "0,8", "price": price,
                      "version": _version(client, url)}, headers=HX)  # fmt: skip
    r = client.post(f"{url}/weather", data={"version": _version(client, url)},
                    files={"file": ("723170TYA.CSV", TMY3.read_bytes())}, headers=HX)  # fmt: skip
    assert r.status_code == 200
    return url


def _stored(client: TestClient, url: str) -> dict[str, Any] | None:
    house_id = url.rsplit("/", 1)[1]
    return client.get(f"/api/v1/houses/{house_id}/document").json().get("bills")


def _typed(periods: list[dict[str, Any]]) -> dict[str, str]:
    data = {}
    for i, p in enumerate(periods):
        data |= {f"p{i}.start": p["start"], f"p{i}.end": p["end"], f"p{i}.use": f"{p['use']}"}
    return data


def _post(client: TestClient, url: str, data: dict[str, str], files: list[Any] | None = None,
          weather: bool = True, **kw: Any):  # type: ignore[no-untyped-def]  # fmt: skip
    body = {"version": _version(client, url), **data}
    sent = list(files or [])
    if weather:
        sent.append(("weather_file", ("station-2025.csv", _daily_csv(), "text/csv")))
    return client.post(f"{url}/bills", data=body, files=sent or None, follow_redirects=False, **kw)


def _same_periods(stored: dict[str, Any], periods: list[dict[str, Any]]) -> None:
    got = [(p["start"], p["end"], p["use"]) for p in stored["periods"]]
    assert got == [(p["start"], p["end"], p["use"]) for p in periods]


def _check_fit(client: TestClient, url: str, stored: dict[str, Any], units: str = "ip") -> dict:
    """The page shows the fit that calc/bills gives for the stored bills."""
    api = client.post("/api/v1/calc/bills", json={**stored, "units": units, "efficiency": 0.8})
    assert api.status_code == 200, api.text
    fit = api.json()
    page = client.get(url).text
    temp = "°F" if units == "ip" else "°C"
    assert f"{fit['base_temperature']:.1f} {temp}" in page
    assert f"{fit['heating_slope']:,.4f} therm per" in page
    assert f"{fit['baseload_per_day']:,.2f} therm per day" in page
    assert f"{fit['cv_rmse']:.1f} %" in page and f"{fit['nmbe']:.2f} %" in page
    assert f"{fit['normalized_annual_heating_use']:,.0f} therm" in page
    assert "ASHRAE Guideline 14" in page
    return fit


def test_typed_rows_are_saved_and_fitted_as_calc_bills(client: TestClient) -> None:
    url = _house(client)
    periods = _bills()
    r = _post(client, url, _typed(periods))
    assert r.status_code == 303 and r.headers["location"].endswith("#sec-bills")
    stored = _stored(client, url)
    assert stored is not None and stored["fuel"] == "natural_gas"
    _same_periods(stored, periods)
    assert all(p["source"] == "typed" for p in stored["periods"])
    fit = _check_fit(client, url, stored)
    # recovered from bills with 2 % noise: τ within 1.5 °F, β within 5 %, α within 15 %
    assert fit["base_temperature"] == pytest.approx(BASE_F, abs=1.5)
    assert fit["heating_slope"] == pytest.approx(BETA, rel=0.05)
    assert fit["baseload_per_day"] == pytest.approx(ALPHA, rel=0.15)
    # numpy's weighted least squares at the fitted base on the file's own daily means
    temps = np.array(to_f(daily_means_c()))
    n, u, h = [], [], []
    for p in periods:
        a = (date.fromisoformat(p["start"]) - FIRST).days
        b = (date.fromisoformat(p["end"]) - FIRST).days
        n.append(b - a)
        u.append(p["use"])
        h.append(float(np.maximum(fit["base_temperature"] - temps[a:b], 0).sum()))
    n_a, u_a, h_a = (np.array(v, dtype=float) for v in (n, u, h))
    x = np.column_stack([np.ones_like(n_a), h_a / n_a]) * np.sqrt(n_a)[:, None]
    (alpha, beta), *_ = np.linalg.lstsq(x, (u_a / n_a) * np.sqrt(n_a), rcond=None)
    assert fit["baseload_per_day"] == pytest.approx(alpha, rel=1e-4)
    assert fit["heating_slope"] == pytest.approx(beta, rel=1e-4)
    # the modelled vs bills ratio, from the house's calculation
    page = client.get(url).text
    assert "Modelled vs bills" in page and "ratio" in page


@pytest.mark.parametrize(
    ("sep", "date_of"),
    [("\t", lambda d: f"{d[5:7]}/{d[8:10]}/{d[:4]}"), (",", lambda d: d)],
    ids=["tab-US-dates", "comma-ISO-dates"],
)
def test_pasted_rows_give_the_same_bills(client: TestClient, sep: str, date_of) -> None:  # type: ignore[no-untyped-def]
    url = _house(client)
    periods = _bills()
    text = "\n".join(
        sep.join([date_of(p["start"]), date_of(p["end"]), f"{p['use']}"]) for p in periods
    )
    if sep == "\t":
        assert "03/04/2025" in text or "01/01/2025" in text  # US month/day/year
    r = _post(client, url, {"paste": "Start" + sep + "End" + sep + "Therms\n" + text})
    assert r.status_code == 303, r.text
    stored = _stored(client, url)
    assert stored is not None
    _same_periods(stored, periods)
    assert all(p["source"] == "pasted" for p in stored["periods"])
    _check_fit(client, url, stored)


def test_a_us_date_like_03_04_2025_is_march_the_fourth(client: TestClient) -> None:
    url = _house(client)
    rows = {"p0.start": "03/04/2025", "p0.end": "2025-04-03", "p0.use": "60",
            "p1.start": "2025-04-03", "p1.end": "05/02/2025", "p1.use": "40",
            "p2.start": "05/02/2025", "p2.end": "2025-06-01", "p2.use": "45"}  # fmt: skip
    assert _post(client, url, rows).status_code == 303
    stored = _stored(client, url)
    assert stored is not None
    assert [p["start"] for p in stored["periods"]] == ["2025-03-04", "2025-04-03", "2025-05-02"]


def test_a_csv_and_a_green_button_file_give_the_same_bills(client: TestClient) -> None:
    periods = _bills()
    lines = ["Start,End,Usage (therms),Amount"] + [
        f"{p['start']},{p['end']},{p['use']},${p['use'] * 1.45:.2f}" for p in periods
    ]
    url = _house(client)
    csv = ("bills.csv", ("\n".join(lines) + "\n").encode(), "text/csv")
    assert _post(client, url, {}, [("csv_file", csv)]).status_code == 303
    from_csv = _stored(client, url)
    assert from_csv is not None
    _same_periods(from_csv, periods)
    assert from_csv["periods"][0]["cost"] == pytest.approx(round(periods[0]["use"] * 1.45, 2))
    fit_csv = _check_fit(client, url, from_csv)

    # Green Button: each reading a billing period from local midnight, value × 10^-1 therm
    readings = []
    for p in periods:
        start, end = date.fromisoformat(p["start"]), date.fromisoformat(p["end"])
        moment = local(start.year, start.month, start.day)
        readings.append(Reading(moment, (end - start).days * 86_400, int(round(p["use"] * 10))))
    xml = feed([Meter("1", uom=169, power=-1, kind=1, readings=readings)])
    url2 = _house(client)
    gb = ("usage.xml", xml, "application/xml")
    assert _post(client, url2, {}, [("green_button_file", gb)]).status_code == 303
    from_gb = _stored(client, url2)
    assert from_gb is not None
    got = [(p["start"], p["end"], round(p["use"], 6)) for p in from_gb["periods"]]
    assert got == [(p["start"], p["end"], p["use"]) for p in periods]
    assert all(p["source"] == "green_button" for p in from_gb["periods"])
    fit_gb = _check_fit(client, url2, from_gb)
    assert fit_gb["base_temperature"] == pytest.approx(fit_csv["base_temperature"], abs=1e-9)


def test_a_wrong_row_is_kept_with_its_message_and_nothing_is_saved(client: TestClient) -> None:
    url = _house(client)
    periods = _bills()
    data = _typed(periods)
    data["p2.start"] = "13/45/2025"
    data["p4.use"] = "lots"
    r = _post(client, url, data)
    assert r.status_code == 422
    assert _stored(client, url) is None
    page = r.text
    assert 'value="13/45/2025"' in page and 'value="lots"' in page
    assert 'id="bp-2-start" name="p2.start" value="13/45/2025"' in page
    assert 'aria-describedby="bp-2-start-err"' in page and "13 is no month" in page
    assert 'aria-describedby="bp-4-use-err"' in page
    # every other row is kept as typed
    for p in periods[5:]:
        assert f'value="{p["start"]}"' in page and f'value="{p["use"]}"' in page
    assert "2 rows need a look" in page
    # the weather file sent with the form is kept (hidden), so fixing the rows is enough
    kept = re.search(r'name="weather_kept" value="([^"]+)"', page)
    assert kept is not None
    fixed = _typed(periods) | {"weather_kept": kept.group(1).replace("&#34;", '"')}
    assert _post(client, url, fixed, weather=False).status_code == 303
    stored = _stored(client, url)
    assert stored is not None
    _same_periods(stored, periods)


def test_a_pasted_line_that_cannot_be_read_stays_in_the_paste_box(client: TestClient) -> None:
    url = _house(client)
    periods = _bills()[:4]
    good = "\n".join(f"{p['start']}\t{p['end']}\t{p['use']}" for p in periods)
    r = _post(client, url, {"paste": good + "\n2025-05-01\t2025-05-31\tsome"}, headers=HX)
    assert r.status_code == 200  # htmx: the section with its messages
    assert _stored(client, url) is None
    assert f'value="{periods[0]["start"]}"' in r.text  # read lines moved to the table
    box = re.search(r'<textarea id="bills-paste"[^>]*>([^<]*)</textarea>', r.text)
    assert box is not None and "2025-05-01\t2025-05-31\tsome" in box.group(1)
    assert periods[0]["start"] not in box.group(1)


def test_a_stale_form_is_a_conflict_with_every_row_kept(client: TestClient) -> None:
    url = _house(client)
    periods = _bills()
    old = _version(client, url)
    client.post(f"{url}/settings/economics", data={"discount_rate": "3", "fuel_escalation": "2",
                "years": "20", "version": old}, headers=HX)  # fmt: skip
    body = {"version": old, **_typed(periods)}
    files = [("weather_file", ("station-2025.csv", _daily_csv(), "text/csv"))]
    r = client.post(f"{url}/bills", data=body, files=files, follow_redirects=False)
    assert r.status_code == 409
    assert "Someone else saved this house" in r.text
    assert f'value="{periods[3]["start"]}"' in r.text and _stored(client, url) is None


def test_no_weather_and_no_rows_are_422_with_their_messages(client: TestClient) -> None:
    url = _house(client)
    r = _post(client, url, _typed(_bills()), weather=False)
    assert r.status_code == 422 and "upload the weather of the bills" in r.text
    assert 'aria-describedby="bills-weather-err"' in r.text
    r = _post(client, url, {}, weather=False)
    assert r.status_code == 422 and "enter at least one meter-read period" in r.text


def test_typed_degree_days_fix_the_base_and_the_page_says_so(client: TestClient) -> None:
    url = _house(client)
    periods = _bills()
    temps = np.array(to_f(daily_means_c()))
    data = _typed(periods) | {"weather_mode": "degree_days", "degree_day_base": "65"}
    for i, p in enumerate(periods):
        a = (date.fromisoformat(p["start"]) - FIRST).days
        b = (date.fromisoformat(p["end"]) - FIRST).days
        data[f"p{i}.hdd"] = f"{float(np.maximum(65 - temps[a:b], 0).sum()):.1f}"
    assert _post(client, url, data, weather=False).status_code == 303
    stored = _stored(client, url)
    assert stored is not None and stored["degree_day_base"] == 65
    fit = _check_fit(client, url, stored)
    assert fit["base_temperature"] == 65 and fit["base_temperature_searched"] is False
    assert "cannot search the house" in client.get(url).text


def test_a_metric_house_reads_decimal_commas_and_fits_in_celsius(client: TestClient) -> None:
    url = _house(client, "si")
    periods = _bills()
    data = _typed(periods)
    data["p0.use"] = f"{periods[0]['use']}".replace(".", ",")  # a decimal comma in SI
    files = [("weather_file", ("station-2025.csv", _daily_csv(celsius=True), "text/csv"))]
    r = client.post(f"{url}/bills", data={"version": _version(client, url), **data},
                    files=files, follow_redirects=False)  # fmt: skip
    assert r.status_code == 303, r.text
    stored = _stored(client, url)
    assert stored is not None
    _same_periods(stored, periods)
    fit = _check_fit(client, url, stored, units="si")
    page = client.get(url).text
    assert "K·day" in page and "W/K" in page
    # the same bills in a US house: the base is the same temperature (°C = (°F − 32) / 1.8)
    url_ip = _house(client)
    assert _post(client, url_ip, _typed(periods)).status_code == 303
    stored_ip = _stored(client, url_ip)
    assert stored_ip is not None
    fit_ip = client.post(
        "/api/v1/calc/bills", json={**stored_ip, "units": "ip", "efficiency": 0.8}
    ).json()
    assert fit["base_temperature"] == pytest.approx(
        (fit_ip["base_temperature"] - 32) / 1.8, abs=0.03
    )
    # β per K·day = β per °F·day × 1.8
    assert fit["heating_slope"] == pytest.approx(fit_ip["heating_slope"] * 1.8, rel=2e-3)


def test_removing_the_bills(client: TestClient) -> None:
    url = _house(client)
    assert _post(client, url, _typed(_bills())).status_code == 303
    r = client.post(f"{url}/bills/remove", data={"version": _version(client, url)},
                    follow_redirects=False)  # fmt: skip
    assert r.status_code == 303 and _stored(client, url) is None


def test_estimated_reads_are_flagged_on_the_page(client: TestClient) -> None:
    url = _house(client)
    periods = _bills()
    data = _typed(periods) | {"p3.estimated": "1"}
    assert _post(client, url, data).status_code == 303
    stored = _stored(client, url)
    assert stored is not None and stored["periods"][3]["estimated"] is True
    page = client.get(url).text
    assert "estimated read" in page and "row 4" in page  # the fit's warning, in plain words
