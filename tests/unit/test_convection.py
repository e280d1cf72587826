"""Natural convection (Churchill–Chu) and radiation from a horizontal pipe: hand-worked cases."""

from __future__ import annotations

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from server.physics.convection import (
    AIR_TABLE,
    air_properties,
    cylinder_surface_coefficient,
    natural_convection_coefficient,
    nusselt_churchill_chu,
    radiation_coefficient,
    rayleigh_number_cylinder,
)

QUICK = settings(max_examples=200, deadline=None)


def test_churchill_chu_hand_worked() -> None:
    # Churchill & Chu (1975), Bergman et al. 7th ed. eq. 9.34, Ra = 1e6, Pr = 0.7:
    # (0.559/0.7)^(9/16) = 0.798571^0.5625 = 0.881153; (1 + 0.881153)^(8/27) = 1.205899
    # Ra^(1/6) = 10; 0.387 * 10 / 1.205899 = 3.209224; (0.60 + 3.209224)^2 = 14.51019
    assert nusselt_churchill_chu(1e6, 0.7) == pytest.approx(14.51019, rel=1e-6)


def test_churchill_chu_still_air_limit() -> None:
    # Limiting case Ra -> 0 (no buoyancy): Nu = 0.60^2 = 0.36 for any Pr.
    assert nusselt_churchill_chu(0.0, 0.7) == pytest.approx(0.36, abs=1e-12)
    assert nusselt_churchill_chu(0.0, 7.0) == pytest.approx(0.36, abs=1e-12)


def test_churchill_chu_rejects_bad_numbers() -> None:
    with pytest.raises(ValueError):
        nusselt_churchill_chu(-1.0, 0.7)
    with pytest.raises(ValueError):
        nusselt_churchill_chu(1e6, 0.0)
    with pytest.raises(ValueError):
        nusselt_churchill_chu(math.nan, 0.7)


def test_air_table_rows_are_self_consistent() -> None:
    # Bergman et al. Table A.4 (from memory): each row must satisfy Pr = mu * cp / k to the
    # table's printed precision (about 0.5 %); a mistyped value breaks this.
    for temperature_k, _density, cp, mu, k, prandtl in AIR_TABLE:
        assert mu * cp / k == pytest.approx(prandtl, rel=6e-3), temperature_k


def test_air_properties_at_a_row_and_between_rows() -> None:
    # At 300 K (26.85 °C) the Table A.4 row itself: k = 0.0263, Pr = 0.707, nu = 184.6e-7 / 1.1614.
    at_row = air_properties(26.85)
    assert at_row.conductivity_w_mk == pytest.approx(0.0263, rel=1e-12)
    assert at_row.prandtl == pytest.approx(0.707, rel=1e-12)
    assert at_row.kinematic_viscosity_m2_s == pytest.approx(184.6e-7 / 1.1614, rel=1e-12)
    # Half-way between 300 K and 350 K (51.85 °C): k = (0.0263 + 0.0300) / 2 = 0.02815.
    assert air_properties(51.85).conductivity_w_mk == pytest.approx(0.02815, rel=1e-9)


def test_air_properties_outside_the_table_raise() -> None:
    # Table A.4 rows used here span 200 K .. 800 K (-73.15 °C .. 526.85 °C).
    with pytest.raises(ValueError, match="tabulated"):
        air_properties(-80.0)
    with pytest.raises(ValueError, match="tabulated"):
        air_properties(530.0)
    with pytest.raises(ValueError):
        air_properties(math.nan)


def test_natural_convection_hand_worked_60_mm_pipe() -> None:
    # D = 60 mm, surface 40 °C, air 20 °C: film 30 °C = 303.15 K, weight (303.15-300)/50 = 0.063
    # in Table A.4 (from memory): k = 0.0263 + 0.063*0.0037 = 0.0265331 W/(m·K);
    # Pr = 0.707 - 0.063*0.007 = 0.706559; mu = 184.6e-7 + 0.063*23.6e-7 = 1.860868e-5;
    # rho = 1.1614 - 0.063*0.1664 = 1.1509168; nu = mu/rho = 1.616857e-5 m²/s.
    # Ra = 9.80665/303.15 * 20 * 0.06^3 * 0.706559 / nu^2 = 3.77704e5
    # Nu = (0.60 + 0.387 * 3.77704e5^(1/6) / 1.205022)^2 = (0.60 + 0.387*8.502083/1.205022)^2
    #    = 11.09219;  h_c = Nu k / D = 11.09219 * 0.0265331 / 0.06 = 4.90517 W/(m²·K)
    rayleigh, air = rayleigh_number_cylinder(0.06, 40.0, 20.0)
    assert rayleigh == pytest.approx(3.77704e5, rel=1e-5)
    assert air.prandtl == pytest.approx(0.706559, rel=1e-9)
    h_c, _ra, nusselt = natural_convection_coefficient(0.06, 40.0, 20.0)
    assert nusselt == pytest.approx(11.09219, rel=1e-5)
    assert h_c == pytest.approx(4.90517, rel=1e-5)
    # Bergman et al. Table 1.1 (from memory): free convection in gases is 2..25 W/(m²·K).
    assert 2.0 < h_c < 25.0


