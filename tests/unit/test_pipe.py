"""Pipe insulation physics and service: hand-worked cases, limits, invariants, ip/si round trip."""

from __future__ import annotations

import math

import pint
import pytest
from hypothesis import assume, given, settings
from hypothesis import strategies as st

from server.documents.pipe import PipeRequest
from server.errors import InputError
from server.physics.pipe import annual_heat_loss, pipe_heat_loss, thickness_for_target
from server.physics.pipe_resistance import (
    critical_radius,
    cylinder_resistance_per_length,
    equivalent_flat_resistance,
)
from server.physics.pipe_types import (
    CautionKind,
    PipeCaution,
    PipeInputError,
    PipeLayer,
    PipeRun,
    Problem,
)
from server.services.pipe import compute_pipe
from server.services.pipe_words import caution_words, error_words, run_warnings

QUICK = settings(max_examples=200, deadline=None)
FEW = settings(max_examples=40, deadline=None)


def _run(
    diameter_mm: float,
    layers: list[tuple[float, float]],
    fluid_c: float,
    ambient_c: float,
    h: float | None = None,
    length_m: float = 1.0,
) -> PipeRun:
    return PipeRun(
        pipe_outer_diameter_m=diameter_mm / 1e3,
        layers=tuple(PipeLayer(t / 1e3, k) for t, k in layers),
        fluid_temperature_c=fluid_c,
        ambient_temperature_c=ambient_c,
        surface_coefficient_w_m2k=h,
        length_m=length_m,
    )


def _loss_formula(r0: float, thickness: float, k: float, h: float, delta_t: float) -> float:
    """q' = dT / (ln(r1/r0)/(2 pi k) + 1/(2 pi r1 h)), Bergman et al. 7th ed. eq. 3.33/3.35."""
    r1 = r0 + thickness
    return delta_t / (math.log(r1 / r0) / (2 * math.pi * k) + 1 / (2 * math.pi * r1 * h))


def test_hand_worked_22_mm_pipe_19_mm_insulation() -> None:
    # 22 mm pipe, 19 mm of k = 0.035 W/(m·K), h = 9 W/(m²·K), water 55 °C, air 15 °C, 10 m:
    # r0 = 0.011 m, r1 = 0.030 m, ln(0.030/0.011) = 1.0033021
    # R'_ins = 1.0033021 / (2 pi 0.035 = 0.2199115) = 4.562300 m·K/W
    # R'_s   = 1 / (2 pi 0.030 * 9 = 1.6964600) = 0.5894628 m·K/W;  R' = 5.151762 m·K/W
    # q' = 40 / 5.151762 = 7.764333 W/m;  Q = 77.64333 W;  Ts = 15 + 7.764333*0.5894628 = 19.57679
    # R_flat = 0.030 * 1.0033021 / 0.035 = 0.8599732 m²·K/W
    # bare: q' = 40 * 2 pi 0.011 * 9 = 40 * 0.6220353 = 24.88141 W/m
    result = pipe_heat_loss(_run(22, [(19, 0.035)], 55, 15, h=9.0, length_m=10.0))
    assert result.r_insulation_per_length_mk_w == pytest.approx(4.562300, rel=1e-6)
    assert result.r_surface_per_length_mk_w == pytest.approx(0.5894628, rel=1e-6)
    assert result.r_per_length_mk_w == pytest.approx(5.151762, rel=1e-6)
    assert result.heat_loss_per_length_w_m == pytest.approx(7.764333, rel=1e-6)
    assert result.heat_loss_w == pytest.approx(77.64333, rel=1e-6)
    assert result.surface_temperature_c == pytest.approx(19.57679, abs=1e-4)
    assert result.r_equivalent_flat_m2k_w == pytest.approx(0.8599732, rel=1e-6)
    assert result.bare_heat_loss_per_length_w_m == pytest.approx(24.88141, rel=1e-6)
    assert result.outer_diameter_m == pytest.approx(0.060, rel=1e-12)
    assert result.cautions == ()


