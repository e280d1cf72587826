"""Weather for the bills' dates and the normal year, on pvlib's bundled TMY3 weather.

Outside sources:
* pvlib's bundled 723170TYA.CSV (Greensboro NC): real hourly dry-bulb temperatures; its
  daily means computed independently with pandas (tests/utils/tmy3.py, hour-ending stamps
  moved back one hour before grouping by date).
* numpy's least squares (``numpy.linalg.lstsq`` on rows scaled by √n_i) for the fixed-base
  fit of typed degree-days, and its covariance ``S/(P−2) (XᵀWX)⁻¹`` for the slope's error.
"""

from __future__ import annotations

import functools
import io
from datetime import date, timedelta

import numpy as np
import pandas as pd
import pytest

from server.documents.bills import BillsRequest
from server.errors import InputError
from server.physics import bills as physics
from server.services.bill_weather import (
    climate_normals,
    degree_days_weather,
    house_normal_daily_means,
    normal_daily_means,
    read_degree_day_base,
    weather_from_files,
)
from server.services.bills import compute_bills
from tests.utils.tmy3 import DATA, synthetic_bills, to_f

TMY3 = DATA / "723170TYA.CSV"


@functools.cache
def daily_means_c() -> tuple[float, ...]:
    """The file's 365 daily means [°C] in calendar order, 1 January to 31 December, by pandas
    (each month of a typical year comes from its own year, so the order is by month and day)."""
    raw = pd.read_csv(TMY3, skiprows=1)
    hour_ending = raw["Time (HH:MM)"].str.slice(0, 2).astype(int)
    start = pd.to_datetime(raw["Date (MM/DD/YYYY)"], format="%m/%d/%Y") + pd.to_timedelta(
        hour_ending - 1, unit="h"
    )
    means = raw["Dry-bulb (C)"].groupby(start.dt.strftime("%m-%d")).mean()
    assert len(means) == 365
    return tuple(float(v) for v in means)


YEAR = 2023  # the TMY3 months, stamped as one actual (non-leap) year
FIRST = date(YEAR, 1, 1)


def epw_of_one_year(year: int | None) -> bytes:
    """An EPW of the TMY3 file's hours; ``year`` stamps every row (None: the file's years)."""
    raw = pd.read_csv(TMY3, skiprows=1)
    header = [
        "LOCATION,Invented,ST,USA,TMY3,000000,0.0,0.0,0.0,0.0",
        "DESIGN CONDITIONS,0",
        "TYPICAL/EXTREME PERIODS,0",
        "GROUND TEMPERATURES,0",
        "HOLIDAYS/DAYLIGHT SAVINGS,No,0,0,0",
        "COMMENTS 1,written by the test",
        "COMMENTS 2,",
        "DATA PERIODS,1,1,Data,Sunday, 1/ 1,12/31",
    ]
    rows = []
    for stamp, clock, dry_bulb in zip(
        raw["Date (MM/DD/YYYY)"], raw["Time (HH:MM)"], raw["Dry-bulb (C)"], strict=True
    ):
        month, day, file_year = (int(p) for p in stamp.split("/"))
        rows.append(
            f"{year or file_year},{month},{day},{int(clock[:2])},60,A7,{dry_bulb},0.0,80,101300"
        )
    return ("\n".join(header + rows) + "\n").encode()


def test_weather_from_an_epw_of_the_actual_year_gives_pandas_daily_means() -> None:
    weather = weather_from_files([("year.epw", epw_of_one_year(YEAR))], units="ip")
    assert (
        weather.source == "epw" and weather.start == FIRST and weather.end == date(YEAR + 1, 1, 1)
    )
    assert weather.basis == "each day's mean of its hourly dry-bulb values"
    np.testing.assert_allclose(weather.daily_mean_c, daily_means_c(), rtol=0, atol=1e-9)
    doc = weather.daily_temperatures("ip", [{"start": "2023-02-01", "end": "2023-03-01"}])
    assert doc is not None and doc["start"] == "2023-02-01" and len(doc["values"]) == 28
    # °F = 1.8 °C + 32 on 1 February (day 31 of the year)
    assert doc["values"][0] == pytest.approx(1.8 * daily_means_c()[31] + 32, abs=1e-4)
    assert doc["source"].startswith("EPW file year.epw")


def test_a_typical_year_file_is_not_the_weather_of_the_bills() -> None:
    with pytest.raises(InputError, match="typical-year file") as caught:
        weather_from_files([("tmy.epw", epw_of_one_year(None))], units="ip")
    assert caught.value.field == "file"


def _daily_csv(columns: str, row) -> bytes:  # type: ignore[no-untyped-def]
    lines = [columns]
    for k, mean_c in enumerate(daily_means_c()):
        lines.append(row(FIRST + timedelta(days=k), 1.8 * mean_c + 32))
    return ("\n".join(lines) + "\n").encode()


