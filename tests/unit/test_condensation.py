"""Glaser condensation check (ISO 13788:2012, clause 7): hand-worked cases, limits, invariants.

Saturation pressures in the hand arithmetic are psychrolib's (ASHRAE Handbook—Fundamentals
2017, ch. 1), called directly in the tests as the outside source. delta_0 = 2e-10 kg/(m·s·Pa)
(ISO 13788). Layer data (from memory unless said):

* vented vinyl lap siding: R 0.10 m²·K/W, sd 0.01 m (vented cladding barely resists vapour;
  common practice), 10 mm;
* OSB sheathing 11 mm (7/16 in): R 0.011 / 0.13 ≈ 0.085, rounded to 0.10 m²·K/W
  (k 0.13 W/(m·K), ISO 10456); mu 150, so sd = 150 × 0.011 = 1.65 m. Published mu for OSB
  spans about 30-50 (ISO 10456, wet/dry cup) to a few hundred (dry-cup permeance near 1 perm),
  so the no-retarder case is also checked at mu 50;
* glass-fibre cavity 140 mm (a 2x6 stud is 5.5 in deep): k 0.040 W/(m·K) (common practice),
  R = 0.14 / 0.040 = 3.5 m²·K/W, mu 1, sd 0.14 m;
* gypsum board 12.5 mm: k 0.25 W/(m·K), R 0.05 m²·K/W, mu 10 (ISO 10456), sd 0.125 m;
* 0.15 mm polyethylene sheet: sd 50 m (about 0.07 perm), R 0.
Surface resistances: ISO 6946 horizontal, R_se 0.04, R_si 0.13 m²·K/W.
"""

from __future__ import annotations

import dataclasses
import math
import xml.etree.ElementTree as ET

import pint
import psychrolib
import pytest
from hypothesis import assume, given, settings
from hypothesis import strategies as st

from server.physics.condensation import (
    DELTA_0_KG_M_S_PA,
    VapourLayer,
    glaser_check,
    permeance_from_sd,
    sd_from_mu,
    sd_from_permeance,
    sd_from_us_perms,
)
from server.physics.units import (
    US_PERM_NG_PER_PA_S_M2,
    permeance_to_us_perms,
    us_perms_to_permeance,
)
from server.services.condensation_words import SCREENING_NOTE, summary_words
from server.web.svg_condensation import condensation_svg

psychrolib.SetUnitSystem(psychrolib.SI)
PSAT = psychrolib.GetSatVapPres  # outside source for every saturation pressure below

SIDING = VapourLayer("vinyl siding", 0.10, 0.01, 0.010)
OSB = VapourLayer("OSB sheathing", 0.10, 1.65, 0.011)
CAVITY = VapourLayer("fibreglass cavity", 3.5, 0.14, 0.140)
POLY = VapourLayer("polyethylene sheet", 0.0, 50.0, 0.00015)
GYPSUM = VapourLayer("gypsum board", 0.05, 0.125, 0.0125)
WINTER = {"indoor_temp_c": 21.0, "indoor_rh": 0.40, "outdoor_temp_c": -10.0, "outdoor_rh": 0.80}


def _plane(result, label_start):
    return next(p for p in result.planes if p.label.startswith(label_start))