def test_hand_worked_two_layers() -> None:
    # 22 mm pipe, 10 mm of k = 0.040 then 20 mm of k = 0.035, h = 10, 60 °C / 20 °C:
    # r = 0.011, 0.021, 0.041 m
    # R'_1 = ln(21/11)/(2 pi 0.04) = 0.6466272/0.2513274 = 2.572848
    # R'_2 = ln(41/21)/(2 pi 0.035) = 0.6690496/0.2199115 = 3.042359
    # R'_s = 1/(2 pi 0.041 * 10) = 1/2.576106 = 0.3881828;   R' = 6.003389 m·K/W
    # q' = 40 / 6.003389 = 6.662903 W/m; interface = 60 - 6.662903*2.572848 = 42.85737 °C
    # Ts = 20 + 6.662903*0.3881828 = 22.58642 °C
    # R_flat = 0.041 (0.6466272/0.040 + 0.6690496/0.035) = 0.041 * 35.28138 = 1.446537 m²·K/W
    result = pipe_heat_loss(_run(22, [(10, 0.040), (20, 0.035)], 60, 20, h=10.0))
    assert result.r_per_length_mk_w == pytest.approx(6.003389, rel=1e-6)
    assert result.heat_loss_per_length_w_m == pytest.approx(6.662903, rel=1e-6)
    assert result.layers[0].r_per_length_mk_w == pytest.approx(2.572848, rel=1e-6)
    assert result.layers[0].outer_temperature_c == pytest.approx(42.85737, abs=1e-4)
    assert result.layers[1].outer_temperature_c == pytest.approx(22.58642, abs=1e-4)
    assert result.surface_temperature_c == pytest.approx(22.58642, abs=1e-4)
    assert result.r_equivalent_flat_m2k_w == pytest.approx(1.446537, rel=1e-6)
    assert result.layers[1].outer_diameter_m == pytest.approx(0.082, rel=1e-12)


def test_resistance_helpers_hand_worked() -> None:
    # ln(2) / (2 pi 0.04) = 0.6931472 / 0.2513274 = 2.757946 m·K/W
    assert cylinder_resistance_per_length(0.01, 0.02, 0.04) == pytest.approx(2.757946, rel=1e-6)
    # R_flat for a bare pipe is zero; k/h = 0.04/8 = 5 mm
    assert equivalent_flat_resistance(0.022, ()) == 0.0
    assert critical_radius(0.04, 8.0) == pytest.approx(0.005)


def test_very_conductive_layer_behaves_like_a_bigger_bare_pipe() -> None:
    # Limiting case k -> infinity: the layer adds no resistance, only outer area.
    # 22 mm pipe + 5 mm of k = 1e4: q' -> dT * 2 pi r h = 40 * 2 pi 0.016 * 9 = 36.19115 W/m
    result = pipe_heat_loss(_run(22, [(5, 1e4)], 55, 15, h=9.0))
    assert result.heat_loss_per_length_w_m == pytest.approx(36.19115, rel=1e-5)
    assert result.surface_temperature_c == pytest.approx(55.0, abs=1e-3)


@pytest.mark.parametrize("coefficient", [9.0, None])
def test_zero_temperature_difference_gives_zero_loss(coefficient: float | None) -> None:
    # Limiting case Tf = Ta: no driving force, no heat flow, the surface sits at the ambient.
    result = pipe_heat_loss(_run(22, [(19, 0.035)], 20, 20, h=coefficient))
    assert result.heat_loss_per_length_w_m == 0.0
    assert result.surface_temperature_c == pytest.approx(20.0, abs=1e-12)


def test_bare_pipe_with_computed_coefficient() -> None:
    # Bare pipe: the surface is at the fluid temperature and q' = pi D h (Tf - Ta).
    result = pipe_heat_loss(_run(60, [], 40, 20))
    assert result.surface_temperature_c == pytest.approx(40.0)
    # h = 4.90517 + 5.69324 W/(m²·K) (see test_convection: 60 mm, 40 °C in 20 °C air, eps 0.9)
    # q' = pi 0.06 * 10.59841 * 20 = 39.95506 W/m
    assert result.surface_coefficient_w_m2k == pytest.approx(10.59841, rel=1e-5)
    assert result.heat_loss_per_length_w_m == pytest.approx(39.95506, rel=1e-5)


