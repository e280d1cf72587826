"""Actual lumber sizes, batt compression and steel-stud effective R."""

from __future__ import annotations

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from server.physics.batts import batt_in_cavity
from server.physics.lumber import framing_fraction, lumber_size
from server.physics.steel_framing import steel_stud_effective_r
from server.physics.units import INCH_M, r_ip_to_si, r_si_to_ip

# --- lumber ------------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("label", "width_in", "depth_in"),
    # dressed sizes, common practice: 2x4 = 1-1/2 x 3-1/2 in, 2x6 = 1-1/2 x 5-1/2 in,
    # 2x8 = 1-1/2 x 7-1/4, 2x10 = 1-1/2 x 9-1/4, 2x12 = 1-1/2 x 11-1/4
    [
        ("2x4", 1.5, 3.5),
        ("2x6", 1.5, 5.5),
        ("2x8", 1.5, 7.25),
        ("2x10", 1.5, 9.25),
        ("2x12", 1.5, 11.25),
        ("2X6", 1.5, 5.5),  # capital X
        ("2\u00d78", 1.5, 7.25),  # multiplication sign
        (" 2x4 ", 1.5, 3.5),
    ],
)
def test_dressed_lumber(label: str, width_in: float, depth_in: float) -> None:
    size = lumber_size(label)
    assert size.width_m / INCH_M == pytest.approx(width_in, rel=1e-12)
    assert size.depth_m / INCH_M == pytest.approx(depth_in, rel=1e-12)
    assert size.rough_sawn is False


@pytest.mark.parametrize(
    ("label", "width_in", "depth_in"),
    # rough-sawn (older houses): full nominal size, common practice
    [("2x4 rough", 2.0, 4.0), ("2x6 rough", 2.0, 6.0), ("2x4-rough", 2.0, 4.0)],
)
def test_rough_sawn_lumber_full_size(label: str, width_in: float, depth_in: float) -> None:
    size = lumber_size(label)
    assert size.width_m / INCH_M == pytest.approx(width_in, rel=1e-12)
    assert size.depth_m / INCH_M == pytest.approx(depth_in, rel=1e-12)
    assert size.rough_sawn is True


@pytest.mark.parametrize("label", ["", "abc", "2x", "x4", "2x4x6", "2x5", "7x4", "2 by 4", "2.5x4"])
def test_bad_lumber_labels(label: str) -> None:
    with pytest.raises(ValueError):
        lumber_size(label)


@pytest.mark.parametrize("label", ["0x4 rough", "2x0 rough"])
def test_zero_size_rough_lumber_refused(label: str) -> None:
    with pytest.raises(ValueError):
        lumber_size(label)


def test_framing_fraction_hand() -> None:
    # 1.5 in stud at 16 in on centre: 1.5/16 = 0.09375; + 0.156 for plates etc. = 0.24975
    assert framing_fraction(1.5 * INCH_M, 16 * INCH_M) == pytest.approx(0.09375, rel=1e-12)
    assert framing_fraction(1.5 * INCH_M, 16 * INCH_M, 0.156) == pytest.approx(0.24975, rel=1e-12)
    with pytest.raises(ValueError):
        framing_fraction(1.5 * INCH_M, 1.0 * INCH_M)  # spacing narrower than the stud
    with pytest.raises(ValueError):
        framing_fraction(1.5 * INCH_M, 16 * INCH_M, 0.95)  # share reaches 1


# --- batts -------------------------------------------------------------------------------------

R19_SI = r_ip_to_si(19.0)
T19_M = 6.25 * INCH_M


@pytest.mark.parametrize(
    ("cavity_in", "chart_r"),
    # commonly published glass-fibre compression chart (from memory): a nominal R-19 of 6-1/4 in
    # gives about R-18 in a 5-1/2 in cavity (2x6) and about R-13 in a 3-1/2 in cavity (2x4)
    [(5.5, 18.0), (3.5, 13.0)],
)
def test_r19_compression_against_chart(cavity_in: float, chart_r: float) -> None:
    fit = batt_in_cavity(R19_SI, T19_M, cavity_in * INCH_M)
    assert r_si_to_ip(fit.r_si) == pytest.approx(chart_r, abs=1.0)
    assert fit.compressed is True
    assert fit.compression_ratio == pytest.approx(cavity_in / 6.25, rel=1e-12)
    # a compression warning names the squeeze
    assert any("compressed" in w for w in fit.warnings)


def test_strong_compression_out_of_range_warning() -> None:
    # 2.5 in / 6.25 in = 40 % of nominal: below the half-thickness range of the estimate
    fit = batt_in_cavity(R19_SI, T19_M, 2.5 * INCH_M)
    assert len(fit.warnings) == 2
    assert r_si_to_ip(fit.r_si) < 19.0


def test_thinner_batt_keeps_nominal_with_gap_warning() -> None:
    # R-13 batt of 3.5 in in a 5.5 in cavity: not compressed -> nominal R-13, gap warned
    fit = batt_in_cavity(r_ip_to_si(13.0), 3.5 * INCH_M, 5.5 * INCH_M)
    assert r_si_to_ip(fit.r_si) == pytest.approx(13.0, rel=1e-12)
    assert fit.compressed is False
    assert any("gap" in w for w in fit.warnings)