# --- hand-worked cases -------------------------------------------------------------------------
def test_2x6_wall_without_vapour_retarder_condenses_at_the_sheathing():
    result = glaser_check([SIDING, OSB, CAVITY, GYPSUM], **WINTER)
    # Positions: 10 + 11 mm to the inside face of the OSB; 173.5 mm in all.
    assert result.planes[-1].position_m == pytest.approx(0.1735, abs=1e-12)
    # R_T = 0.04 + 0.10 + 0.10 + 3.5 + 0.05 + 0.13 = 3.92 m²·K/W; dT = 31 K.
    # Inside face of the OSB: R' = 0.04 + 0.10 + 0.10 = 0.24 -> -10 + 31 × 0.24 / 3.92 = -8.1020 °C
    sheathing = _plane(result, "inside face of the OSB sheathing")
    assert sheathing.temperature_c == pytest.approx(-8.1020, abs=1e-4)
    # Inside surface: 21 - 31 × 0.13 / 3.92 = 19.9719 °C; outside surface: -10 + 31 × 0.04 / 3.92
    assert result.planes[-1].temperature_c == pytest.approx(19.9719, abs=1e-4)
    assert result.planes[0].temperature_c == pytest.approx(-9.6837, abs=1e-4)
    # p_i = 0.40 × 2487.67 = 995.07 Pa; p_e = 0.80 × 259.90 = 207.92 Pa (psychrolib).
    p_i, p_e = 0.40 * PSAT(21.0), 0.80 * PSAT(-10.0)
    assert p_i == pytest.approx(995.07, abs=0.01) and p_e == pytest.approx(207.92, abs=0.01)
    # s_T = 0.01 + 1.65 + 0.14 + 0.125 = 1.925 m; at the plane s' = 1.66 m.
    # Straight line: 207.92 + 787.15 × 1.66 / 1.925 = 886.71 Pa > p_sat(-8.102 °C) = 307.23 Pa.
    assert sheathing.straight_line_vapour_pressure_pa == pytest.approx(886.71, abs=0.02)
    p_c = PSAT(-10.0 + 31.0 * 0.24 / 3.92)
    assert p_c == pytest.approx(307.23, abs=0.01)
    assert sheathing.flagged and sheathing.saturation_pressure_pa == pytest.approx(p_c, rel=1e-12)
    # One condensation plane, here. g_c = delta_0 [(p_i - p_c)/(s_T - s_c) - (p_c - p_e)/s_c]
    # = 2e-10 × [687.84 / 0.265 - 99.31 / 1.66] = 2e-10 × (2595.6 - 59.8) = 5.07e-7 kg/(m²·s)
    # (= 43.8 g per m² per day).
    assert [c.plane_index for c in result.condensation_planes] == [sheathing.index]
    hand = 2e-10 * ((p_i - p_c) / (1.925 - 1.66) - (p_c - p_e) / 1.66)
    assert result.condensation_planes[0].rate_kg_m2_s == pytest.approx(hand, rel=1e-9)
    assert hand == pytest.approx(5.0716e-7, rel=1e-4)
    # After the construction the vapour pressure touches saturation at the plane.
    assert sheathing.vapour_pressure_pa == pytest.approx(p_c, rel=1e-12)
    # The plane between siding and OSB stays dry: 207.92 + 787.15 × 0.01 / 1.925 = 212.0 Pa
    # against p_sat(-10 + 31 × 0.14 / 3.92 = -8.893 °C) = 286.6 Pa.
    outer = _plane(result, "inside face of the vinyl siding")
    assert outer.straight_line_vapour_pressure_pa == pytest.approx(212.01, abs=0.02)
    assert not outer.flagged and not result.inside_surface_condensation


def test_2x6_wall_with_polyethylene_has_no_condensation():
    result = glaser_check([SIDING, OSB, CAVITY, POLY, GYPSUM], **WINTER)
    # s_T = 1.925 + 50 = 51.925 m; at the OSB: 207.92 + 787.15 × 1.66 / 51.925 = 233.08 Pa,
    # below p_sat(-8.102 °C) = 307.23 Pa.
    sheathing = _plane(result, "inside face of the OSB sheathing")
    assert sheathing.straight_line_vapour_pressure_pa == pytest.approx(233.08, abs=0.02)
    assert not result.flagged and not result.condensation_planes
    assert all(p.margin_k is not None and p.margin_k > 0 for p in result.planes)
    # Temperatures are the same as without the sheet (it has no thermal resistance).
    bare = glaser_check([SIDING, OSB, CAVITY, GYPSUM], **WINTER)
    assert sheathing.temperature_c == pytest.approx(
        _plane(bare, "inside face of the OSB sheathing").temperature_c, abs=1e-12
    )


def test_no_retarder_still_condenses_with_low_osb_mu():
    # mu 50 (ISO 10456 dry cup, from memory): sd 0.55 m, s_T = 0.825 m; at the plane s' = 0.56:
    # 207.92 + 787.15 × 0.56 / 0.825 = 742.2 Pa > 307.23 Pa.
    osb = dataclasses.replace(OSB, sd_m=sd_from_mu(50.0, 0.011))
    result = glaser_check([SIDING, osb, CAVITY, GYPSUM], **WINTER)
    sheathing = _plane(result, "inside face of the OSB sheathing")
    assert sheathing.straight_line_vapour_pressure_pa == pytest.approx(742.22, abs=0.05)
    assert [c.plane_index for c in result.condensation_planes] == [sheathing.index]


