"""Heat pump by temperature bins against building-energy-standards-data's performance curves.

The curves ``HPACHeatCapFT`` and ``HPACHeatEIRFT`` are read here from the installed package's
``support_performance_curves.json`` (not from our copy), and the copy in
``server/data/heat_pump_curves.json`` is compared with them field by field. Hours are worked
by hand in the comments.
"""

from __future__ import annotations

import importlib.metadata
import json
import pathlib

import building_energy_standards_data
import pytest

from server.physics import heat_pump as hp
from server.physics.units import HOUR_S, f_to_c
from server.services.heat_pump_rating import CURVES_FILE, heat_pump_curves

PACKAGE_FILE = (
    pathlib.Path(building_energy_standards_data.__file__).parent
    / "database_files"
    / "support_performance_curves.json"
)
ROWS = {row["name"]: row for row in json.loads(PACKAGE_FILE.read_text())}
T47, T17 = f_to_c(47.0), f_to_c(17.0)


def package_curve(name: str, t: float) -> float:
    """The package's cubic at t [°C], its range limits applied."""
    row = ROWS[name]
    x = min(max(t, row["minimum_independent_variable_1"]), row["maximum_independent_variable_1"])
    return row["coeff_1"] + row["coeff_2"] * x + row["coeff_3"] * x**2 + row["coeff_4"] * x**3


def test_the_copy_matches_the_installed_package():
    copy = json.loads(CURVES_FILE.read_text())
    assert copy["source"]["version"] == importlib.metadata.version("building-energy-standards-data")
    assert copy["source"]["file"].endswith(PACKAGE_FILE.name)
    for name, row in copy["curves"].items():
        assert all(ROWS[name][key] == value for key, value in row.items()), name
    assert ROWS["HPACHeatCapFT"]["independent_variable_1"] == "Toadb"  # outdoor dry-bulb


@pytest.mark.parametrize("t", [-30.0, -20.0, -8.333, 0.0, 8.333, 15.0, 20.0, 35.0])
def test_capacity_and_cop_follow_the_package_curves(t: float):
    curves = heat_pump_curves()
    rating = hp.HeatPumpRating(capacity_47_w=10000.0, cop_47=3.5)
    cap = 10000.0 * package_curve("HPACHeatCapFT", t) / package_curve("HPACHeatCapFT", T47)
    cop = 3.5 * package_curve("HPACHeatEIRFT", T47) / package_curve("HPACHeatEIRFT", t)
    assert hp.capacity_w(rating, curves, t) == pytest.approx(cap, rel=1e-12)
    assert hp.cop(rating, curves, t) == pytest.approx(cop, rel=1e-12)


def test_a_17_f_rating_is_met_exactly_and_47_f_is_unchanged():
    curves = heat_pump_curves()
    rating = hp.HeatPumpRating(10000.0, 3.5, capacity_17_w=6000.0, cop_17=2.2)
    assert hp.capacity_w(rating, curves, T17) == pytest.approx(6000.0, rel=1e-12)
    assert hp.cop(rating, curves, T17) == pytest.approx(2.2, rel=1e-12)
    assert hp.capacity_w(rating, curves, T47) == pytest.approx(10000.0, rel=1e-12)
    assert hp.cop(rating, curves, T47) == pytest.approx(3.5, rel=1e-12)


def test_hspf_relations_by_hand():
    # COP_47 = −0.0255 · 8.2² + 0.6239 · 8.2 = −1.71462 + 5.11598 = 3.40136 (RP-1197)
    assert hp.hspf_to_cop47(8.2) == pytest.approx(3.40136, abs=1e-9)
    # HSPF2 7.5 → HSPF 7.5 / 0.85 = 8.8235 (from memory, ducted systems)
    assert hp.hspf2_to_hspf(7.5) == pytest.approx(8.823529, abs=1e-6)


