"""Unit switching of the systems fields of a saved house, checked against pint."""

from __future__ import annotations

import pint
import pytest

from server.services import convert_systems as cs

Q = pint.UnitRegistry().Quantity

HEATING = {
    "fuel": "heat_pump",
    "efficiency": 2.4,
    "price": 0.15,
    "output_capacity": 36000.0,
    "heat_pump": {"hspf": 8.2, "capacity_47": 36000.0, "cutoff_temperature": 5.0},
    "ducts": {"supply_r": 4.2, "return_r": 6.0, "supply_area": 300.0, "return_area": 100.0,
              "air_flow": 1200.0, "temperature_rise": 50.0, "supply_leakage": 0.1},
}  # fmt: skip


def test_heating_ip_to_si_against_pint():
    si = cs.heating_fields(HEATING, "ip", "si")
    assert si["output_capacity"] == pytest.approx(Q(36000, "Btu_it/hr").to("W").magnitude, rel=1e-6)
    assert si["heat_pump"]["cutoff_temperature"] == pytest.approx(
        Q(5.0, "degF").to("degC").magnitude
    )
    ducts = si["ducts"]
    assert ducts["supply_r"] == pytest.approx(
        Q(4.2, "hr*ft**2*delta_degF/Btu_it").to("m**2*K/W").magnitude, rel=1e-6
    )
    assert ducts["supply_area"] == pytest.approx(Q(300, "ft**2").to("m**2").magnitude, rel=1e-9)
    assert ducts["air_flow"] == pytest.approx(Q(1200, "ft**3/min").to("L/s").magnitude, rel=1e-9)
    assert ducts["temperature_rise"] == pytest.approx(50 / 1.8, rel=1e-12)
    assert ducts["supply_leakage"] == 0.1  # a fraction
    back = cs.heating_fields(si, "si", "ip")
    assert back["ducts"]["air_flow"] == pytest.approx(1200.0, rel=1e-12)
    assert back["heat_pump"]["capacity_47"] == pytest.approx(36000.0, rel=1e-12)


def test_climate_and_ventilation_against_pint():
    climate = {"hdd": 5400, "elevation": 5000.0, "heating_design_temperature": 5.0,
               "temperature_bins": [{"temperature": 32.0, "hours": 120.0}]}  # fmt: skip
    si = cs.climate_fields(climate, "ip", "si")
    assert si["elevation"] == pytest.approx(Q(5000, "ft").to("m").magnitude, rel=1e-12)
    assert si["heating_design_temperature"] == pytest.approx(-15.0)
    assert si["temperature_bins"] == [{"temperature": pytest.approx(0.0), "hours": 120.0}]
    vent = cs.ventilation_fields({"kind": "hrv", "air_flow": 100.0}, "ip", "si")
    assert vent["air_flow"] == pytest.approx(Q(100, "ft**3/min").to("L/s").magnitude, rel=1e-9)