def test_cold_pipe_gains_heat_and_is_warned_about() -> None:
    # With a fixed h the problem is linear in dT: 5 °C water in 25 °C air gains what 45 °C loses.
    cold = pipe_heat_loss(_run(22, [(19, 0.035)], 5, 25, h=9.0))
    hot = pipe_heat_loss(_run(22, [(19, 0.035)], 45, 25, h=9.0))
    assert cold.heat_loss_per_length_w_m == pytest.approx(-hot.heat_loss_per_length_w_m)
    assert [c.kind for c in cold.cautions] == [CautionKind.COLD_PIPE]
    assert any("vapour-retarding" in note for note in run_warnings(cold))
    computed = pipe_heat_loss(_run(22, [(19, 0.035)], 5, 25))
    assert computed.heat_loss_per_length_w_m < 0
    assert 5 < computed.surface_temperature_c < 25


def test_critical_radius_small_pipe_poor_insulation() -> None:
    # Critical radius (Bergman et al. Example 3.6): r_cr = k/h = 0.2/9 = 22.2 mm.
    # 6 mm pipe (r0 = 3 mm), 80 °C in 20 °C air, h = 9:
    # bare q' = 60 * 2 pi 0.003 * 9 = 60 * 0.1696460 = 10.17876 W/m
    # 5 mm of k = 0.2: R' = ln(8/3)/(2 pi 0.2) + 1/(2 pi 0.008 * 9)
    #                     = 0.9808293/1.2566371 + 1/0.4523893 = 0.7805191 + 2.2104853 = 2.9910044
    # q' = 60 / 2.9910044 = 20.06015 W/m: insulating this pipe DOUBLES its loss.
    result = pipe_heat_loss(_run(6, [(5, 0.2)], 80, 20, h=9.0))
    assert result.bare_heat_loss_per_length_w_m == pytest.approx(10.17876, rel=1e-6)
    assert result.heat_loss_per_length_w_m == pytest.approx(20.06015, rel=1e-6)
    assert any("critical radius" in note for note in run_warnings(result))
    raises = [c for c in result.cautions if c.kind is CautionKind.RAISES_HEAT_FLOW]
    assert raises[0].value == pytest.approx(0.2 / 9, rel=1e-12)  # r_cr = k/h
    # The loss peaks where the outer radius equals k/h: q'(r_cr) = 60 / (ln(22.22/3)/1.2566 +
    # 1/(2 pi 0.02222 * 9)) = 60 / (1.593458 + 0.795775) = 25.11198 W/m; nearby radii lose less.
    peak_mm = (0.2 / 9 - 0.003) * 1e3
    peak = pipe_heat_loss(_run(6, [(peak_mm, 0.2)], 80, 20, h=9.0)).heat_loss_per_length_w_m
    assert peak == pytest.approx(25.11198, rel=1e-6)
    for factor in (0.8, 1.25):
        other = pipe_heat_loss(_run(6, [(peak_mm * factor, 0.2)], 80, 20, h=9.0))
        assert other.heat_loss_per_length_w_m < peak


def test_warnings_hot_surface_thin_layer_odd_coefficient() -> None:
    # 90 °C water in 20 °C air, 22 mm pipe, 3 mm of k = 0.035, h = 1 (below the 2..100 range):
    # R'_ins = ln(14/11)/0.2199115 = 1.096632; R'_s = 1/(2 pi 0.014 * 1) = 11.36821
    # Ts = 20 + 70 * 11.36821/12.46484 = 83.84 °C > 60 °C (ASTM C1055 style, from memory).
    result = pipe_heat_loss(_run(22, [(3, 0.035)], 90, 20, h=1.0))
    assert result.surface_temperature_c == pytest.approx(83.8415, abs=1e-3)
    assert [c.kind for c in result.cautions] == [
        CautionKind.HOT_SURFACE,
        CautionKind.THIN_LAYER,
        CautionKind.UNUSUAL_COEFFICIENT,
        CautionKind.RAISES_HEAT_FLOW,
    ]
    text = " ".join(run_warnings(result))
    assert "burn" in text
    assert "thinner than practical" in text
    assert "outside the usual range" in text


