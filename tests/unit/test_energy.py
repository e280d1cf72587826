"""Degree-day energy, infiltration and fuel table (server.physics.energy, server.physics.fuels)."""

from __future__ import annotations

import math

import pint
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from server.physics import energy
from server.physics.fuels import FUELS, GRID_ELECTRICITY_CO2_KG_PER_KWH, KWH_J, fuel_by_slug
from server.physics.units import BTU_J, to_si

UREG = pint.UnitRegistry()
Q = UREG.Quantity
PROPERTY = settings(max_examples=200, deadline=None)

# The hand-worked house of tests/unit/test_house_model.py, as-found.
CFM50, N_FACTOR, VOLUME_FT3, HDD_F = 3200.0, 18.0, 12000.0, 5400.0


def ua_si(ua_ip: float) -> float:
    return to_si(ua_ip, "ua", "ip")


# --- constants against pint ----------------------------------------------------------------


def test_air_heat_capacity_matches_pint():
    # pint: 0.018 Btu_it/(ft³·°F) = 1207.19 J/(m³·K) (REFERENCES.md: 0.335 Wh/(m³·K)).
    expected = Q(0.018, "Btu_it/(ft**3*delta_degF)").to("J/(m**3*K)").magnitude
    assert energy.AIR_HEAT_CAPACITY_SI == pytest.approx(expected, rel=1e-9)
    assert energy.AIR_HEAT_CAPACITY_SI / 3600 == pytest.approx(0.335, abs=5e-4)


def test_cfm_matches_pint():
    # pint: 1 ft³/min = 4.719474e-4 m³/s.
    expected = Q(1, "ft**3/min").to("m**3/s").magnitude
    assert energy.CFM_M3_PER_S == pytest.approx(expected, rel=1e-12)


# --- infiltration ---------------------------------------------------------------------------


def test_infiltration_hand_worked_ip():
    # ACH50 = 3200 × 60 / 12000 = 16 /h; ACH_nat = 16 / 18 = 0.8889 /h;
    # UA = 0.018 × 0.8889 × 12000 = 192.0 Btu/(h·°F)  (volume cancels: 0.018 × 3200 × 60 / 18).
    assert energy.infiltration_ua_ip(CFM50, N_FACTOR, VOLUME_FT3) == pytest.approx(192.0, 1e-12)


def test_infiltration_si_equals_ip():
    # 192 Btu/(h·°F) × 0.52752793 W/K per Btu/(h·°F) (pint) = 101.285 W/K.
    flow = CFM50 * Q(1, "ft**3/min").to("m**3/s").magnitude
    volume = Q(VOLUME_FT3, "ft**3").to("m**3").magnitude
    expected = 192.0 * Q(1, "Btu_it/hr/delta_degF").to("W/K").magnitude
    assert energy.infiltration_ua(flow, N_FACTOR, volume) == pytest.approx(expected, rel=1e-9)
    assert expected == pytest.approx(101.2853, rel=1e-5)


def test_air_changes_at_50_pa():
    # 3200 CFM in a 12000 ft³ house: 3200 × 60 / 12000 = 16 air changes per hour.
    flow = CFM50 * energy.CFM_M3_PER_S
    volume = to_si(VOLUME_FT3, "volume", "ip")
    assert energy.air_changes_at_50_pa(flow, volume) == pytest.approx(16.0, rel=1e-12)


def test_flow_from_ach50_round_trip():
    # n50 = 16 /h in 12000 ft³ is 3200 CFM50 again.
    volume = to_si(VOLUME_FT3, "volume", "ip")
    flow = energy.flow_from_ach50(16.0, volume)
    assert flow / energy.CFM_M3_PER_S == pytest.approx(3200.0, rel=1e-12)


def test_airtight_house_has_no_infiltration():
    # Limiting case: no leakage at 50 Pa, no natural infiltration.
    assert energy.infiltration_ua(0.0, 18.0, 300.0) == 0.0