def test_weather_from_a_daily_station_export_with_a_mean_column() -> None:
    data = _daily_csv('"STATION","DATE","TAVG"', lambda d, f: f'"X1","{d.isoformat()}","{f:.6f}"')
    weather = weather_from_files([("station.csv", io.BytesIO(data))], units="ip")
    assert (
        weather.source == "daily_csv"
        and weather.basis == "the file's daily mean temperature column"
    )
    # °F in the file (the house is in ip and the column names no unit): back to °C
    np.testing.assert_allclose(weather.daily_mean_c, daily_means_c(), atol=1e-6)


def test_weather_from_a_daily_export_of_max_and_min_uses_their_mean() -> None:
    # max = mean + 9 °F, min = mean − 9 °F, so (max + min) / 2 is the mean again
    data = _daily_csv(
        "DATE,TMAX,TMIN", lambda d, f: f"{d.month}/{d.day}/{d.year},{f + 9:.6f},{f - 9:.6f}"
    )
    weather = weather_from_files([("station.csv", data)], units="ip")
    assert weather.basis.startswith("(max + min) / 2")
    np.testing.assert_allclose(weather.daily_mean_c, daily_means_c(), atol=1e-6)


def test_two_files_give_two_years_and_coverage_names_the_missing_days() -> None:
    first = _daily_csv("DATE,TAVG", lambda d, f: f"{d.isoformat()},{f}")
    second = (
        "DATE,TAVG\n"
        + "".join(
            f"{(date(YEAR + 1, 1, 1) + timedelta(days=k)).isoformat()},40\n" for k in range(31)
        )
    ).encode()
    weather = weather_from_files([("a.csv", first), ("b.csv", second)], units="ip")
    assert weather.start == FIRST and weather.end == date(YEAR + 1, 2, 1)
    periods = [
        {"start": "2023-12-15", "end": "2024-01-20"},
        {"start": "2024-01-20", "end": "2024-02-10"},
    ]
    covered, short = weather.coverage(periods)
    assert covered.covered and covered.message == ""
    # 20 January to 10 February: 21 days, of which 1–9 February (9 days) have no value
    assert (short.missing_days, short.first_missing) == (9, date(2024, 2, 1))
    assert "no temperature for 9 of its 21 days" in short.message


def test_normal_daily_means_of_the_house_weather_file() -> None:
    normals = normal_daily_means(TMY3.read_bytes())
    assert len(normals) == 365
    np.testing.assert_allclose(normals, daily_means_c(), atol=1e-9)
    stored = {"weather": {"station": "x", **climate_normals(normals)}}
    back = house_normal_daily_means(stored)
    assert back is not None and max(abs(a - b) for a, b in zip(back, normals, strict=True)) <= 0.005
    assert house_normal_daily_means({"weather": {}}) is None


def test_a_weather_file_without_a_whole_year_is_no_normal_year() -> None:
    data = "DATE,TAVG\n" + "".join(f"2023-01-{d:02d},5\n" for d in range(1, 32))
    with pytest.raises(InputError, match="no values for 334 days"):
        normal_daily_means(data.encode())


def test_the_degree_day_base_is_read_in_the_house_units() -> None:
    assert read_degree_day_base("65", units="ip") == 65.0
    assert read_degree_day_base("18,3", units="si") == 18.3
    with pytest.raises(InputError, match="between 40.0 and 75.0 °F") as caught:
        read_degree_day_base("80", units="ip")
    assert caught.value.field == "degree_day_base"
    weather = degree_days_weather("65", units="ip")
    assert weather.degree_day_base == 65.0 and "fixed at 65 °F" in weather.warnings[0]
    rows = weather.coverage([{"start": "2023-01-01", "end": "2023-02-01", "hdd": 900.0},
                             {"start": "2023-02-01", "end": "2023-03-01"}])  # fmt: skip
    assert rows[0].covered and not rows[1].covered


# --- typed degree-days: the fit takes the base as given ------------------------------------------

YEAR_F = to_f(list(daily_means_c()))


def _typed_periods(noise: float) -> list[dict]:
    # bills made at τ = 60 °F (α = 1 therm/day, β = 0.2 therm/°F·day), degree-days typed at 65
    periods = synthetic_bills(YEAR_F, FIRST, alpha=1.0, beta=0.2, base=60.0, noise=noise, seed=3)
    for p in periods:
        first = (date.fromisoformat(p["start"]) - FIRST).days
        days = (date.fromisoformat(p["end"]) - date.fromisoformat(p["start"])).days
        p["hdd"] = sum(max(0.0, 65.0 - t) for t in YEAR_F[first : first + days])
    return periods


