"""Our solar position, isotropic-sky transposition and heating-day sums against pvlib.

Source: pvlib's bundled TMY3 file ``723170TYA.CSV`` (Greensboro NC, 36.1 N, 79.95 W, UTC−5)
and ``703165TY.csv`` (Sand Point AK, 55.3 N), read by ``pvlib.iotools.read_tmy3``; solar
position by ``pvlib.solarposition.get_solarposition`` (NREL SPA); plane-of-array irradiance
by ``pvlib.irradiance.get_total_irradiance(..., model="isotropic")``. Each hour-ending value
is placed at the middle of its hour in both.
"""

from __future__ import annotations

import pathlib

import numpy as np
import pandas as pd
import pvlib
import pytest

from server.physics import solar
from server.services.climate import compute_degree_days
from server.services.gains import irradiation_to_si

DATA = pathlib.Path(pvlib.__file__).parent / "data"


def _file(name: str):  # type: ignore[no-untyped-def]
    data, meta = pvlib.iotools.read_tmy3(DATA / name, map_variables=True)
    mid = data.index - pd.Timedelta(minutes=30)
    local = mid.tz_localize(None)
    ordinal = np.array([d.toordinal() for d in local.date], dtype=float)
    hour = np.asarray(local.hour + local.minute / 60.0, dtype=float)
    return data, meta, mid, ordinal, hour


@pytest.fixture(scope="module")
def greensboro():  # type: ignore[no-untyped-def]
    data, meta, mid, ordinal, hour = _file("723170TYA.CSV")
    spa = pvlib.solarposition.get_solarposition(mid, meta["latitude"], meta["longitude"])
    zenith, azimuth = solar.solar_position(
        ordinal, hour, latitude=meta["latitude"], longitude=meta["longitude"],
        utc_offset_h=meta["TZ"],
    )  # fmt: skip
    return data, meta, spa, zenith, azimuth


def test_solar_position_matches_pvlib_spa(greensboro) -> None:  # type: ignore[no-untyped-def]
    data, _meta, spa, zenith, azimuth = greensboro
    # every hour of the year: geometric zenith within 0.02°, azimuth (sun up) within 0.05°
    assert np.abs(zenith - spa["zenith"].to_numpy()).max() < 0.02
    up = spa["zenith"].to_numpy() < 89.0
    wrapped = (azimuth - spa["azimuth"].to_numpy() + 180.0) % 360.0 - 180.0
    assert np.abs(wrapped[up]).max() < 0.05
    # a few hours by name: 21 June 12:30 and 21 December 12:30 local standard time
    for stamp in ("06-21 13:00", "12-21 13:00"):
        at = [i for i, t in enumerate(data.index) if t.strftime("%m-%d %H:%M") == stamp][0]
        assert zenith[at] == pytest.approx(spa["zenith"].iloc[at], abs=0.02)
        assert azimuth[at] == pytest.approx(spa["azimuth"].iloc[at], abs=0.05)


@pytest.mark.parametrize(
    ("tilt", "azimuth"), [(90.0, 180.0), (90.0, 0.0), (90.0, 90.0), (30.0, 225.0), (0.0, 0.0)]
)
def test_plane_irradiance_matches_pvlib_isotropic(greensboro, tilt, azimuth) -> None:  # type: ignore[no-untyped-def]
    data, _meta, spa, zenith, sun_azimuth = greensboro
    poa = pvlib.irradiance.get_total_irradiance(
        tilt, azimuth, spa["zenith"].to_numpy(), spa["azimuth"].to_numpy(),
        data["dni"].to_numpy(), data["ghi"].to_numpy(), data["dhi"].to_numpy(),
        albedo=0.2, model="isotropic",
    )  # fmt: skip
    theirs = np.nan_to_num(np.asarray(poa["poa_global"], dtype=float))
    ours = solar.plane_irradiance(
        tilt=tilt, azimuth=azimuth, zenith=zenith, solar_azimuth=sun_azimuth,
        dni=data["dni"].to_numpy(), dhi=data["dhi"].to_numpy(), ghi=data["ghi"].to_numpy(),
    )  # fmt: skip
    # hour by hour within 2 W/m² (positions differ by < 0.05°), the year's sum within 0.05 %
    assert np.abs(ours - theirs).max() < 2.0
    assert ours.sum() == pytest.approx(theirs.sum(), rel=5e-4)