def test_summary_words_for_the_wet_wall():
    words = summary_words(glaser_check([SIDING, OSB, CAVITY, GYPSUM], **WINTER))
    # Dew point of the straight-line 886.71 Pa: 5.2 °C (psychrolib GetTDewPointFromVapPres).
    assert psychrolib.GetTDewPointFromVapPres(21.0, 886.71) == pytest.approx(5.2, abs=0.05)
    assert words[0].startswith("Condition checked: indoors 21.0 °C at 40% relative humidity")
    assert "(dew point 6.9 °C)" in words[0]  # psychrolib: 6.8995 °C
    assert words[1].startswith(
        "At the inside face of the OSB sheathing (against the fibreglass cavity) the "
        "temperature is -8.1 °C; water vapour from the room would condense there "
        "(dew point 5.2 °C) because nothing on the room side of it slows vapour down enough"
    )
    # 5.0716e-7 kg/(m²·s) × 86,400 s × 1000 g/kg = 43.8 g per m² per day.
    assert "about 43.8 g of water per square metre per day" in words[1]
    assert words[-1] == SCREENING_NOTE


def test_summary_words_dry_wall_and_ip_units():
    words = summary_words(glaser_check([SIDING, OSB, CAVITY, POLY, GYPSUM], **WINTER), units="ip")
    # 21 °C = 69.8 °F; -10 °C = 14.0 °F.
    assert "indoors 69.8 °F" in words[0] and "outdoors 14.0 °F" in words[0]
    assert any(w.startswith("No plane reaches the dew point") for w in words)
    assert "screening check" in words[-1] and "air leaking" in words[-1]


# --- unit converters ---------------------------------------------------------------------------
def test_us_perm_against_pint():
    # pint: 1 grain/(h·ft²·inHg) = 57.2135 ng/(s·m²·Pa); ASHRAE ch. 26 rounds it to 57.2.
    ureg = pint.UnitRegistry()
    one_perm = ureg.Quantity(1, "grain/(hour*foot**2*inHg)").to("ng/(s*m**2*Pa)").magnitude
    assert US_PERM_NG_PER_PA_S_M2 == pytest.approx(one_perm, rel=1e-6)
    assert us_perms_to_permeance(2.0) == pytest.approx(2 * 57.2135, rel=1e-6)
    assert permeance_to_us_perms(one_perm) == pytest.approx(1.0, rel=1e-6)


def test_sd_from_permeance_and_perms():
    # sd = delta_0 / W: 2e-10 kg/(m·s·Pa) = 200 ng/(m·s·Pa), so W = 200 ng/(Pa·s·m²) -> 1 m.
    assert DELTA_0_KG_M_S_PA == 2.0e-10
    assert sd_from_permeance(200.0) == pytest.approx(1.0, rel=1e-12)
    # and back: W = 200 / sd, so sd = 3.4957 m (1 perm) -> 57.2135 ng/(Pa·s·m²)
    assert permeance_from_sd(1.0) == pytest.approx(200.0, rel=1e-12)
    assert permeance_from_sd(200 / 57.2135) == pytest.approx(57.2135, rel=1e-12)
    # 1 perm: 200 / 57.2135 = 3.4957 m; 0.06 perm (polyethylene, from memory): 58.26 m.
    assert sd_from_us_perms(1.0) == pytest.approx(3.4957, abs=1e-4)
    assert sd_from_us_perms(0.06) == pytest.approx(58.26, abs=0.01)
    # sd = mu × d: 150 × 0.011 m = 1.65 m.
    assert sd_from_mu(150.0, 0.011) == pytest.approx(1.65, rel=1e-12)
    for bad in (
        lambda: sd_from_mu(0.5, 0.1),
        lambda: sd_from_permeance(0.0),
        lambda: permeance_from_sd(0.0),
    ):
        with pytest.raises(ValueError):
            bad()


