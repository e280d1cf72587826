"""The demo house's ground, buffer spaces, windows, systems, weather and bills (invented).

Every figure here is demo data for an invented house, not a measurement; the U-factors of the
buffer spaces' own parts are rough figures for the construction named (from memory), stated so
on the House page like any typed value.
"""

from __future__ import annotations

import io
from datetime import date, timedelta
from typing import Any

from sqlalchemy.orm import Session

from server.models import House, Surface
from server.physics.units import c_to_f
from server.services.bill_weather import normal_daily_means
from server.services.climate import compute_degree_days
from server.services.demo_weather import billing_daily_means_c, typical_year_epw
from server.services.house_sections import set_climate_from_weather
from server.services.houses import add_surface

#: the two buffer spaces (ISO 13789): their exposed parts, volume ft³ and air changes 1/h
DEMO_SPACES: list[dict[str, Any]] = [
    {
        "id": "attic",
        "label": "Vented attic",
        "exposed": [
            {"name": "Roof: shingles on board sheathing", "area": 960.0, "u": 0.47},
            {"name": "Gable ends", "area": 90.0, "u": 0.35},
        ],
        "volume": 3440.0,
        "air_changes": 3.0,
    },
    {
        "id": "crawlspace",
        "label": "Crawlspace",
        "exposed": [
            {"name": "Block walls, uninsulated", "area": 372.0, "u": 0.36},
            {"name": "Earth floor to the ground", "area": 860.0, "u": 0.10},
        ],
        "volume": 2580.0,
        "air_changes": 1.0,
    },
]

#: what lies behind the surfaces that face a buffer space (typical assembly → space id)
DEMO_ADJACENT = {"attic-2x6-16-empty": "attic", "floor-2x10-16-empty": "crawlspace"}

#: (name, area ft², orientation): double-hung windows, single glazing with old storms
DEMO_WINDOWS = [
    ("Windows, south", 72.0, "S"),
    ("Windows, east", 36.0, "E"),
    ("Windows, west", 36.0, "W"),
    ("Windows, north", 44.0, "N"),
]
WINDOW_U, WINDOW_SHGC = 0.55, 0.52
DOOR_U = 0.40

#: the slab of the back addition: 12 ft x 15 ft, three sides exposed (ISO 13370 inputs)
SLAB_NAME, SLAB_AREA = "Slab of the back addition", 180.0
SLAB_GROUND = {"exposed_perimeter": 42.0, "wall_thickness": 8.0, "soil": "clay_silt"}


def _window_assembly(u: float, label: str) -> dict[str, Any]:
    """A window or door typed as its whole-unit U (rated figure, films included)."""
    return {"heat_flow": "horizontal", "films": "none", "layers": [{"name": label, "r": 1.0 / u}]}


def add_demo_envelope(*, session: Session, house: House, surfaces: dict[str, Surface]) -> None:
    """Spaces, what the attic floor and crawlspace floor face, windows, a door and the slab."""
    house.spaces = DEMO_SPACES
    for typical, space in DEMO_ADJACENT.items():
        row = surfaces[typical]
        row.details = {**(row.details or {}), "adjacent": space}
    for name, area, facing in DEMO_WINDOWS:
        row = add_surface(session=session, house=house, name=name, kind="window", area=area)
        row.assembly = _window_assembly(WINDOW_U, "double-hung, single glazing + storm")
        row.details = {"window": {"shgc": WINDOW_SHGC, "orientation": facing}}
        surfaces[f"window-{facing}"] = row
    door = add_surface(session=session, house=house, name="Front door", kind="door", area=20.0)
    door.assembly = _window_assembly(DOOR_U, "solid wood door with storm door")
    slab = add_surface(session=session, house=house, name=SLAB_NAME, kind="slab", area=SLAB_AREA)
    slab.assembly = {
        "heat_flow": "down",
        "films": "none",
        "layers": [{"name": "4 in concrete, vinyl tile", "r": 0.5}],
    }
    slab.details = {"ground": dict(SLAB_GROUND)}
    surfaces["slab"] = slab


def add_demo_systems(house: House) -> None:
    """Ducts in the crawlspace, the furnace's output, three bedrooms (internal gains)."""
    house.heating = {
        **house.heating,
        "output_capacity": 88000.0,
        "ducts": {
            "supply_location": "crawlspace",
            "return_location": "conditioned",
            "supply_leakage": 0.12,
            "return_leakage": 0.08,
            "supply_r": 2.0,
            "return_r": 2.0,
            "supply_area": 260.0,
            "return_area": 70.0,
        },
    }
    house.climate = {**(house.climate or {}), "gains": {"bedrooms": 3}}


def add_demo_weather(house: House) -> None:
    """The invented typical year, read as an uploaded EPW file would be."""
    epw = typical_year_epw()
    result = compute_degree_days(io.BytesIO(epw), units=house.units, heating_base=None,
                                 cooling_base=None)  # fmt: skip
    normals = normal_daily_means(io.BytesIO(epw), default_unit="F")
    set_climate_from_weather(house=house, result=result, file_name="demo-valley-invented.epw",
                             expected_version=None, normal_daily_means_c=normals)  # fmt: skip


#: the invented truth behind the demo bills: the house burns less than its model says
BILLS_START = date(2024, 10, 2)
BILLS_BASE_F, BILLS_SLOPE, BILLS_BASELOAD = 60.0, 0.27, 0.45  # °F, therm/°F·day, therm/day
GAS_PRICE, GAS_MONTHLY_CHARGE = 1.52, 14.0


def demo_bills() -> dict[str, Any]:
    """Two years of monthly gas bills (invented) with the daily means of their dates."""
    days = 2 * 365 + 6
    means_f = [c_to_f(c) for c in billing_daily_means_c(BILLS_START, days)]
    periods, start, k = [], BILLS_START, 0
    lengths = [30, 31, 29, 32, 30, 28, 33, 30, 31, 29, 31, 30] * 2
    wobble = [1.03, 0.98, 1.01, 0.97, 1.02, 1.0, 0.99, 1.04, 0.96, 1.01, 0.98, 1.02]
    for i, n in enumerate(lengths):
        hdd = sum(max(0.0, BILLS_BASE_F - t) for t in means_f[k : k + n])
        use = round((BILLS_BASELOAD * n + BILLS_SLOPE * hdd) * wobble[i % 12], 0)
        end = start + timedelta(days=n)
        period: dict[str, Any] = {"start": start.isoformat(), "end": end.isoformat(), "use": use,
                                  "cost": round(use * GAS_PRICE + GAS_MONTHLY_CHARGE, 2)}  # fmt: skip
        if i == 15:
            period["estimated"] = True  # one estimated read, as the meter readers skip a month
        periods.append(period)
        start, k = end, k + n
    return {
        "fuel": "natural_gas",
        "periods": periods,
        "daily_temperatures": {
            "start": BILLS_START.isoformat(),
            "values": [round(t, 1) for t in means_f[:k]],
        },
    }
