"""Unit conversions against pint, and trade-style length entry (parse_length, format_inches)."""

from __future__ import annotations

import math

import pint
import pytest
from hypothesis import example, given, settings
from hypothesis import strategies as st

from server.physics import units
from server.physics.units import INCH_M, format_inches, from_si, to_si
from server.services.number_text import read_length

u = pint.UnitRegistry()
Q = u.Quantity

#: pint's plain "Btu" is the ISO Btu; the trade uses the International Table Btu (Btu_it).
#: The two differ by ~1.4e-7 relative, hence rel 1e-6 everywhere below.
REL = 1e-6


def _pint(value: float, src: str, dst: str) -> float:
    return float(Q(value, src).to(dst).magnitude)


# --- conversion constants: pint is the outside source ------------------------------------------


def test_r_factor_against_pint() -> None:
    # pint: 1 h·ft²·°F/Btu_it = 0.17611018 m²·K/W (REFERENCES.md "Units — pint")
    expected = _pint(1, "hr*ft**2*delta_degF/Btu_it", "m**2*K/W")
    assert expected == pytest.approx(0.17611018, rel=REL)
    assert units.R_IP_IN_SI == pytest.approx(expected, rel=REL)
    # DESIGN.md unit facts: RSI = R / 5.678263
    assert 1.0 / units.R_IP_IN_SI == pytest.approx(5.678263, rel=REL)


def test_k_factor_against_pint() -> None:
    # pint: 1 Btu_it·in/(h·ft²·°F) = 0.144227889 W/(m·K); DESIGN.md rounds it to 0.1442279
    expected = _pint(1, "Btu_it*inch/(hr*ft**2*delta_degF)", "W/(m*K)")
    assert expected == pytest.approx(0.1442279, rel=REL)
    assert units.K_IP_IN_SI == pytest.approx(expected, rel=REL)


@pytest.mark.parametrize(
    ("constant", "src", "dst"),
    [
        # U-factor: 1 Btu_it/(h·ft²·°F) = 5.678263 W/(m²·K) (pint)
        ("U_IP_IN_SI", "Btu_it/(hr*ft**2*delta_degF)", "W/(m**2*K)"),
        # UA: 1 Btu_it/(h·°F) = 0.5275279 W/K (pint)
        ("UA_IP_IN_SI", "Btu_it/(hr*delta_degF)", "W/K"),
        # per-length resistance: 1 h·ft·°F/Btu_it = 0.5777893 m·K/W (pint)
        ("R_LENGTH_IP_IN_SI", "hr*ft*delta_degF/Btu_it", "m*K/W"),
        # heat flow per length: 1 Btu_it/(h·ft) = 0.9615193 W/m (pint)
        ("Q_LENGTH_IP_IN_SI", "Btu_it/(hr*ft)", "W/m"),
        # power: 1 Btu_it/h = 0.2930711 W (pint; DESIGN.md unit facts)
        ("BTU_PER_HOUR_W", "Btu_it/hr", "W"),
    ],
)
def test_derived_factors_against_pint(constant: str, src: str, dst: str) -> None:
    assert getattr(units, constant) == pytest.approx(_pint(1, src, dst), rel=REL)


def test_published_rounded_factors() -> None:
    # DESIGN.md unit facts (published, rounded): 1 Btu/h = 0.2930711 W; 1 kWh = 3412.14 Btu
    assert units.BTU_PER_HOUR_W == pytest.approx(0.2930711, rel=REL)
    assert units.KWH_BTU == pytest.approx(3412.14, rel=REL)
    # pint: 1 kWh in Btu_it
    assert units.KWH_BTU == pytest.approx(_pint(1, "kWh", "Btu_it"), rel=REL)


@pytest.mark.parametrize("temp_f", [-40.0, 0.0, 32.0, 65.0, 70.0, 212.0])
def test_fahrenheit_to_celsius_against_pint(temp_f: float) -> None:
    # pint offset units: degF -> degC (-40 °F = -40 °C, 32 °F = 0 °C, 212 °F = 100 °C)
    expected = _pint(temp_f, "degF", "degC")
    assert units.f_to_c(temp_f) == pytest.approx(expected, abs=1e-9)
    assert units.c_to_f(expected) == pytest.approx(temp_f, abs=1e-9)