def test_exact_fit_keeps_nominal_without_warning() -> None:
    # limiting case: cavity depth == batt thickness -> label R, nothing to warn about
    fit = batt_in_cavity(r_ip_to_si(21.0), 5.5 * INCH_M, 5.5 * INCH_M)
    assert r_si_to_ip(fit.r_si) == pytest.approx(21.0, rel=1e-12)
    assert fit.warnings == ()


@settings(max_examples=200, deadline=None)
@given(
    r_nominal=st.floats(min_value=0.1, max_value=10.0),
    thickness=st.floats(min_value=0.01, max_value=0.5),
    depth_a=st.floats(min_value=0.005, max_value=1.0),
    depth_b=st.floats(min_value=0.005, max_value=1.0),
)
def test_batt_r_monotone_in_depth_and_never_above_nominal(
    r_nominal: float, thickness: float, depth_a: float, depth_b: float
) -> None:
    shallow, deep = sorted((depth_a, depth_b))
    r_shallow = batt_in_cavity(r_nominal, thickness, shallow).r_si
    r_deep = batt_in_cavity(r_nominal, thickness, deep).r_si
    assert r_shallow <= r_deep * (1 + 1e-12)
    assert r_deep <= r_nominal * (1 + 1e-12)
    assert r_shallow > 0


@pytest.mark.parametrize("args", [(0.0, 0.1, 0.1), (3.0, -0.1, 0.1), (3.0, 0.1, 0.0)])
def test_batt_refuses_zero_or_negative(args: tuple[float, float, float]) -> None:
    with pytest.raises(ValueError):
        batt_in_cavity(*args)


@pytest.mark.parametrize(
    "args", [(math.nan, 0.1, 0.1), (3.0, math.nan, 0.1), (math.inf, 0.1, 0.05)]
)
def test_batt_refuses_non_finite(args: tuple[float, float, float]) -> None:
    with pytest.raises(ValueError):
        batt_in_cavity(*args)


# --- steel studs -------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("cavity_ip", "depth_in", "spacing_in", "effective_ip"),
    # ASHRAE 90.1 Appendix A style steel-stud table (from memory): R-13 in 3-1/2 in studs at
    # 16 in o.c. -> R-6.0; R-11 -> R-5.5; R-15 -> R-6.4; at 24 in R-13 -> R-7.2;
    # 6 in studs at 16 in R-19 -> R-7.1
    [
        (13.0, 3.5, 16, 6.0),
        (11.0, 3.5, 16, 5.5),
        (15.0, 3.5, 16, 6.4),
        (13.0, 3.5, 24, 7.2),
        (19.0, 6.0, 16, 7.1),
    ],
)
def test_steel_stud_table_rows(
    cavity_ip: float, depth_in: float, spacing_in: float, effective_ip: float
) -> None:
    effective = steel_stud_effective_r(r_ip_to_si(cavity_ip), depth_in * INCH_M, spacing_in)
    assert r_si_to_ip(effective) == pytest.approx(effective_ip, rel=1e-9)


def test_steel_stud_interpolation_hand() -> None:
    # R-12 between the R-11 (F = 5.5/11 = 0.5) and R-13 (F = 6.0/13 = 0.4615385) rows:
    # F = 0.5 + (0.4615385 - 0.5) x (12 - 11)/(13 - 11) = 0.4807692; R_eff = 12 x F = 5.769231
    effective = steel_stud_effective_r(r_ip_to_si(12.0), 3.5 * INCH_M, 16)
    assert r_si_to_ip(effective) == pytest.approx(5.769231, rel=1e-6)


@settings(max_examples=200, deadline=None)
@given(
    r_a=st.floats(min_value=5.0, max_value=30.0),
    r_b=st.floats(min_value=5.0, max_value=30.0),
    depth_in=st.sampled_from([3.5, 5.5, 6.0]),
    spacing_in=st.sampled_from([16, 24]),
)
def test_steel_effective_r_monotone_and_below_cavity(
    r_a: float, r_b: float, depth_in: float, spacing_in: int
) -> None:
    # more cavity R never lowers the layer's effective R; steel always costs R
    low, high = sorted((r_a, r_b))
    r_low = steel_stud_effective_r(r_ip_to_si(low), depth_in * INCH_M, spacing_in)
    r_high = steel_stud_effective_r(r_ip_to_si(high), depth_in * INCH_M, spacing_in)
    assert r_low <= r_high * (1 + 1e-12)
    assert r_high < r_ip_to_si(high)


def test_steel_refuses_zero_or_negative_cavity() -> None:
    with pytest.raises(ValueError):
        steel_stud_effective_r(0.0, 3.5 * INCH_M)
    with pytest.raises(ValueError):
        steel_stud_effective_r(-1.0, 3.5 * INCH_M)


@pytest.mark.parametrize("cavity_r", [math.nan, math.inf])
def test_steel_refuses_non_finite_cavity(cavity_r: float) -> None:
    with pytest.raises(ValueError):
        steel_stud_effective_r(cavity_r, 3.5 * INCH_M)