def test_surface_temperature_balance_with_computed_coefficient() -> None:
    # Converged solution satisfies the outer-face balance: (Tf - Ts)/R'_ins = pi D_o h (Ts - Ta).
    result = pipe_heat_loss(_run(48, [(25, 0.04)], 70, 10))
    conducted = (70 - result.surface_temperature_c) / result.r_insulation_per_length_mk_w
    shed = (
        math.pi
        * result.outer_diameter_m
        * result.surface_coefficient_w_m2k
        * (result.surface_temperature_c - 10)
    )
    assert conducted == pytest.approx(shed, rel=1e-8)
    assert conducted == pytest.approx(result.heat_loss_per_length_w_m, rel=1e-8)
    assert 0 < result.iterations <= 200


def test_target_thickness_matches_the_formula() -> None:
    # 22 mm pipe, k = 0.035, h = 9, 55/15 °C, target 5 W/m: the found thickness t must give
    # q'(t) = 5 W/m by the closed-form q' = dT/(ln(r1/r0)/(2 pi k) + 1/(2 pi r1 h)), and 99 % of
    # it must not meet the target (smallest thickness).
    found = thickness_for_target(_run(22, [], 55, 15, h=9.0), 0.035, 5.0)
    assert _loss_formula(0.011, found.thickness_m, 0.035, 9.0, 40) == pytest.approx(5.0, rel=1e-5)
    assert _loss_formula(0.011, 0.99 * found.thickness_m, 0.035, 9.0, 40) > 5.0
    # and 19 mm (the hand case above) gives 7.76 W/m > 5, so more than 19 mm is needed.
    assert found.thickness_m > 0.019


def test_target_thickness_past_the_critical_radius() -> None:
    # 22 mm pipe, k = 0.15, h = 9 (r_cr = k/h = 16.7 mm > r0 = 11 mm), 55/15 °C: bare loss
    # 40 * 2 pi 0.011 * 9 = 24.88 W/m; thin layers raise it, so a 20 W/m target lies beyond the
    # peak: by the formula t = 40 mm gives 20.26 W/m and t = 42 mm gives 19.98 W/m.
    found = thickness_for_target(_run(22, [], 55, 15, h=9.0), 0.15, 20.0)
    assert 0.040 < found.thickness_m < 0.042
    assert _loss_formula(0.011, found.thickness_m, 0.15, 9.0, 40) == pytest.approx(20.0, rel=1e-5)
    # 6 mm pipe, k = 0.2, h = 9: even 500 mm only gets down to 60/(ln(503/3)/1.2566 + 0.0352)
    # = 14.6 W/m, above its bare loss of 10.18 W/m: any target below the bare loss is out of reach.
    with pytest.raises(PipeInputError) as caught:
        thickness_for_target(_run(6, [], 80, 20, h=9.0), 0.2, 5.0)
    assert caught.value.problem is Problem.TARGET_UNREACHABLE
    assert caught.value.figures[1] == pytest.approx(14.6, abs=0.05)
    assert error_words(caught.value).startswith("cannot be met: even 500 mm (19.7 in)")