def test_degree_days_scale() -> None:
    # DESIGN.md: HDD in °F·day = 1.8 x HDD in K·day; pint: 1 delta_degF = 5/9 K
    assert units.delta_k_to_f(1000.0) == pytest.approx(1800.0, rel=1e-12)
    assert units.delta_f_to_k(1.0) == pytest.approx(_pint(1, "delta_degF", "K"), rel=REL)


@pytest.mark.parametrize(
    ("func", "value", "src", "dst"),
    [
        (units.r_ip_to_si, 13.0, "hr*ft**2*delta_degF/Btu_it", "m**2*K/W"),
        (units.k_ip_to_si, 0.27, "Btu_it*inch/(hr*ft**2*delta_degF)", "W/(m*K)"),
        (units.u_ip_to_si, 0.0844, "Btu_it/(hr*ft**2*delta_degF)", "W/(m**2*K)"),
        (units.r_si_to_ip, 2.0, "m**2*K/W", "hr*ft**2*delta_degF/Btu_it"),
        (units.k_si_to_ip, 0.04, "W/(m*K)", "Btu_it*inch/(hr*ft**2*delta_degF)"),
        (units.u_si_to_ip, 0.3, "W/(m**2*K)", "Btu_it/(hr*ft**2*delta_degF)"),
    ],
)
def test_conversion_functions_against_pint(func, value: float, src: str, dst: str) -> None:  # type: ignore[no-untyped-def]
    # pint converts the same quantity; R-13 -> 2.2894 RSI, k 0.27 -> 0.03894 W/(m·K), ...
    assert func(value) == pytest.approx(_pint(value, src, dst), rel=REL)


def test_edge_tables_against_pint() -> None:
    # pint: 3.5 in = 88.9 mm; 1000 ft² = 92.90304 m²; 12000 ft³ = 339.802 m³
    assert to_si(3.5, "thickness", "ip") == pytest.approx(_pint(3.5, "inch", "mm"), rel=REL)
    assert to_si(1000, "area", "ip") == pytest.approx(_pint(1000, "ft**2", "m**2"), rel=REL)
    assert to_si(12000, "volume", "ip") == pytest.approx(_pint(12000, "ft**3", "m**3"), rel=REL)
    # si values pass through unchanged
    assert to_si(88.9, "thickness", "si") == 88.9
    assert from_si(88.9, "thickness", "si") == 88.9


# --- round trips (hypothesis) ------------------------------------------------------------------

_POSITIVE = st.floats(min_value=1e-6, max_value=1e6, allow_nan=False, allow_infinity=False)


@settings(max_examples=200, deadline=None)
@given(
    value=_POSITIVE,
    quantity=st.sampled_from(["r", "conductivity", "u", "thickness", "area", "r_per_length"]),
)
def test_ip_si_round_trip_identity(value: float, quantity: str) -> None:
    # to_si then from_si is the identity (one multiply and one divide: a few ulps)
    assert from_si(to_si(value, quantity, "ip"), quantity, "ip") == pytest.approx(value, rel=1e-12)


@settings(max_examples=200, deadline=None)
@given(inches=st.floats(min_value=0.125, max_value=500.0))  # >= 1 step: never rounds to 0
def test_format_then_parse_within_a_rounding_step(inches: float) -> None:
    # format_inches rounds to the nearest 1/8 in by default, so its text is within half a step
    # (1/16 in) of the length
    coarse = read_length(format_inches(inches * INCH_M)) / INCH_M
    assert abs(coarse - inches) <= 1 / 16 + 1e-9