def test_typed_degree_days_fit_at_the_stated_base_matches_numpy_least_squares() -> None:
    periods = _typed_periods(noise=0.03)
    request = BillsRequest.model_validate(
        {"units": "ip", "fuel": "natural_gas", "periods": periods, "degree_day_base": 65,
         "normal_temperatures": {"values": YEAR_F}, "efficiency": 0.8}
    )  # fmt: skip
    out = compute_bills(request)
    n = np.array(
        [(date.fromisoformat(p["end"]) - date.fromisoformat(p["start"])).days for p in periods],
        float,
    )
    use = np.array([p["use"] for p in periods])
    hdd = np.array([p["hdd"] for p in periods])
    x = np.column_stack([np.ones_like(n), hdd / n])
    root = np.sqrt(n)
    (alpha, beta), *_ = np.linalg.lstsq(x * root[:, None], (use / n) * root, rcond=None)
    assert out.base_temperature == pytest.approx(65.0) and not out.base_temperature_searched
    assert out.parameters == 2 and out.model == "heating"
    assert out.baseload_per_day == pytest.approx(alpha, rel=1e-9)
    assert out.heating_slope == pytest.approx(beta, rel=1e-9)
    residual = use / n - x @ np.array([alpha, beta])
    sse = float(n @ residual**2)
    cov = sse / (len(n) - 2) * np.linalg.inv(x.T @ (x * n[:, None]))
    assert out.heating_slope_std_error == pytest.approx(np.sqrt(cov[1, 1]), rel=1e-9)
    # normalised: 365 α + β HDD65 of the normal year
    hdd65 = sum(max(0.0, 65.0 - t) for t in YEAR_F)
    assert out.normalized_annual_use == pytest.approx(365 * alpha + beta * hdd65, rel=1e-9)
    assert any("typed at a base of 65 °F" in w for w in out.warnings)
    assert not any("two periods" in w for w in out.warnings)


def test_fit_degree_days_in_si_and_its_limiting_cases() -> None:
    # noise free, degree-days at the true base (60 °F = 15.556 °C): α and β exact
    year_c = list(daily_means_c())
    base_c = (60.0 - 32.0) / 1.8
    periods = synthetic_bills(year_c, FIRST, alpha=1.0, beta=0.36, base=base_c)
    n = [(date.fromisoformat(p["end"]) - date.fromisoformat(p["start"])).days for p in periods]
    first = [(date.fromisoformat(p["start"]) - FIRST).days for p in periods]
    hdd = [
        sum(max(0.0, base_c - t) for t in year_c[f : f + d]) for f, d in zip(first, n, strict=True)
    ]
    fit = physics.fit_degree_days(n, [p["use"] for p in periods], hdd, base_c)
    assert fit.baseload_per_day == pytest.approx(1.0, rel=1e-9)
    assert fit.heating_slope == pytest.approx(0.36, rel=1e-9)
    assert fit.cv_rmse == pytest.approx(0.0, abs=1e-9) and fit.r_squared == pytest.approx(1.0)
    # no heating signal: use flat at 2 a day whatever the degree-days
    flat = physics.fit_degree_days([30, 31, 30], [60, 62, 60], [500, 100, 0], base_c)
    assert flat.model == "baseload" and flat.baseload_per_day == pytest.approx(182 / 91)
    one = physics.fit_degree_days([30], [60], [500], base_c)
    assert one.model == "baseload" and one.cv_rmse is None
    with pytest.raises(ValueError, match="degree-days must be"):
        physics.fit_degree_days([30, 30], [1, 2], [-1, 5], base_c)


def test_typed_degree_days_need_their_base_and_every_period() -> None:
    periods = _typed_periods(noise=0.0)
    body = {"units": "ip", "fuel": "natural_gas", "periods": periods}
    with pytest.raises(InputError) as caught:
        compute_bills(BillsRequest.model_validate(body))
    assert caught.value.field == "periods[0].hdd"  # hdd without degree_day_base
    del periods[3]["hdd"]
    with pytest.raises(InputError) as caught:
        compute_bills(BillsRequest.model_validate({**body, "degree_day_base": 65}))
    assert caught.value.field == "periods[3].hdd"
    with pytest.raises(InputError) as caught:
        compute_bills(BillsRequest.model_validate({**body, "degree_day_base": 90}))
    assert caught.value.field == "degree_day_base"
    plain = [{k: v for k, v in p.items() if k != "hdd"} for p in periods]
    with pytest.raises(InputError, match="daily mean temperatures") as caught:
        compute_bills(BillsRequest.model_validate({**body, "periods": plain}))
    assert caught.value.field == "daily_temperatures"
