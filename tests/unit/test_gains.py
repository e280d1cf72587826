"""Internal gains default, the balance point with solar gains, and the model's window terms.

Sources: ANSI/RESNET/ICC 301 reference-home internal gains 17,900 + 23.8 × CFA + 4,104 × N_br
Btu/day (from memory, ../shared/REFERENCES.md); the balance point t = t_set − gains / UA
(ASHRAE Handbook—Fundamentals ch. 19); unit factors from pint. Every figure worked by hand in
the comments.
"""

from __future__ import annotations

import pint
import pytest

from server.physics import gains
from server.physics import house_model as model
from server.physics.fuels import fuel_by_slug

Q = pint.UnitRegistry().Quantity


def test_resnet_default_by_hand() -> None:
    # 2,000 ft², 3 bedrooms: 17,900 + 23.8 × 2,000 + 4,104 × 3 = 77,812 Btu/day
    # = 3,242.1667 Btu/h × 0.29307107 W per Btu/h = 950.19 W (pint: Btu_it/hr -> W)
    area_m2 = Q(2000, "ft**2").to("m**2").magnitude
    expected_w = Q(77_812 / 24, "Btu_it/hr").to("W").magnitude
    assert gains.resnet_internal_gains_w(area_m2, 3) == pytest.approx(expected_w, rel=1e-9)
    assert expected_w == pytest.approx(950.19, abs=0.01)
    # no floor area, no bedrooms: the constant alone, 17,900 Btu/day = 218.59 W
    assert gains.resnet_internal_gains_w(0.0, 0) == pytest.approx(
        Q(17_900 / 24, "Btu_it/hr").to("W").magnitude, rel=1e-9
    )
    with pytest.raises(ValueError):
        gains.resnet_internal_gains_w(-1.0, 2)


BASES = (0.0, 10.0, 20.0, 30.0)


def test_balance_point_without_solar_is_the_closed_form() -> None:
    # 20 − 1,000 / 200 = 15 °C; held at the table's ends beyond it
    assert gains.balance_point_c(20.0, 1000.0, 200.0, BASES) == pytest.approx(15.0)
    assert gains.balance_point_c(20.0, 10_000.0, 200.0, BASES) == 0.0
    assert gains.balance_point_c(40.0, 0.0, 200.0, BASES) == 30.0


def test_balance_point_with_solar_by_hand() -> None:
    # one window, SHGC·A = 0.5 × 10 = 5 m², mean plane irradiance Ē(t) = 20 + 2t W/m² (linear
    # in the table, so interpolation is exact): gains(t) = 1,000 + 5 (20 + 2t) = 1,100 + 10 t;
    # t = 20 − (1,100 + 10 t) / 200  ->  210 t = 2,900  ->  t = 13.809524 °C
    plane = tuple(20.0 + 2.0 * b for b in BASES)
    found = gains.balance_point_c(20.0, 1000.0, 200.0, BASES, [(5.0, plane)])
    assert found == pytest.approx(2900.0 / 210.0, abs=1e-9)
    # SHGC 0: no solar term, the closed form 15 °C
    assert gains.balance_point_c(20.0, 1000.0, 200.0, BASES, [(0.0, plane)]) == pytest.approx(15.0)


def _house(shgc: float, solar: tuple[float, ...]) -> model.House:
    # wall 100 m² × 0.5 = 50 W/K, window 10 m² × 2.8 = 28 W/K: UA 78 W/K
    return model.House(
        surfaces=(
            model.Surface("wall", "wall", 100.0, 0.5),
            model.Surface("win", "window", 10.0, 2.8, shgc=shgc, solar_w_per_m2=solar),
        ),
        climate=model.Climate(
            3000.0,
            variable_base=model.VariableBase(20.0, 500.0, BASES, (0.0, 500.0, 3000.0, 6500.0)),
        ),
        heating=model.Heating(fuel_by_slug("electric_resistance"), 1.0, 0.20),
    )


def test_window_upgrade_moves_the_balance_point_by_hand() -> None:
    # as found: gains 500 + 0.6 × 10 × 100 = 1,100 W; t = 20 − 1,100 / 78 = 5.897436 °C;
    # HDD = 500 × 0.5897436 = 294.8718 K·day; UA·HDD = 50 × (1,560 − 1,100) = 23,000 W·day/K·K
    # -> 23,000 × 24 / 1,000 = 552 kWh, $110.40 at $0.20
    flat = (100.0,) * 4
    found = model.evaluate(_house(0.6, flat))
    assert found.balance_point_c == pytest.approx(20 - 1100 / 78, abs=1e-9)
    assert found.hdd_k_day == pytest.approx(294.871795, rel=1e-6)
    assert found.heating_fuel_units == pytest.approx(552.0, rel=1e-9)
    assert found.solar_gain_by_surface_w["win"] == pytest.approx(600.0)
    # replacement U 1.4, SHGC 0.4: UA 64, gains 900 W, t = 5.9375, UA·HDD = 50 × 380 = 19,000
    # -> 456 kWh, $91.20; saves $19.20 a year
    upgrade = model.AssemblyUpgrade("new", "win", 1.4, shgc=0.4)
    after = model.evaluate(model.apply_upgrades(_house(0.6, flat), [upgrade]))
    assert after.balance_point_c == pytest.approx(5.9375, abs=1e-9)
    assert after.heating_fuel_units == pytest.approx(456.0, rel=1e-9)
    assert found.total_cost - after.total_cost == pytest.approx(19.20, rel=1e-9)
    # SHGC 0 (limiting case): no solar gain; t = 20 − 500 / 78 = 13.589744 °C
    dark = model.evaluate(_house(0.0, flat))
    assert dark.solar_gain_by_surface_w == {}
    assert dark.balance_point_c == pytest.approx(20 - 500 / 78, abs=1e-9)