@settings(max_examples=200, deadline=None)
@given(inches=st.floats(min_value=0.0625, max_value=500.0))
@example(inches=0.6875)  # 11/16 in
def test_format_sixteenths_then_parse_within_1_32_in(inches: float) -> None:
    # denominator 16 -> nearest 1/16 in -> within 1/32 in of the length
    fine = read_length(format_inches(inches * INCH_M, 16)) / INCH_M
    assert abs(fine - inches) <= 1 / 32 + 1e-9


def test_format_inches_hand_cases() -> None:
    # 3.5 in -> 3-1/2"; 0.5 in -> 1/2"; 8.1 in -> nearest 1/8 is 8-1/8"; 4 in -> 4"
    assert format_inches(3.5 * INCH_M) == '3-1/2"'
    assert format_inches(0.5 * INCH_M) == '1/2"'
    assert format_inches(8.1 * INCH_M) == '8-1/8"'
    assert format_inches(4.0 * INCH_M) == '4"'
    assert format_inches(0.4375 * INCH_M, 16) == '7/16"'


# --- parse_length ------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("text", "inches"),
    [
        ("3-1/2", 3.5),  # 3 + 1/2
        ('5 1/2"', 5.5),  # 5 + 1/2, inch mark
        ("89 mm", 89 / 25.4),  # 89 mm / 25.4 mm/in = 3.50394 in
        ("1/2", 0.5),
        ("3.5", 3.5),
        ("5' 6\"", 66.0),  # 5 x 12 + 6
        ("2 ft", 24.0),  # 2 x 12
        ("0.75in", 0.75),
        ("3 1/2 in", 3.5),
        ("3 1/2\u2033", 3.5),  # unicode double prime = inch
        ("5\u2032 6\u2033", 66.0),  # unicode prime = foot
        ("12 cm", 120 / 25.4),  # 120 mm / 25.4 = 4.72441 in
        ("10-1/2", 10.5),  # two-digit whole number
        ("1 11/16", 1.6875),  # 1 + 11/16 (two-digit numerator after a whole number)
    ],
)
def test_parse_length_trade_forms(text: str, inches: float) -> None:
    assert read_length(text) / INCH_M == pytest.approx(inches, rel=1e-12)


@pytest.mark.parametrize(("text", "inches"), [("11/16", 0.6875), ('15/16"', 0.9375)])
def test_parse_length_two_digit_numerator(text: str, inches: float) -> None:
    # 11/16 = 0.6875; 15/16 = 0.9375 (common trade fractions of an inch; once read as 1 + 1/16)
    assert read_length(text) / INCH_M == pytest.approx(inches, rel=1e-12)


def test_parse_length_default_unit_mm() -> None:
    # si entry: a bare number is millimetres (89 -> 0.089 m)
    assert read_length("89", default_unit="mm") == pytest.approx(0.089, rel=1e-12)


@pytest.mark.parametrize("text", ["", "   ", "abc", "0", "-3", "3/0", "1/2/3", "3 furlongs"])
def test_parse_length_bad_text_plain_message(text: str) -> None:
    with pytest.raises(ValueError) as info:
        read_length(text)
    message = str(info.value)
    # a plain sentence for a person: no traceback words, no Python type names
    assert message and "Error" not in message and "Fraction" not in message
    assert len(message) < 200


def test_parse_length_absurdly_long_number_is_a_value_error() -> None:
    # 400 digits once escaped as OverflowError from float(Fraction); it must be a ValueError
    with pytest.raises(ValueError):
        read_length("1" * 400)


def test_parse_length_absurd_feet_is_a_value_error() -> None:
    with pytest.raises(ValueError):
        read_length("1" * 400 + "' 6\"")


def test_parse_length_feet_and_zero_inches() -> None:
    # 5' 0" = 5 x 12 + 0 = 60 in
    assert read_length("5' 0\"") / INCH_M == pytest.approx(60.0, rel=1e-12)


def test_parse_length_tiny_positive_is_accepted() -> None:
    # 1/64 in is a real (if small) length: 0.015625 in
    assert read_length("1/64") / INCH_M == pytest.approx(1 / 64, rel=1e-12)
    assert math.isfinite(read_length("1/64"))
