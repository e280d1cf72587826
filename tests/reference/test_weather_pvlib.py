"""Check the weather reader and degree-days against pvlib's bundled TMY3 files.

Outside sources:
* pvlib's bundled files 723170TYA.CSV (Greensboro NC) and 703165TY.csv (Sand Point AK):
  real typical-meteorological-year data, not ours.
* pvlib.iotools.read_tmy3 (pvlib 0.16): an independent parser. With map_variables=True (the
  default here) the dry-bulb column is named 'temp_air'; its index is hour-ending and
  tz-aware, so 24:00 appears as 00:00 of the next day.
* pandas / numpy: an independent degree-day and percentile computation written below from
  the raw file (hour-ending stamps shifted back one hour before grouping by date).
"""

from __future__ import annotations

import functools
import pathlib
from datetime import timedelta

import numpy as np
import pandas as pd
import pvlib
import pytest
from pvlib.iotools import read_tmy3

from server.physics.units import f_to_c
from server.services.climate import compute_degree_days
from server.services.weather_files import parse_weather_file

DATA = pathlib.Path(pvlib.__file__).parent / "data"
FILES = ["723170TYA.CSV", "703165TY.csv"]


@functools.cache
def independent_daily_means(path: pathlib.Path) -> pd.Series:
    """Daily means computed with pandas straight from the raw TMY3 columns."""
    raw = pd.read_csv(path, skiprows=1)
    hour_ending = raw["Time (HH:MM)"].str.slice(0, 2).astype(int)
    start = pd.to_datetime(raw["Date (MM/DD/YYYY)"], format="%m/%d/%Y") + pd.to_timedelta(
        hour_ending - 1, unit="h"
    )
    return raw["Dry-bulb (C)"].groupby(start.dt.date).mean()


def tmy3_to_epw(path: pathlib.Path) -> bytes:
    """Write an EPW (8 header lines; year, month, day, hour 1..24, minute; dry-bulb = field 7)."""
    raw = pd.read_csv(path, skiprows=1)
    header = [
        "LOCATION,Converted,ST,USA,TMY3,000000,0.0,0.0,0.0,0.0",
        "DESIGN CONDITIONS,0",
        "TYPICAL/EXTREME PERIODS,0",
        "GROUND TEMPERATURES,0",
        "HOLIDAYS/DAYLIGHT SAVINGS,No,0,0,0",
        "COMMENTS 1,written by the test from a TMY3 file",
        "COMMENTS 2,",
        "DATA PERIODS,1,1,Data,Sunday, 1/ 1,12/31",
    ]
    rows = []
    for stamp, clock, dry_bulb, dew_point in zip(
        raw["Date (MM/DD/YYYY)"],
        raw["Time (HH:MM)"],
        raw["Dry-bulb (C)"],
        raw["Dew-point (C)"],
        strict=True,
    ):
        month, day, year = (int(p) for p in stamp.split("/"))
        hour = int(clock[:2])
        rows.append(
            f"{year},{month},{day},{hour},60,A7A7E8*0?9?9?9,{dry_bulb},{dew_point},"
            "80,101300,0,0,300,0,0,0,0,0,0,0,180,2.0,5,5,16.1,77777,9,999999999,0,0.0,0,88,0,0,0"
        )
    return ("\n".join(header + rows) + "\n").encode()


@pytest.mark.parametrize("name", FILES)
def test_temperatures_and_stamps_match_pvlib_read_tmy3(name):
    path = DATA / name
    series = parse_weather_file(path.read_bytes())
    frame, _meta = read_tmy3(str(path), map_variables=True)  # pvlib: 'temp_air' column
    # Same dry-bulb values, in the same order (both read the same decimal text).
    assert list(series.temperatures_c) == frame["temp_air"].tolist()
    # pvlib stamps are hour-ending; one hour earlier they are our interval starts. pvlib also
    # moves a leap day to March 1 on purpose (pvlib/iotools/tmy.py: "check for a leap day and
    # advance it"), so 02/28/1996 24:00 ends up as Feb 29 23:00 there; it is Feb 28 23:00 here.
    starts = (frame.index - pd.Timedelta(hours=1)).tz_localize(None).to_pydatetime().tolist()
    expected = [s - timedelta(days=1) if (s.month, s.day) == (2, 29) else s for s in starts]
    assert series.timestamps() == expected
    assert series.kind == "tmy3"


