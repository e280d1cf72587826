"""Mechanical ventilation, altitude and the N-factor table.

Sources: psychrolib's GetStandardAtmPressure (ASHRAE Handbook—Fundamentals formulation);
hand arithmetic for the combination of flows (ASHRAE Handbook—Fundamentals ch. 16); the LBL
N-factor table's own structure (from memory, see server/physics/ventilation.py).
"""

from __future__ import annotations

import math

import psychrolib
import pytest

from server.physics import ventilation as vent
from server.physics.energy import AIR_HEAT_CAPACITY_SI


@pytest.mark.parametrize("z", [0.0, 300.0, 1609.0, 3000.0])
def test_standard_pressure_matches_psychrolib(z: float):
    psychrolib.SetUnitSystem(psychrolib.SI)
    assert vent.standard_pressure_pa(z) == pytest.approx(
        psychrolib.GetStandardAtmPressure(z), rel=1e-12
    )


def test_air_heat_capacity_falls_with_the_pressure():
    psychrolib.SetUnitSystem(psychrolib.SI)
    ratio = psychrolib.GetStandardAtmPressure(1609.0) / 101325.0  # about 0.83 at 1 mile
    assert vent.air_heat_capacity_si(1609.0) == pytest.approx(
        AIR_HEAT_CAPACITY_SI * ratio, rel=1e-12
    )
    assert vent.air_heat_capacity_si(None) == AIR_HEAT_CAPACITY_SI


def test_exhaust_fan_combines_in_quadrature_by_hand():
    # Q_inf 0.05, exhaust 0.03 m³/s: sqrt(0.05² + 0.03²) = 0.058310 m³/s; the fan adds
    # ρc · 0.008310 W/K to the infiltration's ρc · 0.05.
    found = vent.air_conductance(0.05, vent.MechanicalVentilation("exhaust", 0.03), 1200.0)
    assert found.infiltration_w_per_k == pytest.approx(60.0)
    assert found.ventilation_w_per_k == pytest.approx(
        1200.0 * (math.sqrt(0.0034) - 0.05), rel=1e-12
    )
    assert found.combined_flow_m3_per_s == pytest.approx(0.0583095, abs=1e-7)


def test_hrv_adds_its_flow_after_recovery_by_hand():
    # balanced 0.04 m³/s at ε 0.7: ρc · 0.04 · 0.3 = 1200 · 0.012 = 14.4 W/K on top.
    found = vent.air_conductance(0.05, vent.MechanicalVentilation("hrv", 0.04, 0.7), 1200.0)
    assert found.ventilation_w_per_k == pytest.approx(14.4, rel=1e-12)
    assert found.combined_flow_m3_per_s == pytest.approx(0.09)


def test_no_ventilation_adds_nothing_and_bad_inputs_refused():
    assert vent.air_conductance(0.05, None, 1200.0).ventilation_w_per_k == 0.0
    with pytest.raises(ValueError, match="recovers no heat"):
        vent.air_conductance(0.05, vent.MechanicalVentilation("exhaust", 0.03, 0.5))


def test_n_factor_table_structure_by_hand():
    # The table is normal-shielding one-storey N by zone (15.5, 18.5, 21.5, 24.5) times
    # 1.2 well shielded / 0.9 exposed and 1, 0.9, 0.8, 0.7 for 1, 1.5, 2, 3 storeys, rounded.
    base = {1: 15.5, 2: 18.5, 3: 21.5, 4: 24.5}
    shield = {"well_shielded": 1.2, "normal": 1.0, "exposed": 0.9}
    for zone, row in vent.N_FACTOR_TABLE.items():
        for name, values in row.items():
            for storeys, factor, value in zip(
                (1, 1.5, 2, 3), (1, 0.9, 0.8, 0.7), values, strict=True
            ):
                assert value == pytest.approx(base[zone] * shield[name] * factor, abs=0.051)
                assert vent.n_factor(zone, storeys, name) == value
    # between 1.5 and 2 storeys: halfway between 20.0 and 17.8 (zone 2, well shielded)
    assert vent.n_factor(2, 1.75, "well_shielded") == pytest.approx(18.9)
    with pytest.raises(ValueError):
        vent.n_factor(5, 1, "normal")