# --- limiting cases ----------------------------------------------------------------------------
def test_no_vapour_resistance_anywhere_uses_still_air_and_flags_only_at_the_dew_point():
    # Limit: every layer given sd = 0. Each layer is then taken as still air of its own
    # thickness (mu = 1), so one 100 mm mineral-wool layer (R 2.5, surfaces 0) has both
    # temperature and vapour pressure linear in depth: 10 sub-layers of R 0.25, plane j at
    # theta_j = -10 + 3.1 j °C and p_j = p_e + (p_i - p_e) j / 10.
    wool = VapourLayer("mineral wool", 2.5, 0.0, 0.100)
    for indoor_rh in (0.40, 0.80):
        result = glaser_check(
            [wool],
            indoor_temp_c=21.0,
            indoor_rh=indoor_rh,
            outdoor_temp_c=-10.0,
            outdoor_rh=0.80,
            inside_surface_resistance_m2k_w=0.0,
            outside_surface_resistance_m2k_w=0.0,
        )
        assert result.effective_sd_m == (0.100,)
        assert result.still_air_floored_layers == (0,)
        assert any("still air" in note for note in summary_words(result))
        p_i, p_e = indoor_rh * PSAT(21.0), 0.80 * PSAT(-10.0)
        for j, plane in enumerate(result.planes):
            theta, p_line = -10.0 + 3.1 * j, p_e + (p_i - p_e) * j / 10
            assert plane.temperature_c == pytest.approx(theta, abs=1e-9)
            assert plane.straight_line_vapour_pressure_pa == pytest.approx(p_line, rel=1e-9)
            # Flag exactly where the dew point of the vapour reaches the temperature.
            reached = psychrolib.GetTDewPointFromVapPres(21.0, p_line) > theta
            assert plane.flagged == reached
        flagged = [p.index for p in result.flagged]
        # 40 %: p_1 = 207.92 + 78.72 = 286.6 Pa < p_sat(-6.9 °C) = 341.1 Pa, nothing flagged.
        # 80 %: p_i = 1990.1 Pa, p_1 = 207.92 + 178.2 = 386.1 Pa > 341.1 Pa, flagged.
        assert (flagged == []) if indoor_rh == 0.40 else (1 in flagged)
        assert PSAT(-6.9) == pytest.approx(341.14, abs=0.01)


def test_no_vapour_resistance_and_no_thickness_is_refused():
    # Limit: sd = 0 and no thickness anywhere: the vapour profile is 0/0, so say so.
    with pytest.raises(ValueError, match="undefined"):
        glaser_check([VapourLayer("film", 0.5, 0.0)], **WINTER)


def test_indoor_rh_zero_never_condenses_in_winter():
    # Limit: perfectly dry room air. p falls inward from p_e <= p_sat(theta_e) while p_sat
    # rises inward (it is warmer), so no plane can reach saturation.
    result = glaser_check([SIDING, OSB, CAVITY, GYPSUM], **{**WINTER, "indoor_rh": 0.0})
    assert not result.flagged and not result.condensation_planes
    assert any(w.startswith("No plane reaches the dew point") for w in summary_words(result))


def test_both_sides_dry_says_so():
    # Limit: no water vapour anywhere: no dew points at all.
    result = glaser_check([CAVITY], **{**WINTER, "indoor_rh": 0.0, "outdoor_rh": 0.0})
    assert all(p.dew_point_c is None for p in result.planes)
    assert "perfectly dry on both sides" in " ".join(summary_words(result))