def _pvlib_heating_day_sum(name: str, base_c: float, tilt: float, azimuth: float) -> float:
    """Σ POA [J/m²] over the hours of the days whose daily mean dry-bulb is below base_c."""
    data, meta, mid, _ordinal, _hour = _file(name)
    spa = pvlib.solarposition.get_solarposition(mid, meta["latitude"], meta["longitude"])
    poa = pvlib.irradiance.get_total_irradiance(
        tilt, azimuth, spa["zenith"].to_numpy(), spa["azimuth"].to_numpy(),
        data["dni"].to_numpy(), data["ghi"].to_numpy(), data["dhi"].to_numpy(),
        albedo=0.2, model="isotropic",
    )  # fmt: skip
    day = mid.tz_localize(None).date  # hour 24:00 ends its own day
    frame = pd.DataFrame(
        {
            "day": day,
            "t": data["temp_air"].to_numpy(),
            "poa": np.nan_to_num(np.asarray(poa["poa_global"])),
        }
    )
    means = frame.groupby("day")["t"].mean()
    heating = set(means[means < base_c].index)
    return float(frame.loc[frame["day"].isin(heating), "poa"].sum() * 3600.0)


@pytest.mark.parametrize(("azimuth", "orientation"), [(180.0, "S"), (0.0, "N"), (270.0, "W")])
def test_heating_day_table_matches_pvlib_sums(azimuth: float, orientation: str) -> None:
    """The /calc/degree-days ``solar`` table, read back for a vertical window, against pvlib's
    own sum over the same heating days (base 18 °C)."""
    result = compute_degree_days(
        (DATA / "723170TYA.CSV").read_bytes(), units="si", heating_base=None, cooling_base=None
    )
    assert result.solar is not None
    row = next(r for r in result.solar.table if r.base == 18.0)
    ours = irradiation_to_si(
        solar.plane_sum(
            tilt=90.0, azimuth=solar.COMPASS_AZIMUTHS[orientation],
            beam_horizontal=row.beam_horizontal, diffuse_horizontal=row.diffuse_horizontal,
            global_horizontal=row.global_horizontal, beam_vertical=row.beam_vertical,
        ),
        "si",
    )  # fmt: skip
    theirs = _pvlib_heating_day_sum("723170TYA.CSV", 18.0, 90.0, azimuth)
    assert ours == pytest.approx(theirs, rel=2e-3)


def test_north_window_at_high_latitude_gets_little_sun() -> None:
    """Sand Point AK (55.3 N): over the heating days at 10 °C (most of its cool year) a north
    wall's beam is a few percent of a south wall's (only the early and late sun of the long
    days reaches it; the winter sun never does), and its total under half."""
    result = compute_degree_days(
        (DATA / "703165TY.csv").read_bytes(), units="si", heating_base=None, cooling_base=None
    )
    assert result.solar is not None
    row = next(r for r in result.solar.table if r.base == 10.0)
    north, south = row.beam_vertical[0], row.beam_vertical[12]
    assert north < 0.03 * south
    total = {
        o: solar.plane_sum(
            tilt=90.0, azimuth=solar.COMPASS_AZIMUTHS[o], beam_horizontal=row.beam_horizontal,
            diffuse_horizontal=row.diffuse_horizontal, global_horizontal=row.global_horizontal,
            beam_vertical=row.beam_vertical,
        )
        for o in ("N", "S")
    }  # fmt: skip
    assert total["N"] < 0.5 * total["S"]
    theirs = _pvlib_heating_day_sum("703165TY.csv", 10.0, 90.0, 0.0)
    assert irradiation_to_si(total["N"], "si") == pytest.approx(theirs, rel=2e-3)