def test_two_bins_worked_by_hand():
    # UA 200 W/K, balance 18 °C, 8 kW at 47 °F, COP 3.
    # Bin 8.333 °C (47 °F), 100 h: load 200 · 9.667 = 1933.3 W < 8 kW, all by the heat pump
    # at COP 3: 1933.3 / 3 W for 100 h.
    # Bin −20 °C, 10 h: load 200 · 38 = 7600 W; capacity 8000 · CapFT(−20)/CapFT(8.333) (the
    # package's curves, about 1900 W); the rest from resistance backup at 1.
    curves = heat_pump_curves()
    rating = hp.HeatPumpRating(8000.0, 3.0)
    season = hp.season(rating, curves, [(T47, 100.0), (-20.0, 10.0)], 200.0, 18.0)
    load_a = 200.0 * (18.0 - T47)
    load_b = 200.0 * 38.0
    cap_b = 8000.0 * package_curve("HPACHeatCapFT", -20.0) / package_curve("HPACHeatCapFT", T47)
    cop_b = 3.0 * package_curve("HPACHeatEIRFT", T47) / package_curve("HPACHeatEIRFT", -20.0)
    hp_elec = (load_a / 3.0 * 100 + cap_b / cop_b * 10) * HOUR_S
    backup = (load_b - cap_b) * 10 * HOUR_S
    assert season.heat_j == pytest.approx((load_a * 100 + load_b * 10) * HOUR_S, rel=1e-12)
    assert season.heat_pump_electricity_j == pytest.approx(hp_elec, rel=1e-12)
    assert season.backup_electricity_j == pytest.approx(backup, rel=1e-12)
    assert season.seasonal_cop == pytest.approx(season.heat_j / (hp_elec + backup), rel=1e-12)


def test_a_warm_climate_needs_no_backup():
    # Every hour between 5 and 15 °C; a 10 kW heat pump against at most 150 · 13.3 = 2 kW.
    curves = heat_pump_curves()
    bins = [(float(t), 500.0) for t in range(5, 16)]
    season = hp.season(hp.HeatPumpRating(10000.0, 3.2), curves, bins, 150.0, 18.3)
    assert season.backup_electricity_j == 0.0
    assert season.backup_share == 0.0
    assert season.seasonal_cop > 3.2  # milder than 47 °F on average: above the rated COP


def test_a_very_cold_climate_is_carried_by_the_backup():
    # −25 °C all season (curves held at their −20 °C end): 500 · 43 = 21.5 kW of load against
    # about 1.2 kW of capacity: the backup carries ~95 %, and all of it below a −15 °C cut-off.
    curves = heat_pump_curves()
    bins = [(-25.0, 2000.0)]
    season = hp.season(hp.HeatPumpRating(5000.0, 3.0), curves, bins, 500.0, 18.0)
    cap = 5000.0 * package_curve("HPACHeatCapFT", -20.0) / package_curve("HPACHeatCapFT", T47)
    assert season.backup_share == pytest.approx(1 - cap / 21500.0, rel=1e-12)
    assert season.backup_share > 0.9
    cut = hp.season(hp.HeatPumpRating(5000.0, 3.0, cutoff_c=-15.0), curves, bins, 500.0, 18.0)
    assert cut.backup_share == 1.0
    assert cut.seasonal_cop == pytest.approx(1.0)


def test_balance_point_is_where_capacity_meets_the_load():
    curves = heat_pump_curves()
    rating = hp.HeatPumpRating(8000.0, 3.0)
    t = hp.balance_point_c(rating, curves, 300.0, 18.0)
    assert t is not None
    assert hp.capacity_w(rating, curves, t) == pytest.approx(300.0 * (18.0 - t), rel=1e-9)


def test_bins_from_hourly_by_hand():
    # bins hold [centre − 0.5, centre + 0.5): −0.5 and 0.4 in bin 0, 0.6 and 1.49 in bin 1.
    assert hp.bins_from_hourly([0.4, 0.6, -0.5, float("nan"), 1.49]) == [(0.0, 2.0), (1.0, 2.0)]