def test_outdoors_warmer_than_indoors_drives_vapour_inward_onto_the_polyethylene():
    # Limit: summer, air-conditioned room, 32 °C / 70 % outside, 24 °C / 50 % inside.
    # Back of the sheet: R' = 0.04 + 0.10 + 0.10 + 3.5 = 3.74 -> 32 - 8 × 3.74 / 3.92 = 24.367 °C,
    # p_sat = 3051.6 Pa. p_e = 0.70 × 4758.5 = 3331.0 Pa, p_i = 0.50 × 2985.1 = 1492.6 Pa;
    # straight line at s' = 1.80 m of 51.925: 3331.0 - 1838.4 × 1.80 / 51.925 = 3267.2 Pa.
    summer = {"indoor_temp_c": 24.0, "indoor_rh": 0.5, "outdoor_temp_c": 32.0, "outdoor_rh": 0.7}
    result = glaser_check([SIDING, OSB, CAVITY, POLY, GYPSUM], **summer)
    back = _plane(result, "inside face of the fibreglass cavity")
    assert back.temperature_c == pytest.approx(24.3673, abs=1e-4)
    assert back.saturation_pressure_pa == pytest.approx(PSAT(32.0 - 8.0 * 3.74 / 3.92), rel=1e-12)
    assert back.straight_line_vapour_pressure_pa == pytest.approx(3267.2, abs=0.1)
    assert [c.plane_index for c in result.condensation_planes] == [back.index]
    assert "water vapour from outdoors would condense" in summary_words(result)[1]
    # Temperatures now fall from outside to inside.
    temps = [p.temperature_c for p in result.planes]
    assert temps == sorted(temps, reverse=True)
    # Without the sheet the same summer condition leaves the wall dry.
    assert not glaser_check([SIDING, OSB, CAVITY, GYPSUM], **summer).flagged


def test_all_resistance_in_the_inside_film():
    # Limit: R_se = 0 and layers of R 0: the whole wall sits at the outdoor -10 °C, so
    # p_sat = 259.90 Pa at every plane. Two layers of sd 1 m: planes at s' = 0, 1, 2 m with the
    # straight line at 207.92, 601.50, 995.07 Pa: the middle plane and the room-side face are
    # flagged (the latter is surface condensation). One condensation plane at s' = 1:
    # g_c = 2e-10 × [(995.07 - 259.90) / 1 - (259.90 - 207.92) / 1] = 1.3664e-7 kg/(m²·s).
    layers = [VapourLayer("board A", 0.0, 1.0), VapourLayer("board B", 0.0, 1.0)]
    result = glaser_check(
        layers, **WINTER, inside_surface_resistance_m2k_w=0.5, outside_surface_resistance_m2k_w=0.0
    )
    assert [p.temperature_c for p in result.planes] == pytest.approx([-10.0] * 3, abs=1e-12)
    assert all(p.position_m is None for p in result.planes)  # no thicknesses given
    assert [p.flagged for p in result.planes] == [False, True, True]
    assert result.inside_surface_condensation
    p_i, p_e, p_c = 0.4 * PSAT(21.0), 0.8 * PSAT(-10.0), PSAT(-10.0)
    (plane,) = result.condensation_planes
    assert plane.plane_index == 1
    assert plane.rate_kg_m2_s == pytest.approx(2e-10 * ((p_i - p_c) - (p_c - p_e)), rel=1e-9)
    assert plane.rate_kg_m2_s == pytest.approx(1.3664e-7, rel=1e-3)
    assert any("surface condensation" in w for w in summary_words(result))


def test_two_condensation_planes_are_said_plainly():
    # Contrived: planes at s' = 0, 1, 2, 3 m. Planes 0 and 1 sit at -10 °C (no resistance
    # outside them), planes 2 and 3 at -10 + 31 × 0.16 / 1.0 = -5.04 °C (R 0.16 of R_T 1.0).
    # Saturation 259.90 and 400.39 Pa: slopes 259.90 - 207.92 = 51.98, 400.39 - 259.90 = 140.49
    # and 995.07 - 400.39 = 594.68 Pa/m rise, so the line touches both inner planes:
    # g_1 = delta_0 (140.49 - 51.98), g_2 = delta_0 (594.68 - 140.49).
    layers = [
        VapourLayer("board A", 0.0, 1.0),
        VapourLayer("board B", 0.16, 1.0),
        VapourLayer("board C", 0.0, 1.0),
    ]
    result = glaser_check(
        layers, **WINTER, inside_surface_resistance_m2k_w=0.84, outside_surface_resistance_m2k_w=0.0
    )
    p_i, p_e = 0.4 * PSAT(21.0), 0.8 * PSAT(-10.0)
    p1, p2 = PSAT(-10.0), PSAT(-10.0 + 31.0 * 0.16)
    assert p2 == pytest.approx(400.39, abs=0.01)
    assert [c.plane_index for c in result.condensation_planes] == [1, 2]
    g1, g2 = 2e-10 * ((p2 - p1) - (p1 - p_e)), 2e-10 * ((p_i - p2) - (p2 - p1))
    rates = [c.rate_kg_m2_s for c in result.condensation_planes]
    assert rates == pytest.approx([g1, g2], rel=1e-9)
    assert result.total_rate_kg_m2_s == pytest.approx(g1 + g2, rel=1e-9)
    assert any("2 planes at once" in w for w in summary_words(result))