def test_target_already_met_and_unreachable() -> None:
    # Bare 22 mm pipe at h = 9 loses 24.88 W/m (hand case above): a 30 W/m target needs nothing.
    assert thickness_for_target(_run(22, [], 55, 15, h=9.0), 0.035, 30.0).thickness_m == 0.0
    # 500 mm of k = 0.035: R' = ln(511/11)/0.2199115 + 1/(2 pi 0.511 * 9) = 17.4545 + 0.0346
    # -> q' = 2.29 W/m, so 0.01 W/m cannot be reached.
    with pytest.raises(PipeInputError) as caught:
        thickness_for_target(_run(22, [], 55, 15, h=9.0), 0.035, 0.01)
    assert caught.value.parameter == "target_heat_loss_per_length_w_m"
    assert "cannot be met" in error_words(caught.value)
    # 1 Btu/(h·ft) = 0.29307107 W / 0.3048 m = 0.961519 W/m;
    # 40 / 17.4891 = 2.2871 W/m = 2.379 Btu/(h·ft)
    assert "2.29 W/m (2.38 Btu/(h·ft))" in error_words(caught.value)


def test_target_thickness_with_computed_coefficient() -> None:
    found = thickness_for_target(_run(22, [], 55, 15), 0.035, 5.0)
    check = pipe_heat_loss(_run(22, [(found.thickness_m * 1e3, 0.035)], 55, 15))
    assert check.heat_loss_per_length_w_m == pytest.approx(5.0, rel=1e-4)


def test_annual_heat_loss_hand_worked() -> None:
    # 77.64333 W for 5000 h = 388216.7 Wh = 388.2167 kWh = 1.397580e9 J.
    energy = annual_heat_loss(77.64333, 5000)
    assert energy.energy_kwh == pytest.approx(388.2167, rel=1e-6)
    assert energy.energy_j == pytest.approx(1.397580e9, rel=1e-6)
    with pytest.raises(PipeInputError):
        annual_heat_loss(77.0, 9000)


@pytest.mark.parametrize(
    ("build", "parameter"),
    [
        (lambda: PipeLayer(-0.01, 0.035), "thickness_m"),
        (lambda: PipeLayer(0.01, 0.0), "conductivity_w_mk"),
        (lambda: PipeLayer(0.01, math.inf), "conductivity_w_mk"),
        (lambda: PipeRun(0.0, (), 55, 15), "pipe_outer_diameter_m"),
        (lambda: PipeRun(0.022, (), math.nan, 15), "fluid_temperature_c"),
        (lambda: PipeRun(0.022, (), 55, -300), "ambient_temperature_c"),
        (lambda: PipeRun(0.022, (), 55, 15, emissivity=1.5), "emissivity"),
        (
            lambda: PipeRun(0.022, (), 55, 15, surface_coefficient_w_m2k=0.0),
            "surface_coefficient_w_m2k",
        ),
        (lambda: PipeRun(0.022, (), 55, 15, length_m=-1.0), "length_m"),
        (lambda: pipe_heat_loss(PipeRun(0.022, (), 700, 15)), "fluid_temperature_c"),
    ],
)
def test_physics_rejects_bad_input(build, parameter: str) -> None:
    with pytest.raises(ValueError) as caught:
        build()
    assert caught.value.parameter == parameter


@pytest.mark.parametrize(
    ("build", "words"),
    [
        # 8784 h = 366 days x 24 h
        (lambda: annual_heat_loss(77.0, 9000), "must be at most 8784 hours"),
        (lambda: annual_heat_loss(math.nan, 10), "the heat loss must be a finite number"),
        (lambda: PipeLayer(math.nan, 0.04), "must be a finite number (not NaN or infinity)"),
        (lambda: PipeLayer(-1.0, 0.04), "must be greater than zero"),
        # 1e-5 m = 0.01 mm = 0.01 / 25.4 in = 0.000394 in
        (lambda: PipeLayer(1e-6, 0.04), "must be at least 0.01 mm (0.000394 in)"),
        # 1000 °C = 1000 x 9/5 + 32 = 1832 °F
        (
            lambda: PipeRun(0.022, (), -300, 15),
            "must be above absolute zero (-273.15 °C, -459.67 °F) and at most 1000 °C (1832 °F)",
        ),
        (
            lambda: PipeRun(0.022, (), 55, 15, emissivity=2.0),
            "must be greater than 0 and at most 1",
        ),
        # 1e6 m / 0.3048 m/ft = 3.28084e6 ft
        (
            lambda: PipeRun(0.022, (), 55, 15, length_m=2e6),
            "must be at most 1e+06 m (3.28084e+06 ft)",
        ),
    ],
)
def test_input_errors_are_worded_in_both_unit_systems(build, words: str) -> None:
    with pytest.raises(PipeInputError) as caught:
        build()
    assert error_words(caught.value) == words


