"""The pure whole-house model (server.physics.house_model): a hand-worked house and invariants.

The hand-worked house (IP, as an auditor writes it down):
  attic floor 1000 ft² at R-11 -> R-49 (cost $300 + $1.20/ft², rebate $200);
  walls 1400 ft² at R-14 (whole wall, films included), not upgraded;
  blower door 3200 -> 2200 CFM50 (cost $900), N = 18, volume 12000 ft³;
  HDD 5400 °F·day; natural gas furnace at 80 %, $1.45/therm; no cooling.

As found:
  UA_attic = 1000 / 11 = 90.9091;  UA_walls = 1400 / 14 = 100.0;
  UA_inf = 0.018 × (3200 × 60 / 12000 / 18) × 12000 = 0.018 × 0.88889 × 12000 = 192.0;
  UA = 382.9091 Btu/(h·°F);  load = 382.9091 × 5400 × 24 = 49,625,018 Btu;
  gas = 49,625,018 / (0.80 × 100,000) = 620.3127 therm;  cost = 620.3127 × 1.45 = $899.4535.
Package (attic R-49 + air sealing):
  UA_attic = 1000 / 49 = 20.4082;  UA_inf = 0.018 × 2200 × 60 / 18 = 132.0;
  UA = 20.4082 + 100 + 132 = 252.4082;  load = 252.4082 × 129,600 = 32,712,098 Btu;
  gas = 408.9012 therm;  cost = $592.9068;  savings s = 899.4535 - 592.9068 = $306.5467.
Each alone:
  attic: ΔUA = 90.9091 - 20.4082 = 70.5009 -> 70.5009 × 129,600 / 80,000 × 1.45 = $165.6067;
  air sealing: ΔUA = 60 -> 60 × 129,600 / 80,000 × 1.45 = $140.9400;  sum = $306.5467.
Money: installed 300 + 1.20 × 1000 + 900 = $2400; rebates $200; net $2200;
  payback 2200 / 306.5467 = 7.1767 years.
"""

from __future__ import annotations

from dataclasses import replace

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from server.physics import house_model as hm
from server.physics.energy import CFM_M3_PER_S
from server.physics.fuels import FUELS, KWH_J
from server.physics.units import BTU_J, to_si

PROPERTY = settings(max_examples=200, deadline=None)


def u_from_r_ip(r_ip: float) -> float:
    return 1.0 / to_si(r_ip, "r", "ip")


def ft2(area: float) -> float:
    return to_si(area, "area", "ip")


def ua_ip(ua_w_per_k: float) -> float:
    return ua_w_per_k / to_si(1.0, "ua", "ip")


HOUSE = hm.House(
    surfaces=(
        hm.Surface("attic", "ceiling", ft2(1000), u_from_r_ip(11)),
        hm.Surface("walls", "wall", ft2(1400), u_from_r_ip(14)),
    ),
    climate=hm.Climate(hdd_k_day=to_si(5400, "degree_days", "ip")),
    heating=hm.Heating(FUELS["natural_gas"], efficiency=0.80, price_per_unit=1.45),
    economics=hm.Economics(0.03, 0.02, 20, loan_apr=0.06, loan_months=120),
    air_leakage=hm.AirLeakage(3200 * CFM_M3_PER_S, 18.0, to_si(12000, "volume", "ip")),
)
ATTIC = hm.AssemblyUpgrade("attic-r49", "attic", u_from_r_ip(49), 300 + 1.20 * 1000, 200, 30)
SEAL = hm.AirSealingUpgrade("air-seal", 2200 * CFM_M3_PER_S, 900, 0, 20)
PACKAGE = hm.Package("attic-and-sealing", ("attic-r49", "air-seal"))


def test_as_found_hand_worked():
    found = hm.evaluate(HOUSE)
    assert ua_ip(found.ua_by_surface_w_per_k["attic"]) == pytest.approx(90.90909, rel=1e-6)
    assert ua_ip(found.infiltration_ua_w_per_k) == pytest.approx(192.0, rel=1e-9)
    assert ua_ip(found.ua_w_per_k) == pytest.approx(382.90909, rel=1e-6)
    assert found.heating_load_j / BTU_J == pytest.approx(49_625_018.18, rel=1e-9)
    assert found.heating_fuel_units == pytest.approx(620.31273, rel=1e-7)
    assert found.heating_cost == pytest.approx(899.45345, rel=1e-7)
    assert found.total_cost == found.heating_cost  # no cooling system
    # CO2: 620.3127 therm × 5.306 kg/therm (53.06 kg/mmBtu, EPA, from memory) = 3291.3 kg.
    assert found.co2_kg == pytest.approx(620.31273 * 5.306, rel=1e-7)