@pytest.mark.parametrize(
    ("layers", "extra", "message"),
    [
        ([], {}, "at least one layer"),
        ([VapourLayer("x", -0.1, 1.0)], {}, "thermal resistance"),
        ([VapourLayer("x", 1.0, math.nan)], {}, "sd"),
        ([VapourLayer("x", 1.0, 1.0, 0.0)], {}, "thickness"),
        ([VapourLayer("x", 1.0, 1.0)], {"indoor_rh": 1.5}, "indoor air"),
        ([VapourLayer("x", 1.0, 1.0)], {"outdoor_temp_c": math.inf}, "outdoor air"),
        (
            [VapourLayer("x", 0.0, 1.0)],
            {"inside_surface_resistance_m2k_w": 0.0, "outside_surface_resistance_m2k_w": 0.0},
            "no thermal",
        ),
    ],
)
def test_bad_input_is_a_plain_value_error(layers, extra, message):
    with pytest.raises(ValueError, match=message):
        glaser_check(layers, **{**WINTER, **extra})


# --- invariants ----------------------------------------------------------------------------------
layer_strategy = st.builds(
    VapourLayer,
    name=st.sampled_from(["a", "b", "c"]),
    thermal_resistance_m2k_w=st.floats(min_value=0.0, max_value=3.0),
    sd_m=st.floats(min_value=0.0, max_value=20.0),
    thickness_m=st.one_of(st.none(), st.floats(min_value=0.001, max_value=0.3)),
)
stacks = st.lists(layer_strategy, min_size=1, max_size=5).filter(
    lambda ls: sum(max(x.sd_m, x.thickness_m or 0.0) for x in ls) > 1e-3
)
temps = st.floats(min_value=-30.0, max_value=40.0)
humidity = st.floats(min_value=0.0, max_value=1.0)


@settings(max_examples=200, deadline=None)
@given(stacks, temps, humidity, temps, humidity)
def test_temperatures_monotone_between_the_air_temperatures(layers, t_in, rh_in, t_out, rh_out):
    result = glaser_check(
        layers, indoor_temp_c=t_in, indoor_rh=rh_in, outdoor_temp_c=t_out, outdoor_rh=rh_out
    )
    values = [p.temperature_c for p in result.planes]
    low, high = min(t_in, t_out) - 1e-9, max(t_in, t_out) + 1e-9
    assert all(low <= v <= high for v in values)
    steps = [b - a for a, b in zip(values, values[1:], strict=False)]
    assert all(s >= -1e-9 for s in steps) or all(s <= 1e-9 for s in steps)
    # The construction never leaves vapour above saturation inside, nor above the straight line
    # (planes with no vapour resistance between them and an air keep that air's pressure).
    total = result.total_sd_m
    for p in result.planes[1:-1]:
        if 1e-9 * total < p.cumulative_sd_m < total * (1 - 1e-9):
            assert p.vapour_pressure_pa <= p.saturation_pressure_pa * (1 + 1e-9) + 1e-9
            assert p.vapour_pressure_pa <= p.straight_line_vapour_pressure_pa * (1 + 1e-9) + 1e-9
    # A condensation plane is always a flagged plane, and its rate is positive.
    flagged = {p.index for p in result.flagged}
    assert all(c.plane_index in flagged and c.rate_kg_m2_s > 0 for c in result.condensation_planes)