@PROPERTY
@given(
    flow=st.floats(0.0, 5.0),
    n_factor=st.floats(5.0, 40.0),
    volume_a=st.floats(50.0, 5000.0),
    volume_b=st.floats(50.0, 5000.0),
)
def test_volume_cancels_for_a_measured_flow(flow, n_factor, volume_a, volume_b):
    # UA = c · (flow·3600/V / N) · V / 3600 = c · flow / N: the volume drops out.
    ua_a = energy.infiltration_ua(flow, n_factor, volume_a)
    ua_b = energy.infiltration_ua(flow, n_factor, volume_b)
    assert ua_a == pytest.approx(ua_b, rel=1e-9, abs=1e-12)
    assert ua_a == pytest.approx(energy.AIR_HEAT_CAPACITY_SI * flow / n_factor, rel=1e-9, abs=1e-12)


@pytest.mark.parametrize(
    ("flow", "n_factor", "volume"),
    [(-1.0, 18.0, 300.0), (1.0, 0.0, 300.0), (1.0, 18.0, 0.0), (math.nan, 18.0, 300.0)],
)
def test_infiltration_refuses_bad_input(flow, n_factor, volume):
    with pytest.raises(ValueError):
        energy.infiltration_ua(flow, n_factor, volume)


# --- heating and cooling ------------------------------------------------------------------


def test_heating_load_hand_worked():
    # UA = 1000/11 + 1400/14 + 192 = 90.909 + 100 + 192 = 382.909 Btu/(h·°F);
    # Q = 382.909 × 5400 × 24 = 49,625,018 Btu.
    ua_ip = 1000 / 11 + 1400 / 14 + 192.0
    load_j = energy.degree_day_load(ua_si(ua_ip), to_si(HDD_F, "degree_days", "ip"))
    assert load_j / BTU_J == pytest.approx(49_625_018.18, rel=1e-9)


def test_heating_load_in_si_units_matches_pint():
    # 100 W/K over 3000 K·day: 100 × 3000 × 86400 = 2.592e10 J = 7200 kWh (pint).
    load = energy.degree_day_load(100.0, 3000.0)
    assert load == pytest.approx(Q(100 * 3000 * 24, "W*hour").to("J").magnitude, rel=1e-12)
    assert load / KWH_J == pytest.approx(7200.0, rel=1e-12)


def test_fuel_use_hand_worked():
    # 49,625,018 Btu / (0.80 × 100,000 Btu/therm) = 620.313 therm.
    gas = fuel_by_slug("natural_gas")
    therms = energy.fuel_use(49_625_018.18 * BTU_J, 0.80, gas.energy_per_unit_j)
    assert therms == pytest.approx(620.3127, rel=1e-6)


def test_cooling_seer_hand_worked():
    # kWh = UA × CDD × 24 / (SEER × 1000) = 382.909 × 900 × 24 / 13000 = 636.218 kWh.
    ua_ip = 1000 / 11 + 1400 / 14 + 192.0
    load = energy.degree_day_load(ua_si(ua_ip), to_si(900.0, "degree_days", "ip"))
    assert energy.cooling_electricity_seer(load, 13.0) / KWH_J == pytest.approx(636.2182, 1e-6)


def test_cooling_cop_matches_seer():
    # SEER [Btu/Wh] = COP × 3.41214 (1 W = 3.41214 Btu/h, pint): the two ratings agree.
    seer_per_cop = Q(1, "W").to("Btu_it/hr").magnitude
    load = 1.0e10
    by_cop = energy.cooling_electricity_cop(load, 3.5)
    by_seer = energy.cooling_electricity_seer(load, 3.5 * seer_per_cop)
    assert by_cop == pytest.approx(by_seer, rel=1e-9)


def test_zero_degree_days_zero_load():
    # Limiting case: a climate that never needs heat.
    assert energy.degree_day_load(250.0, 0.0) == 0.0