def test_package_is_one_modified_house_hand_worked():
    result = hm.compare(HOUSE, [ATTIC, SEAL], [PACKAGE])
    package = result.packages[0]
    assert ua_ip(package.energy.ua_w_per_k) == pytest.approx(252.40816, rel=1e-6)
    assert package.energy.heating_fuel_units == pytest.approx(408.90122, rel=1e-7)
    assert package.appraisal.annual_savings == pytest.approx(306.54668, rel=1e-7)
    assert package.appraisal.installed_cost == pytest.approx(2400.0, rel=1e-12)
    assert package.appraisal.net_cost == pytest.approx(2200.0, rel=1e-12)
    assert package.appraisal.simple_payback_years == pytest.approx(7.176721, rel=1e-6)
    # NPV and SIR worked in tests/unit/test_economics.py: 3342.74 and 2.5194.
    assert package.appraisal.npv == pytest.approx(3342.7408, rel=1e-6)
    assert package.appraisal.sir == pytest.approx(2.519428, rel=1e-6)
    # Steps in the listed order: attic first ($165.6067), then air sealing on the R-49 house
    # ($140.94): with the degree-day method they are the same as alone.
    assert [s.upgrade_id for s in package.steps] == ["attic-r49", "air-seal"]
    assert package.steps[0].annual_savings == pytest.approx(165.60668, rel=1e-7)
    assert package.steps[1].annual_savings == pytest.approx(140.94, rel=1e-7)
    assert ua_ip(package.steps[1].ua_reduction_w_per_k) == pytest.approx(60.0, rel=1e-9)


def test_each_upgrade_alone_hand_worked():
    alone = {o.id: o for o in hm.compare(HOUSE, [ATTIC, SEAL], []).upgrades_alone}
    assert alone["attic-r49"].appraisal.annual_savings == pytest.approx(165.60668, rel=1e-7)
    assert alone["attic-r49"].appraisal.net_cost == pytest.approx(1300.0, rel=1e-12)
    assert alone["air-seal"].appraisal.annual_savings == pytest.approx(140.94, rel=1e-7)


def test_steps_follow_the_listed_order_and_add_up():
    reverse = hm.Package("reverse", ("air-seal", "attic-r49"))
    result = hm.compare(HOUSE, [ATTIC, SEAL], [PACKAGE, reverse])
    forward, backward = result.packages
    assert [s.upgrade_id for s in backward.steps] == ["air-seal", "attic-r49"]
    for option in (forward, backward):
        total = sum(s.annual_savings for s in option.steps)
        assert total == pytest.approx(option.appraisal.annual_savings, rel=1e-12)
    assert forward.appraisal.annual_savings == pytest.approx(
        backward.appraisal.annual_savings, rel=1e-12
    )


def test_cooling_hand_worked():
    # SEER 13, CDD 900, $0.16/kWh: 382.909 × 900 × 24 / 13000 = 636.218 kWh -> $101.79.
    house = replace(
        HOUSE,
        climate=replace(HOUSE.climate, cdd_k_day=to_si(900, "degree_days", "ip")),
        cooling=hm.Cooling(0.16, seer=13.0),
    )
    found = hm.evaluate(house)
    assert found.cooling_electricity_kwh == pytest.approx(636.21818, rel=1e-7)
    assert found.cooling_cost == pytest.approx(101.79491, rel=1e-7)
    assert found.total_cost == pytest.approx(899.45345 + 101.79491, rel=1e-7)


def test_heat_pump_uses_the_grid_factor():
    # 49,625,018 Btu / (2.5 × 3412.14 Btu/kWh) = 5817.4 kWh; × 0.4 kg/kWh = 2327.0 kg.
    house = replace(
        HOUSE,
        heating=hm.Heating(FUELS["heat_pump"], 2.5, 0.15),
        electricity_co2_kg_per_kwh=0.4,
    )
    found = hm.evaluate(house)
    kwh = 49_625_018.18 * BTU_J / KWH_J / 2.5
    assert found.heating_fuel_units == pytest.approx(kwh, rel=1e-9)
    assert found.heating_co2_kg == pytest.approx(kwh * 0.4, rel=1e-9)


def test_pipe_run_loss_is_bought_at_the_heating_system():
    # 10 m at R' = 2 m·K/W, ΔT 40 K, 1000 h: 200 W × 1000 h = 7.2e8 J = 682,428 Btu;
    # / (0.80 × 100,000) = 8.5304 therm more gas. Insulating to R' = 4 halves the loss.
    pipe = hm.PipeRunLoss("hot-water", 10.0, 2.0, 40.0, 1000.0)
    house = replace(HOUSE, pipe_runs=(pipe,))
    found = hm.evaluate(house)
    assert found.pipe_loss_j == pytest.approx(7.2e8, rel=1e-12)
    extra = found.heating_fuel_units - hm.evaluate(HOUSE).heating_fuel_units
    assert extra == pytest.approx(7.2e8 / BTU_J / 80_000, rel=1e-9)
    wrap = hm.PipeInsulationUpgrade("wrap", "hot-water", 4.0, 50.0)
    after = hm.evaluate(hm.apply_upgrades(house, [wrap]))
    assert after.pipe_loss_j == pytest.approx(3.6e8, rel=1e-12)