@settings(max_examples=200, deadline=None)
@given(stacks, st.lists(st.floats(min_value=0.0, max_value=50.0), min_size=5, max_size=5))
def test_interface_temperatures_do_not_depend_on_sd(layers, new_sds):
    changed = [dataclasses.replace(x, sd_m=s) for x, s in zip(layers, new_sds, strict=False)]
    assume(sum(max(x.sd_m, x.thickness_m or 0.0) for x in changed) > 1e-3)
    first, second = glaser_check(layers, **WINTER), glaser_check(changed, **WINTER)
    assert [p.temperature_c for p in first.planes] == [p.temperature_c for p in second.planes]


@settings(max_examples=200, deadline=None)
@given(
    stacks,
    st.floats(min_value=0.01, max_value=100.0),
    st.floats(min_value=15.0, max_value=25.0),
    st.floats(min_value=0.2, max_value=0.7),
    st.floats(min_value=-30.0, max_value=10.0),
    st.floats(min_value=0.3, max_value=1.0),
)
def test_more_vapour_resistance_on_the_warm_side_never_adds_a_flag(
    layers, added_sd, t_in, rh_in, t_out, rh_out
):
    # Winter (room warmer and more humid): adding sd to the innermost layer lowers the
    # straight line at every plane, so it can only remove flags.
    condition = {
        "indoor_temp_c": t_in,
        "indoor_rh": rh_in,
        "outdoor_temp_c": t_out,
        "outdoor_rh": rh_out,
    }
    before = glaser_check(layers, **condition)
    assume(before.indoor_vapour_pressure_pa >= before.outdoor_vapour_pressure_pa)
    inner = layers[-1]
    tighter = [*layers[:-1], dataclasses.replace(inner, sd_m=inner.sd_m + added_sd)]
    after = glaser_check(tighter, **condition)
    assert {p.index for p in after.flagged} <= {p.index for p in before.flagged}


# --- the inline SVG -------------------------------------------------------------------------------
def test_svg_is_accessible_escaped_and_deterministic():
    odd = VapourLayer('sheathing <b>"&" </b>', 0.10, 1.65, 0.011)
    result = glaser_check([SIDING, odd, CAVITY, GYPSUM], **WINTER)
    svg = condensation_svg(result, id_prefix="wall-1")
    assert svg == condensation_svg(result, id_prefix="wall-1")  # same input, same bytes
    root = ET.fromstring(svg)  # well-formed XML, so every bit of text was escaped
    ns = "{http://www.w3.org/2000/svg}"
    assert root.get("role") == "img" and root.get("aria-labelledby") == "wall-1-title wall-1-desc"
    assert root.find(f"{ns}title").text == "Temperature and dew point through the assembly"
    assert "would condense" in root.find(f"{ns}desc").text
    assert "<b>" not in svg and "script" not in svg.lower() and "@import" not in svg
    texts = [t.text or "" for t in root.iter(f"{ns}text")]
    # The condensation plane is named in words beside its numbered symbol, not by colour alone.
    assert any(
        t.startswith("◆1 water would condense at the inside face of the sheathing") for t in texts
    )
    assert any(t.startswith("× dew point above temperature") for t in texts)


def test_svg_dry_wall_in_ip_units_has_no_marks():
    result = glaser_check([SIDING, OSB, CAVITY, POLY, GYPSUM], **WINTER)
    root = ET.fromstring(condensation_svg(result, units="ip"))
    texts = [t.text or "" for t in root.iter("{http://www.w3.org/2000/svg}text")]
    assert "°F" in texts and not any(t.startswith(("◆", "×")) for t in texts)
    with pytest.raises(ValueError):
        condensation_svg(result, id_prefix='x" onload="')


@settings(max_examples=100, deadline=None)
@given(stacks, temps, humidity, temps, humidity, st.sampled_from(["si", "ip"]))
def test_svg_is_well_formed_for_any_assembly(layers, t_in, rh_in, t_out, rh_out, units):
    result = glaser_check(
        layers, indoor_temp_c=t_in, indoor_rh=rh_in, outdoor_temp_c=t_out, outdoor_rh=rh_out
    )
    root = ET.fromstring(condensation_svg(result, units=units))
    bands = [r for r in root.iter("{http://www.w3.org/2000/svg}rect") if r.find("*") is not None]
    assert len(bands) == len(layers)  # one shaded band per layer
    assert all(float(r.get("width")) >= 0.0 for r in bands)