def test_rayleigh_caution_words() -> None:
    # The Churchill–Chu correlation is fitted up to Ra = 1e12 (Bergman et al. eq. 9.34).
    result = pipe_heat_loss(_run(22, [(19, 0.035)], 55, 15, h=9.0))
    words = caution_words(PipeCaution(CautionKind.HIGH_RAYLEIGH, 3.4e12), result)
    assert words.startswith("The Rayleigh number 3.4e+12 is above 1e12")


@QUICK
@given(
    diameter_mm=st.floats(10, 300),
    k=st.floats(0.02, 0.08),
    h=st.floats(3, 30),
    thin=st.floats(1, 100),
    extra=st.floats(0.1, 100),
)
def test_thicker_never_raises_loss_beyond_critical_radius(
    diameter_mm: float, k: float, h: float, thin: float, extra: float
) -> None:
    # Invariant (fixed h): once the outer radius is at or past k/h, more insulation never
    # raises the loss (dR'/dr = 1/(2 pi r) (1/k - 1/(r h)) >= 0 there).
    assume(diameter_mm / 2e3 + thin / 1e3 >= k / h)
    q_thin = pipe_heat_loss(_run(diameter_mm, [(thin, k)], 60, 20, h=h)).heat_loss_per_length_w_m
    q_thick = pipe_heat_loss(_run(diameter_mm, [(thin + extra, k)], 60, 20, h=h))
    assert q_thick.heat_loss_per_length_w_m <= q_thin * (1 + 1e-12)


@FEW
@given(
    diameter_mm=st.floats(20, 200),
    k=st.floats(0.02, 0.045),
    thin=st.floats(5, 80),
    extra=st.floats(1, 80),
    fluid_c=st.floats(25, 150),
)
def test_thicker_never_raises_loss_computed_coefficient(
    diameter_mm: float, k: float, thin: float, extra: float, fluid_c: float
) -> None:
    # Same invariant with h from convection + radiation (r >= 10 mm > k/h ~ 0.045/7 = 6.4 mm).
    q_thin = pipe_heat_loss(_run(diameter_mm, [(thin, k)], fluid_c, 20)).heat_loss_per_length_w_m
    q_thick = pipe_heat_loss(_run(diameter_mm, [(thin + extra, k)], fluid_c, 20))
    assert q_thick.heat_loss_per_length_w_m <= q_thin * (1 + 1e-9)
    assert 20 <= q_thick.surface_temperature_c <= fluid_c


@QUICK
@given(
    diameter_mm=st.floats(5, 300),
    thickness_mm=st.floats(1, 100),
    k=st.floats(0.01, 1.0),
    ratio=st.floats(1.01, 10),
    h=st.floats(2, 50),
)
def test_better_insulation_never_raises_loss(
    diameter_mm: float, thickness_mm: float, k: float, ratio: float, h: float
) -> None:
    # Invariant: at the same thickness, a lower conductivity never raises the loss.
    worse = pipe_heat_loss(_run(diameter_mm, [(thickness_mm, k * ratio)], 60, 20, h=h))
    better = pipe_heat_loss(_run(diameter_mm, [(thickness_mm, k)], 60, 20, h=h))
    assert better.heat_loss_per_length_w_m < worse.heat_loss_per_length_w_m


# --- service: ip/si round trip, checked with pint (outside source for every conversion) ------
UREG = pint.UnitRegistry()
Q_ = UREG.Quantity


def _to(value: float, source: str, target: str) -> float:
    return float(Q_(value, source).to(target).magnitude)