@PROPERTY
@given(load=st.floats(1e6, 1e12), efficiency=st.floats(0.3, 5.0), factor=st.floats(1.1, 3.0))
def test_better_efficiency_buys_less_fuel(load, efficiency, factor):
    # fuel ∝ 1/η: raising η by a factor divides the fuel by the same factor.
    low = energy.fuel_use(load, efficiency, 1.0e8)
    high = energy.fuel_use(load, efficiency * factor, 1.0e8)
    assert high == pytest.approx(low / factor, rel=1e-9)


def test_fuel_use_refuses_zero_efficiency():
    with pytest.raises(ValueError, match="efficiency"):
        energy.fuel_use(1.0e9, 0.0, 1.0e8)


# --- pipe runs --------------------------------------------------------------------------------


def test_pipe_annual_loss_hand_worked():
    # 10 m × 40 K / 2 m·K/W = 200 W; × 1000 h = 200 kWh = 7.2e8 J.
    assert energy.pipe_annual_loss(10.0, 2.0, 40.0, 1000.0) == pytest.approx(7.2e8, rel=1e-12)


def test_cold_pipe_is_not_a_loss():
    # Limiting case: a pipe colder than its surroundings gains heat; counted as zero loss.
    assert energy.pipe_annual_loss(10.0, 2.0, -5.0, 1000.0) == 0.0


def test_pipe_refuses_too_many_hours():
    with pytest.raises(ValueError, match="hours"):
        energy.pipe_annual_loss(10.0, 2.0, 40.0, 9000.0)


# --- fuel table -------------------------------------------------------------------------------


def test_energy_contents_against_pint_and_memory():
    # pint: 1 therm (EC) = 1.055056e8 J; our therm is 100,000 Btu_IT = 1.0550559e8 J.
    assert FUELS["natural_gas"].energy_per_unit_j == pytest.approx(
        Q(1, "therm").to("J").magnitude, rel=1e-6
    )
    # pint: 1 kWh = 3412.14 Btu_IT.
    assert FUELS["heat_pump"].energy_per_unit_j == pytest.approx(
        Q(1, "kWh").to("J").magnitude, rel=1e-12
    )
    # From memory (EIA): propane 91,452 Btu/gal, No. 2 heating oil 138,500 Btu/gal.
    assert FUELS["propane"].energy_per_unit_j / BTU_J == pytest.approx(91_452, rel=0.01)
    assert FUELS["heating_oil"].energy_per_unit_j / BTU_J == pytest.approx(138_500, rel=0.01)


@pytest.mark.parametrize(
    ("slug", "lb_per_mmbtu"),
    # US EIA "Carbon dioxide emissions coefficients" (from memory): natural gas 116.65,
    # propane 138.63, diesel and home heating oil (distillate) 163.45 lb CO2 per million Btu.
    [("natural_gas", 116.65), ("propane", 138.63), ("heating_oil", 163.45)],
)
def test_co2_factors_against_eia_coefficients(slug, lb_per_mmbtu):
    fuel = FUELS[slug]
    assert fuel.co2_kg_per_unit is not None
    kg_per_mmbtu = fuel.co2_kg_per_unit / (fuel.energy_per_unit_j / (1e6 * BTU_J))
    expected = Q(lb_per_mmbtu, "lb").to("kg").magnitude
    assert kg_per_mmbtu == pytest.approx(expected, rel=0.01)


def test_every_fuel_names_its_sources():
    for fuel in FUELS.values():
        assert fuel.energy_source and fuel.co2_source and fuel.efficiency_meaning
        assert (fuel.co2_kg_per_unit is None) == fuel.electric


def test_grid_factor_is_plausible():
    # From memory: US grid about 0.86 lb/kWh in 2022 (EIA) -> 0.39 kg/kWh.
    assert GRID_ELECTRICITY_CO2_KG_PER_KWH == pytest.approx(
        Q(0.855, "lb").to("kg").magnitude, rel=0.02
    )


def test_unknown_fuel():
    with pytest.raises(ValueError, match="unknown fuel"):
        fuel_by_slug("coal")