def test_convection_zero_temperature_difference() -> None:
    # Limiting case dT = 0: Ra = 0, Nu = 0.36, h_c = 0.36 k / D (pure conduction limit).
    # Air at 20 °C = 293.15 K: k = 0.0223 + (43.15/50)*0.0040 = 0.025752 W/(m·K) (Table A.4).
    h_c, rayleigh, nusselt = natural_convection_coefficient(0.05, 20.0, 20.0)
    assert rayleigh == 0.0
    assert nusselt == pytest.approx(0.36, abs=1e-12)
    assert h_c == pytest.approx(0.36 * 0.025752 / 0.05, rel=1e-9)


def test_radiation_coefficient_hand_worked() -> None:
    # Bergman et al. eq. 1.9: eps = 0.9, Ts = 50 °C = 323.15 K, Tsur = 20 °C = 293.15 K:
    # Ts² + Tsur² = 104425.92 + 85936.92 = 190362.85; Ts + Tsur = 616.3;
    # h_r = 0.9 * 5.670374e-8 * 190362.85 * 616.3 = 5.98727 W/(m²·K)
    assert radiation_coefficient(0.9, 50.0, 20.0) == pytest.approx(5.98727, rel=1e-5)


@QUICK
@given(
    emissivity=st.floats(0.01, 1.0),
    surface_c=st.floats(-50.0, 400.0),
    surroundings_c=st.floats(-50.0, 400.0),
)
def test_radiation_linearisation_is_exact(
    emissivity: float, surface_c: float, surroundings_c: float
) -> None:
    # Invariant: h_r (Ts - Tsur) = eps sigma (Ts^4 - Tsur^4) exactly (difference of squares).
    sigma = 5.670374419e-8  # CODATA 2018
    ts, tsur = surface_c + 273.15, surroundings_c + 273.15
    exact = emissivity * sigma * (ts**4 - tsur**4)
    linear = radiation_coefficient(emissivity, surface_c, surroundings_c) * (ts - tsur)
    assert linear == pytest.approx(exact, rel=1e-9, abs=1e-9)


def test_radiation_rejects_bad_emissivity() -> None:
    for emissivity in (0.0, -0.1, 1.5, math.nan):
        with pytest.raises(ValueError, match="emissivity"):
            radiation_coefficient(emissivity, 50.0, 20.0)


@QUICK
@given(
    diameter_m=st.floats(0.005, 1.0),
    ambient_c=st.floats(-20.0, 40.0),
    delta_k=st.floats(0.5, 150.0),
    growth=st.floats(1.01, 3.0),
)
def test_convection_trends(
    diameter_m: float, ambient_c: float, delta_k: float, growth: float
) -> None:
    # Invariants of eq. 9.34 in air: h_c rises with dT, and falls as D grows (d ln Nu / d ln D < 1
    # because d ln Nu / d ln Ra < 1/3).
    base, _, _ = natural_convection_coefficient(diameter_m, ambient_c + delta_k, ambient_c)
    hotter, _, _ = natural_convection_coefficient(
        diameter_m, ambient_c + delta_k * growth, ambient_c
    )
    wider, _, _ = natural_convection_coefficient(
        diameter_m * growth, ambient_c + delta_k, ambient_c
    )
    assert hotter > base
    assert wider < base


def test_combined_coefficient_adds_the_parts() -> None:
    # h = h_c + h_r, each part as checked above: 60 mm pipe, 40 °C in 20 °C air, eps = 0.9.
    combined = cylinder_surface_coefficient(0.06, 40.0, 20.0, 0.9)
    assert combined.convection_w_m2k == pytest.approx(4.90517, rel=1e-5)
    # h_r = 0.9 * 5.670374e-8 * (98062.92 + 85936.92) * 606.3 = 0.9 * 5.670374e-8 * 1.115591e8
    #     = 5.69324 W/(m²·K)   (313.15² = 98062.92, 293.15² = 85936.92, eq. 1.9)
    assert combined.radiation_w_m2k == pytest.approx(5.69324, rel=1e-5)
    assert combined.total_w_m2k == pytest.approx(4.90517 + 5.69324, rel=1e-5)
    assert combined.film_temperature_c == pytest.approx(30.0)