@pytest.mark.parametrize("coefficient", [9.0, None])
def test_ip_and_si_requests_agree(coefficient: float | None) -> None:
    si = {
        "units": "si",
        "pipe_outer_diameter": 22.0,
        "fluid_temperature": 55.0,
        "ambient_temperature": 15.0,
        "length": 10.0,
        "hours_per_year": 5000,
        "layers": [{"thickness": 19.0, "conductivity": 0.035}],
        "target_heat_loss_per_length": 5.0,
    }
    h_ip = "Btu_it/(hr*ft**2*delta_degF)"
    ip = {
        "units": "ip",
        "pipe_outer_diameter": _to(22.0, "mm", "inch"),
        "fluid_temperature": _to(55.0, "degC", "degF"),
        "ambient_temperature": _to(15.0, "degC", "degF"),
        "length": _to(10.0, "m", "ft"),
        "hours_per_year": 5000,
        "layers": [
            {
                "thickness": _to(19.0, "mm", "inch"),
                "conductivity": _to(0.035, "W/(m*K)", "Btu_it*inch/(hr*ft**2*delta_degF)"),
            }
        ],
        "target_heat_loss_per_length": _to(5.0, "W/m", "Btu_it/(hr*ft)"),
    }
    if coefficient is not None:
        si["surface_coefficient"] = coefficient
        ip["surface_coefficient"] = _to(coefficient, "W/(m**2*K)", h_ip)
    a = compute_pipe(PipeRequest.model_validate(si))
    b = compute_pipe(PipeRequest.model_validate(ip))
    rel = 1e-6  # pint's Btu_it vs exact factors; solver tolerances are far smaller
    assert b.r_per_length == pytest.approx(
        _to(a.r_per_length, "m*K/W", "hr*ft*delta_degF/Btu_it"), rel=rel
    )
    assert b.heat_loss_per_length == pytest.approx(
        _to(a.heat_loss_per_length, "W/m", "Btu_it/(hr*ft)"), rel=rel
    )
    assert b.heat_loss == pytest.approx(_to(a.heat_loss, "W", "Btu_it/hr"), rel=rel)
    assert b.surface_temperature == pytest.approx(
        _to(a.surface_temperature, "degC", "degF"), rel=rel
    )
    assert b.surface_coefficient == pytest.approx(
        _to(a.surface_coefficient, "W/(m**2*K)", h_ip), rel=rel
    )
    assert b.r_equivalent_flat == pytest.approx(
        _to(a.r_equivalent_flat, "m**2*K/W", "hr*ft**2*delta_degF/Btu_it"), rel=rel
    )
    assert b.outer_diameter == pytest.approx(_to(a.outer_diameter, "mm", "inch"), rel=rel)
    assert b.annual_loss_kwh == pytest.approx(a.annual_loss_kwh, rel=rel)
    assert b.annual_loss == pytest.approx(_to(a.annual_loss, "kWh", "Btu_it"), rel=rel)
    assert (a.annual_loss_unit, b.annual_loss_unit) == ("kWh", "Btu")
    assert b.thickness_for_target == pytest.approx(
        _to(a.thickness_for_target, "mm", "inch"), rel=1e-5
    )
    # and the si hand case itself (test_hand_worked_22_mm_pipe_19_mm_insulation)
    if coefficient is not None:
        assert a.heat_loss_per_length == pytest.approx(7.764333, rel=1e-6)
        assert a.annual_loss_kwh == pytest.approx(388.2167, rel=1e-6)  # 77.64333 W * 5000 h


def test_service_names_the_field_of_a_physics_error() -> None:
    request = PipeRequest.model_validate(
        {
            "units": "ip",
            "pipe_outer_diameter": 0.875,
            "fluid_temperature": 140,
            "ambient_temperature": 60,
            "layers": [
                {"thickness": 0.75, "conductivity": 0.25},
                {"thickness": 200.0, "conductivity": 0.25},
            ],
        }
    )
    with pytest.raises(InputError) as caught:
        compute_pipe(request)
    assert caught.value.field == "layers[1].thickness"  # 200 in = 5.08 m > the 2 m bound
