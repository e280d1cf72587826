"""Duct distribution efficiency (ASHRAE Standard 152 delivery effectiveness), by hand.

The air's heat capacity of the hand cases is pint's conversion of 0.018 Btu/(ft³·°F) (the
ASHRAE Handbook—Fundamentals ch. 16 figure, common practice).
"""

from __future__ import annotations

import math

import pint
import pytest

from server.physics import ducts

Q = pint.UnitRegistry().Quantity
RHO_C = Q(0.018, "Btu_it/ft**3/delta_degF").to("J/m**3/K").magnitude  # 1207.19 J/(m³·K)


def _system(supply_at: str, return_at: str, leak_s: float = 0.10, leak_r: float = 0.05):
    return ducts.DuctSystem(
        supply=ducts.DuctSide(supply_at, leak_s, 0.7, 20.0),
        returns=ducts.DuctSide(return_at, leak_r, 0.7, 8.0),
        air_flow_m3_per_s=0.5,
        temperature_rise_k=30.0,
    )


def test_conduction_fraction_is_the_ip_formula_with_1_08():
    # B = exp(−A / (1.08 · cfm · R)) in IP (1.08 = 60 · 0.018): 300 ft², 1000 cfm, R-4.2
    expected = math.exp(-300 / (1.08 * 1000 * 4.2))  # = 0.93605
    area = Q(300, "ft**2").to("m**2").magnitude
    flow = Q(1000, "ft**3/min").to("m**3/s").magnitude
    r = Q(4.2, "hr*ft**2*delta_degF/Btu_it").to("m**2*K/W").magnitude
    assert ducts.conduction_fraction(area, r, flow, RHO_C) == pytest.approx(expected, rel=1e-9)


def test_supply_outdoors_return_inside_by_hand():
    # T_in 21 °C, T_out 1 °C: supply outdoors ΔT_s = 20 K, return inside ΔT_r = 0.
    # B_s = exp(−20 / (1207.19 · 0.5 · 0.7)) = 0.953767; a_s = 0.9; ΔT_e = 30 K.
    # DE = a_s·B_s − a_s·(1 − B_s)·ΔT_s/ΔT_e = 0.858391 − 0.027740 = 0.830651;
    # nothing regained outdoors (the return side loses nothing): η = DE.
    b_s = math.exp(-20 / (RHO_C * 0.5 * 0.7))
    de = 0.9 * b_s - 0.9 * (1 - b_s) * 20 / 30
    found = ducts.distribution(_system("outdoors", "conditioned"), 21.0, 1.0, {}, RHO_C)
    assert found.delivery_effectiveness == pytest.approx(de, rel=1e-12)
    assert de == pytest.approx(0.830651, abs=1e-6)
    assert found.regain == pytest.approx(0.0, abs=1e-15)
    assert found.efficiency == pytest.approx(de, rel=1e-12)
    assert found.supply_temperature_c == 1.0 and found.return_temperature_c == 21.0


def test_both_ducts_in_a_buffer_space_by_hand():
    # b = 0.5: the space is at 21 − 0.5 · (21 − 1) = 11 °C, ΔT_s = ΔT_r = 10 K; B_r over 8 m²
    # = exp(−8 / (1207.19 · 0.5 · 0.7)); DE by the Standard 152 equation, and half of the loss
    # comes back (1 − b): η = DE + 0.5 · (1 − DE).
    b_s = math.exp(-20 / (RHO_C * 0.5 * 0.7))
    b_r = math.exp(-8 / (RHO_C * 0.5 * 0.7))
    a_s, a_r = 0.9, 0.95
    de = a_s * b_s - a_s * b_s * (1 - b_r * a_r) * 10 / 30 - a_s * (1 - b_s) * 10 / 30
    found = ducts.distribution(_system("crawl", "crawl"), 21.0, 1.0, {"crawl": 0.5}, RHO_C)
    assert found.supply_temperature_c == pytest.approx(11.0)
    assert found.delivery_effectiveness == pytest.approx(de, rel=1e-12)
    assert found.supply_loss + found.return_loss == pytest.approx(1 - de, rel=1e-12)
    assert found.efficiency == pytest.approx(de + 0.5 * (1 - de), rel=1e-12)


def test_ducts_inside_the_house_lose_nothing():
    # Everything a duct in the conditioned space leaks or conducts heats the house: η = 1.
    found = ducts.distribution(_system("conditioned", "conditioned", 0.3, 0.3), 21.0, -10.0, {})
    assert found.efficiency == pytest.approx(1.0, rel=1e-12)


def test_tight_bare_area_ducts_outdoors_deliver_everything():
    # No leakage and no surface: DE = a_s·B_s = 1 whatever the temperatures.
    system = ducts.DuctSystem(
        ducts.DuctSide("outdoors", 0.0, 1.0, 0.0),
        ducts.DuctSide("outdoors", 0.0, 1.0, 0.0),
        0.4,
        25.0,
    )
    assert ducts.distribution(system, 21.0, -20.0, {}).efficiency == pytest.approx(1.0)


def test_sealing_raises_the_efficiency_and_leakage_is_checked():
    leaky = ducts.distribution(_system("outdoors", "outdoors", 0.2, 0.2), 21.0, 1.0, {})
    tight = ducts.distribution(_system("outdoors", "outdoors", 0.05, 0.05), 21.0, 1.0, {})
    assert tight.efficiency > leaky.efficiency
    with pytest.raises(ValueError, match="supply leakage"):
        ducts.distribution(_system("outdoors", "outdoors", 1.5, 0.0), 21.0, 1.0, {})
    with pytest.raises(ValueError, match="no space 'attic'"):
        ducts.distribution(_system("attic", "outdoors"), 21.0, 1.0, {})


def test_air_flow_from_capacity_by_hand():
    # Q = P / (ρc · ΔT): 16 kW over 1207.19 J/(m³·K) · 27.78 K = 0.4771 m³/s
    assert ducts.air_flow_from_capacity(16000.0, 27.78, RHO_C) == pytest.approx(
        16000.0 / (RHO_C * 27.78), rel=1e-12
    )