@pytest.mark.parametrize("name", FILES)
def test_hour_24_gives_365_days_where_naive_grouping_gives_366(name):
    path = DATA / name
    series = parse_weather_file(path.read_bytes())
    frame, _meta = read_tmy3(str(path), coerce_year=1990, map_variables=True)
    # The trap: grouping hour-ending stamps naively by date (here pvlib's index, put in one
    # year) spreads the year over 366 dates: each day's 24:00 lands on the next date.
    assert len(set(frame.index.date)) == 366
    assert len(set(series.dates)) == 365


@pytest.mark.parametrize("name", FILES)
@pytest.mark.parametrize("base_c", [10.0, 15.0, 18.3, 22.0])
def test_hdd_cdd_match_an_independent_pandas_computation(name, base_c):
    path = DATA / name
    means = independent_daily_means(path)
    hdd = float((base_c - means).clip(lower=0).sum())  # pandas, from the raw file
    cdd = float((means - base_c).clip(lower=0).sum())
    result = compute_degree_days(
        path.read_bytes(), units="si", heating_base=base_c, cooling_base=base_c
    )
    assert len(means) == 365 and result.days == 365
    assert result.hdd == pytest.approx(hdd, rel=1e-9, abs=1e-9)
    assert result.cdd == pytest.approx(cdd, rel=1e-9, abs=1e-9)
    monthly = means.groupby([d.month for d in means.index]).apply(
        lambda m: (base_c - m).clip(lower=0).sum()
    )
    assert [row.hdd for row in result.monthly] == pytest.approx(monthly.tolist(), abs=1e-9)


@pytest.mark.parametrize("name", FILES)
def test_design_temperatures_match_numpy_percentiles(name):
    path = DATA / name
    frame, _meta = read_tmy3(str(path), map_variables=True)
    # numpy.percentile default (linear) over pvlib's hourly temp_air.
    low, high = np.percentile(frame["temp_air"].to_numpy(), [1.0, 99.0])
    result = compute_degree_days(
        path.read_bytes(), units="si", heating_base=None, cooling_base=None
    )
    assert result.heating_design_temperature == pytest.approx(low, abs=1e-9)
    assert result.cooling_design_temperature == pytest.approx(high, abs=1e-9)
    assert result.design_temperature_basis == "hourly"


@pytest.mark.parametrize("name", FILES)
def test_epw_written_from_tmy3_gives_the_same_degree_days(name):
    path = DATA / name
    epw = tmy3_to_epw(path)
    from_epw = compute_degree_days(epw, units="ip", heating_base=65.0, cooling_base=65.0)
    from_tmy3 = compute_degree_days(
        path.read_bytes(), units="ip", heating_base=65.0, cooling_base=65.0
    )
    assert from_epw.kind == "epw" and from_tmy3.kind == "tmy3"
    assert from_epw.hdd == pytest.approx(from_tmy3.hdd, rel=1e-12)
    assert from_epw.cdd == pytest.approx(from_tmy3.cdd, rel=1e-12)
    assert from_epw.days == 365 and from_epw.hours == 8760
    # And both equal the pandas computation at 65 °F = 18.33 °C, times 1.8 for °F·day.
    means = independent_daily_means(path)
    hdd_k = float((f_to_c(65.0) - means).clip(lower=0).sum())
    assert from_epw.hdd == pytest.approx(1.8 * hdd_k, rel=1e-9)


def test_greensboro_climate_zone_and_degree_days_from_memory():
    result = compute_degree_days(
        (DATA / "723170TYA.CSV").read_bytes(), units="ip", heating_base=None, cooling_base=None
    )
    # From memory: Guilford County, NC (Greensboro) is climate zone 4A in ASHRAE 169 / IECC;
    # the thermal number is 4.
    assert result.climate_zone == "4"
    # From memory: Greensboro's normal HDD65 is about 3,800 °F·day; wide tolerance because the
    # TMY year is not the normals period.
    assert result.hdd == pytest.approx(3800.0, rel=0.15)
    assert result.station == "GREENSBORO PIEDMONT TRIAD INT"  # pvlib's file header
    assert any("mixes years" in w for w in result.warnings)


def test_sand_point_is_heating_dominated_from_memory():
    result = compute_degree_days(
        (DATA / "703165TY.csv").read_bytes(), units="si", heating_base=None, cooling_base=None
    )
    # From memory: Sand Point, Alaska has cool maritime summers (means near 10-12 °C), so
    # CDD10 is small and HDD18 far above 4,000 K·day (zone 6 or 7).
    assert result.cdd10 < 500.0
    assert result.hdd18 > 4000.0
    assert result.climate_zone in ("6", "7")