# --- refusals ---------------------------------------------------------------------------------


def test_two_upgrades_on_one_surface_refused():
    other = hm.AssemblyUpgrade("attic-r38", "attic", u_from_r_ip(38))
    with pytest.raises(ValueError, match="both change surface attic"):
        hm.apply_upgrades(HOUSE, [ATTIC, other])


def test_air_sealing_above_as_found_refused():
    leakier = hm.AirSealingUpgrade("worse", 3300 * CFM_M3_PER_S)
    with pytest.raises(ValueError, match="leakier"):
        hm.apply_upgrades(HOUSE, [leakier])


def test_unknown_surface_and_upgrade_refused():
    with pytest.raises(ValueError, match="no surface 'roof'"):
        hm.apply_upgrades(HOUSE, [hm.AssemblyUpgrade("x", "roof", 0.1)])
    with pytest.raises(ValueError, match="unknown upgrades: nope"):
        hm.compare(HOUSE, [ATTIC], [hm.Package("p", ("attic-r49", "nope"))])


def test_apply_does_not_change_the_original():
    hm.apply_upgrades(HOUSE, [ATTIC, SEAL])
    assert HOUSE.surfaces[0].u_si == u_from_r_ip(11)
    assert (
        HOUSE.air_leakage is not None and HOUSE.air_leakage.flow50_m3_per_s == 3200 * CFM_M3_PER_S
    )


# --- invariants -------------------------------------------------------------------------------

r_values = st.floats(1.0, 80.0)
surface_count = st.integers(1, 5)


@st.composite
def houses(draw):
    n = draw(surface_count)
    surfaces = tuple(
        hm.Surface(f"s{i}", "wall", ft2(draw(st.floats(20.0, 3000.0))), u_from_r_ip(draw(r_values)))
        for i in range(n)
    )
    cooling = draw(st.none() | st.builds(hm.Cooling, st.floats(0.0, 0.5), st.floats(8.0, 25.0)))
    return hm.House(
        surfaces=surfaces,
        climate=hm.Climate(draw(st.floats(0.0, 6000.0)), draw(st.floats(0.0, 2000.0))),
        heating=hm.Heating(
            FUELS[draw(st.sampled_from(sorted(FUELS)))],
            draw(st.floats(0.5, 4.0)),
            draw(st.floats(0.0, 5.0)),
        ),
        air_leakage=hm.AirLeakage(draw(st.floats(0.0, 3.0)), draw(st.floats(10.0, 25.0)), 400.0),
        cooling=cooling,
    )


@PROPERTY
@given(house=houses(), index=st.integers(0, 4), factor=st.floats(1.0, 10.0))
def test_more_insulation_never_raises_cost(house, index, factor):
    surface = house.surfaces[index % len(house.surfaces)]
    better = hm.AssemblyUpgrade("more", surface.id, surface.u_si / factor)  # R × factor
    before = hm.evaluate(house)
    after = hm.evaluate(hm.apply_upgrades(house, [better]))
    assert after.total_cost <= before.total_cost * (1 + 1e-12) + 1e-9
    assert after.co2_kg <= before.co2_kg * (1 + 1e-12) + 1e-9


@PROPERTY
@given(
    house=houses(),
    factors=st.lists(st.floats(1.0, 10.0), min_size=1, max_size=5),
    seal=st.floats(0, 1),
)
def test_package_savings_equal_the_sum_of_singles(house, factors, seal):
    # Degree-day method, fixed efficiencies: cost is linear in UA and each measure changes a
    # separate term of UA, so package savings <= sum of single savings holds with equality.
    upgrades: list[hm.Upgrade] = [
        hm.AssemblyUpgrade(f"u{i}", s.id, s.u_si / f)
        for i, (s, f) in enumerate(zip(house.surfaces, factors, strict=False))
    ]
    assert house.air_leakage is not None
    upgrades.append(hm.AirSealingUpgrade("seal", house.air_leakage.flow50_m3_per_s * seal))
    package = hm.Package("all", tuple(u.id for u in upgrades))
    result = hm.compare(house, upgrades, [package])
    singles = sum(o.appraisal.annual_savings for o in result.upgrades_alone)
    together = result.packages[0].appraisal.annual_savings
    tolerance = 1e-9 * max(1.0, abs(singles))
    assert together <= singles + tolerance
    assert together == pytest.approx(singles, rel=1e-9, abs=1e-9)
